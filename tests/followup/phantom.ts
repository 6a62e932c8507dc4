// Synthetic inputs for the follow-up tests: seeded random rigid motions, a landmark set, and an
// ellipsoid liver with an off-centre bump (so its principal axes and their signs are unambiguous),
// voxelised on any grid after a known motion. Written with plain vector maths, independent of src/.
import { makeVolume, type Volume } from '../../src/volume/volume.js';
import { LANDMARK_NAMES, type LandmarkName, type LandmarkSet } from '../../src/segments/landmarks.js';

export type V3 = [number, number, number];

/** Small deterministic PRNG (mulberry32) so every run draws the same "random" motions. */
export function seeded(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Rotation by `deg` degrees about a unit axis (Rodrigues), row-major 3×3. */
export function axisAngle(axis: V3, deg: number): number[] {
  const n = Math.hypot(...axis);
  const [x, y, z] = axis.map((c) => c / n);
  const t = (deg * Math.PI) / 180, c = Math.cos(t), s = Math.sin(t), C = 1 - c;
  return [
    c + x * x * C, x * y * C - z * s, x * z * C + y * s,
    y * x * C + z * s, c + y * y * C, y * z * C - x * s,
    z * x * C - y * s, z * y * C + x * s, c + z * z * C,
  ];
}

export interface Motion {
  R: number[];
  t: V3;
}

/** A random rigid motion: rotation up to `maxDeg` about a random axis, translation up to `maxMm` per axis. */
export function randomMotion(rand: () => number, maxDeg: number, maxMm: number): Motion {
  const axis: V3 = [rand() - 0.5, rand() - 0.5, rand() - 0.5];
  const deg = (0.3 + 0.7 * rand()) * maxDeg;
  return { R: axisAngle(axis, deg), t: [(2 * rand() - 1) * maxMm, (2 * rand() - 1) * maxMm, (2 * rand() - 1) * maxMm] };
}

export function move(m: Motion, p: readonly number[]): V3 {
  const R = m.R;
  return [
    R[0] * p[0] + R[1] * p[1] + R[2] * p[2] + m.t[0],
    R[3] * p[0] + R[4] * p[1] + R[5] * p[2] + m.t[1],
    R[6] * p[0] + R[7] * p[1] + R[8] * p[2] + m.t[2],
  ];
}

export function unmove(m: Motion, p: readonly number[]): V3 {
  const R = m.R;
  const q = [p[0] - m.t[0], p[1] - m.t[1], p[2] - m.t[2]];
  return [
    R[0] * q[0] + R[3] * q[1] + R[6] * q[2],
    R[1] * q[0] + R[4] * q[1] + R[7] * q[2],
    R[2] * q[0] + R[5] * q[1] + R[8] * q[2],
  ];
}

/** Angle (degrees) of Raᵀ·Rb: how far apart two rotations are. */
export function angleBetween(Ra: readonly number[], Rb: readonly number[]): number {
  let tr = 0;
  for (let r = 0; r < 3; r++) for (let c = 0; c < 3; c++) tr += Ra[c * 3 + r] * Rb[c * 3 + r];
  return (Math.acos(Math.min(1, Math.max(-1, (tr - 1) / 2))) * 180) / Math.PI;
}

/**
 * A landmark set the plane rule accepts (RAS mm, +x towards the patient's right): the IVC behind
 * the liver's middle, the right hepatic vein to the right, the middle one forward, the umbilical
 * fissure forward and to the left, the portal bifurcation below the confluence.
 */
export const LANDMARKS: LandmarkSet = {
  points: {
    ivc_superior: [12, -28, 60],
    ivc_inferior: [10, -32, -10],
    right_hepatic_vein: [85, -8, 50],
    middle_hepatic_vein: [28, 22, 45],
    umbilical_fissure: [-12, 28, 20],
    portal_bifurcation: [12, 2, 12],
  },
};

/** The landmark set after a motion. */
export function movedLandmarks(m: Motion): LandmarkSet {
  const points = {} as Record<LandmarkName, V3>;
  for (const n of LANDMARK_NAMES) points[n] = move(m, LANDMARKS.points[n]);
  return { points };
}

/** The liver: ellipsoid right of the midline plus a bump on its upper left front, in the reference visit's world mm. */
export const LIVER = { centre: [40, 0, 20] as V3, semi: [95, 70, 55] as V3, bump: { centre: [-20, -35, 45] as V3, radius: 32 } };

export function inLiver(p: V3): boolean {
  const { centre: c, semi: s, bump } = LIVER;
  const x = (p[0] - c[0]) / s[0], y = (p[1] - c[1]) / s[1], z = (p[2] - c[2]) / s[2];
  if (x * x + y * y + z * z <= 1) return true;
  return Math.hypot(p[0] - bump.centre[0], p[1] - bump.centre[1], p[2] - bump.centre[2]) <= bump.radius;
}

/** Axis-aligned affine with the given spacing and the grid's first voxel at `origin`. */
export function affineAt(origin: V3, spacing: V3): number[] {
  return [spacing[0], 0, 0, origin[0], 0, spacing[1], 0, origin[1], 0, 0, spacing[2], origin[2], 0, 0, 0, 1];
}

/** A uint8 mask on `affine`'s grid, 1 where `inside(world point)`. */
export function maskVolume(dims: V3, affine: number[], inside: (p: V3) => boolean): Volume {
  const data = new Uint8Array(dims[0] * dims[1] * dims[2]);
  let n = 0;
  const p: V3 = [0, 0, 0];
  for (let k = 0; k < dims[2]; k++) {
    for (let j = 0; j < dims[1]; j++) {
      for (let i = 0; i < dims[0]; i++, n++) {
        p[0] = affine[0] * i + affine[1] * j + affine[2] * k + affine[3];
        p[1] = affine[4] * i + affine[5] * j + affine[6] * k + affine[7];
        p[2] = affine[8] * i + affine[9] * j + affine[10] * k + affine[11];
        if (inside(p)) data[n] = 1;
      }
    }
  }
  return makeVolume(dims, data, affine, 'uint8');
}

/** A 300 × 260 × 240 mm grid (2 mm voxels unless told) centred on the liver after `motion`. */
export function gridAround(motion: Motion | null, spacing: V3 = [2, 2, 2]): { dims: V3; affine: number[] } {
  const dims: V3 = [300, 260, 240].map((d, n) => Math.ceil(d / spacing[n])) as V3;
  const centre = motion ? move(motion, LIVER.centre) : LIVER.centre;
  const origin: V3 = [0, 1, 2].map((n) => centre[n] - (dims[n] * spacing[n]) / 2 + 0.37) as V3;
  return { dims, affine: affineAt(origin, spacing) };
}

/** The liver after `motion`, voxelised on the grid around it. */
export function movedLiver(motion: Motion | null, spacing: V3 = [2, 2, 2]): Volume {
  const { dims, affine } = gridAround(motion, spacing);
  return maskVolume(dims, affine, motion ? (p: V3) => inLiver(unmove(motion, p)) : inLiver);
}
