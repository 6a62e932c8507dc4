// Analytic phantoms for the segment tests: an ellipsoid liver on oblique, anisotropic grids and a
// landmark set at known world coordinates. The plane rule here is written out again on purpose, in
// world space with plain vector maths, so tests never evaluate the builder's own code against itself.
import { makeVolume, type Volume } from '../../src/volume/volume.js';
import type { LandmarkSet } from '../../src/segments/landmarks.js';

export type V3 = [number, number, number];

/** Rotation about x, then y, then z (radians), row-major 3×3. */
export function rotation(ax: number, ay: number, az: number): number[] {
  const [cx, sx, cy, sy, cz, sz] = [Math.cos(ax), Math.sin(ax), Math.cos(ay), Math.sin(ay), Math.cos(az), Math.sin(az)];
  const Rx = [1, 0, 0, 0, cx, -sx, 0, sx, cx];
  const Ry = [cy, 0, sy, 0, 1, 0, -sy, 0, cy];
  const Rz = [cz, -sz, 0, sz, cz, 0, 0, 0, 1];
  return mul3(Rz, mul3(Ry, Rx));
}

function mul3(a: number[], b: number[]): number[] {
  const o = new Array<number>(9).fill(0);
  for (let r = 0; r < 3; r++) for (let c = 0; c < 3; c++) for (let k = 0; k < 3; k++) o[r * 3 + c] += a[r * 3 + k] * b[k * 3 + c];
  return o;
}

/** Affine whose grid is centred on `centre`: columns R·diag(spacing) (a negative spacing flips an axis). */
export function gridAffine(R: number[], spacing: V3, dims: V3, centre: V3): number[] {
  const A = [0, 1, 2].map((r) => [0, 1, 2].map((c) => R[r * 3 + c] * spacing[c]));
  const half = dims.map((d) => (d - 1) / 2);
  const t = [0, 1, 2].map((r) => centre[r] - (A[r][0] * half[0] + A[r][1] * half[1] + A[r][2] * half[2]));
  return [...A[0], t[0], ...A[1], t[1], ...A[2], t[2], 0, 0, 0, 1];
}

export function worldOf(affine: readonly number[], i: number, j: number, k: number): V3 {
  return [
    affine[0] * i + affine[1] * j + affine[2] * k + affine[3],
    affine[4] * i + affine[5] * j + affine[6] * k + affine[7],
    affine[8] * i + affine[9] * j + affine[10] * k + affine[11],
  ];
}

/** The liver: an axis-aligned ellipsoid in world mm, right of the midline (RAS: right is +x, nifti1.h). */
export const LIVER = { centre: [30, 10, 20] as V3, semiAxes: [95, 75, 65] as V3 };

export function inEllipsoid(p: V3, centre: V3 = LIVER.centre, semi: V3 = LIVER.semiAxes): boolean {
  const x = (p[0] - centre[0]) / semi[0], y = (p[1] - centre[1]) / semi[1], z = (p[2] - centre[2]) / semi[2];
  return x * x + y * y + z * z <= 1;
}

export function sphereMask(dims: V3, affine: number[], centre: V3, radius: number, value = 1): Uint8Array {
  return maskOf(dims, affine, (p) => Math.hypot(p[0] - centre[0], p[1] - centre[1], p[2] - centre[2]) <= radius, value);
}

export function maskOf(dims: V3, affine: number[], inside: (p: V3) => boolean, value = 1): Uint8Array {
  const out = new Uint8Array(dims[0] * dims[1] * dims[2]);
  let n = 0;
  for (let k = 0; k < dims[2]; k++) for (let j = 0; j < dims[1]; j++) for (let i = 0; i < dims[0]; i++, n++) {
    if (inside(worldOf(affine, i, j, k))) out[n] = value;
  }
  return out;
}

export function liverVolume(dims: V3, affine: number[]): Volume {
  return makeVolume(dims, maskOf(dims, affine, (p) => inEllipsoid(p)), affine, 'uint8');
}

/**
 * Landmarks placed as in a typical liver: the IVC posterior and right of the midline, the right
 * hepatic vein running right and a little forward, the middle hepatic vein forward, the umbilical
 * fissure forward and to the left, the portal bifurcation below the hepatic-vein confluence.
 */
export function phantomLandmarks(): LandmarkSet {
  return {
    points: {
      ivc_superior: [18, -30, 50],
      ivc_inferior: [15, -35, -20],
      right_hepatic_vein: [80, -10, 45],
      middle_hepatic_vein: [25, 20, 45],
      umbilical_fissure: [-15, 25, 20],
      portal_bifurcation: [10, 0, 15],
    },
  };
}

const sub = (a: readonly number[], b: readonly number[]): V3 => [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
const dotp = (a: readonly number[], b: readonly number[]) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
const crossp = (a: readonly number[], b: readonly number[]): V3 => [
  a[1] * b[2] - a[2] * b[1],
  a[2] * b[0] - a[0] * b[2],
  a[0] * b[1] - a[1] * b[0],
];

/** Signed distances (mm) of a world point to the four planes of the brief's plane rule. */
export function planeDistances(set: LandmarkSet, p: V3): { rhv: number; mhv: number; uf: number; portal: number } {
  const s = set.points.ivc_superior, i = set.points.ivc_inferior;
  const side = (vein: readonly number[]) => {
    const n = crossp(sub(s, i), sub(vein, i));
    const len = Math.hypot(...n) * (n[0] < 0 ? -1 : 1); // normal towards the patient's right (+x)
    return dotp(n, sub(p, i)) / len;
  };
  const axis = sub(s, i);
  return {
    rhv: side(set.points.right_hepatic_vein),
    mhv: side(set.points.middle_hepatic_vein),
    uf: side(set.points.umbilical_fissure),
    portal: dotp(axis, sub(p, set.points.portal_bifurcation)) / Math.hypot(...axis),
  };
}

/** The brief's plane rule, steps 1–4, for one world point; names as in the segment scheme. */
export function planeRule(set: LandmarkSet, p: V3, splitIV: boolean): string {
  const d = planeDistances(set, p);
  const above = d.portal > 0;
  if (d.rhv > 0) return above ? 'VII' : 'VI';
  if (d.mhv > 0) return above ? 'VIII' : 'V';
  if (d.uf > 0) return splitIV ? (above ? 'IVa' : 'IVb') : 'IV';
  return above ? 'II' : 'III';
}

/** True when p lies within eps mm of a plane the rule consults, where rounding may pick either side. */
export function nearTie(set: LandmarkSet, p: V3, eps = 1e-6): boolean {
  const d = planeDistances(set, p);
  return Math.min(Math.abs(d.rhv), Math.abs(d.mhv), Math.abs(d.uf), Math.abs(d.portal)) < eps;
}

/**
 * The same plane rule with the planes prepared once, for integration over many millions of points:
 * returns a segment name for (x, y, z) in world mm, or null outside the ellipsoid liver.
 */
export function fastRule(set: LandmarkSet, splitIV: boolean): (x: number, y: number, z: number) => string | null {
  const s = set.points.ivc_superior, i = set.points.ivc_inferior;
  const unit = (vein: readonly number[]) => {
    const n = crossp(sub(s, i), sub(vein, i));
    const len = Math.hypot(...n) * (n[0] < 0 ? -1 : 1);
    return [n[0] / len, n[1] / len, n[2] / len];
  };
  const r = unit(set.points.right_hepatic_vein), m = unit(set.points.middle_hepatic_vein), u = unit(set.points.umbilical_fissure);
  const axis = sub(s, i);
  const al = Math.hypot(...axis);
  const h = [axis[0] / al, axis[1] / al, axis[2] / al];
  const q = set.points.portal_bifurcation;
  const [cx, cy, cz] = LIVER.centre, [ax, ay, az] = LIVER.semiAxes;
  return (x, y, z) => {
    const ex = (x - cx) / ax, ey = (y - cy) / ay, ez = (z - cz) / az;
    if (ex * ex + ey * ey + ez * ez > 1) return null;
    const dx = x - i[0], dy = y - i[1], dz = z - i[2];
    const above = h[0] * (x - q[0]) + h[1] * (y - q[1]) + h[2] * (z - q[2]) > 0;
    if (r[0] * dx + r[1] * dy + r[2] * dz > 0) return above ? 'VII' : 'VI';
    if (m[0] * dx + m[1] * dy + m[2] * dz > 0) return above ? 'VIII' : 'V';
    if (u[0] * dx + u[1] * dy + u[2] * dz > 0) return splitIV ? (above ? 'IVa' : 'IVb') : 'IV';
    return above ? 'II' : 'III';
  };
}
