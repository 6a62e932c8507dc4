import type { Mat4, Vec3 } from '../geometry/mat4.js';
import { symmetricEigen3 } from '../geometry/eigen.js';
import type { Volume } from '../volume/volume.js';

/**
 * What alignment needs from a liver mask, a few hundred kilobytes however large the volume: the
 * centroid and principal axes (second moments) of the liver voxels, and an evenly subsampled set of
 * surface voxel centres in world mm. Keeping only this lets a patient's visits be held in memory
 * together without their full masks.
 */
export interface LiverShape {
  /** World mm. */
  centroid: Vec3;
  /** Row-major 3×3, columns are the principal axes (unit, right-handed), longest extent first. */
  axes: number[];
  /** Variances along the axes, mm², largest first. */
  variancesMm2: [number, number, number];
  /**
   * Surface points, xyz triples in world mm: each kept surface voxel centre moved along its normal
   * onto the sub-voxel surface estimated from how much of a small ball around it is liver. Two
   * voxelisations of one liver then give nearly the same points, where raw voxel centres differ by
   * their staircases and bias the fit by a few tenths of a degree.
   */
  surface: Float64Array;
  /** Outward unit normal at each surface point (world), from the mask around it. */
  normals: Float64Array;
  surfaceCount: number;
  voxelCount: number;
  /** The mask's grid, to tell whether a world point was inside the scanned field. */
  dims: readonly [number, number, number];
  inverse: Mat4;
}

/** At most this many surface points are kept; enough to pin a rigid fit well below a voxel. */
export const MAX_SURFACE_POINTS = 20000;

/** Liver voxels are those whose value (after scaling) is above zero, as for every mask in Falciform. */
export function describeLiver(liver: Volume, maxSurfacePoints = MAX_SURFACE_POINTS): LiverShape | null {
  const [nx, ny, nz] = liver.dims;
  const data = liver.data;
  const slope = liver.slope, inter = liver.inter;
  const sy = nx, sz = nx * ny;
  // Moments in index space (small numbers, less cancellation), mapped to world mm afterwards.
  let count = 0, si = 0, sj = 0, sk = 0, sii = 0, sjj = 0, skk = 0, sij = 0, sik = 0, sjk = 0;
  let surfaceCount = 0;
  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      const row = sy * j + sz * k;
      for (let i = 0; i < nx; i++) {
        const n = row + i;
        if (!(data[n] * slope + inter > 0)) continue;
        count++;
        si += i; sj += j; sk += k;
        sii += i * i; sjj += j * j; skk += k * k; sij += i * j; sik += i * k; sjk += j * k;
        if (isSurface(data, slope, inter, n, i, j, k, nx, ny, nz, sy, sz)) surfaceCount++;
      }
    }
  }
  if (count === 0) return null;

  const mi = si / count, mj = sj / count, mk = sk / count;
  const cIdx = [
    sii / count - mi * mi, sij / count - mi * mj, sik / count - mi * mk,
    sij / count - mi * mj, sjj / count - mj * mj, sjk / count - mj * mk,
    sik / count - mi * mk, sjk / count - mj * mk, skk / count - mk * mk,
  ];
  const A = liver.affine;
  const a3 = [A[0], A[1], A[2], A[4], A[5], A[6], A[8], A[9], A[10]];
  const cov = conjugate(a3, cIdx);
  const { values, vectors } = symmetricEigen3(cov);
  const centroid: Vec3 = [
    A[0] * mi + A[1] * mj + A[2] * mk + A[3],
    A[4] * mi + A[5] * mj + A[6] * mk + A[7],
    A[8] * mi + A[9] * mj + A[10] * mk + A[11],
  ];

  // Every stride-th surface voxel in scan order: even coverage, deterministic.
  const stride = Math.max(1, Math.ceil(surfaceCount / maxSurfacePoints));
  const kept = Math.ceil(surfaceCount / stride);
  const surface = new Float64Array(3 * kept);
  const normals = new Float64Array(3 * kept);
  const ball = normalBall(liver);
  let seen = 0, out = 0;
  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      const row = sy * j + sz * k;
      for (let i = 0; i < nx; i++) {
        const n = row + i;
        if (!(data[n] * slope + inter > 0)) continue;
        if (!isSurface(data, slope, inter, n, i, j, k, nx, ny, nz, sy, sz)) continue;
        if (seen++ % stride !== 0 || out >= kept) continue;
        const depth = outwardNormal(data, slope, inter, i, j, k, nx, ny, nz, ball, normals, 3 * out);
        surface[3 * out] = A[0] * i + A[1] * j + A[2] * k + A[3] + depth * normals[3 * out];
        surface[3 * out + 1] = A[4] * i + A[5] * j + A[6] * k + A[7] + depth * normals[3 * out + 1];
        surface[3 * out + 2] = A[8] * i + A[9] * j + A[10] * k + A[11] + depth * normals[3 * out + 2];
        out++;
      }
    }
  }
  return {
    centroid,
    axes: vectors,
    variancesMm2: [Math.max(0, values[0]), Math.max(0, values[1]), Math.max(0, values[2])],
    surface,
    normals,
    surfaceCount: out,
    voxelCount: count,
    dims: liver.dims,
    inverse: liver.inverse,
  };
}

/** Whether a world point falls inside the grid the liver mask was drawn on. */
export function insideGrid(shape: LiverShape, p: Vec3): boolean {
  const m = shape.inverse;
  const [nx, ny, nz] = shape.dims;
  const i = m[0] * p[0] + m[1] * p[1] + m[2] * p[2] + m[3];
  const j = m[4] * p[0] + m[5] * p[1] + m[6] * p[2] + m[7];
  const k = m[8] * p[0] + m[9] * p[1] + m[10] * p[2] + m[11];
  return i > -0.5 && j > -0.5 && k > -0.5 && i < nx - 0.5 && j < ny - 0.5 && k < nz - 0.5;
}

/** An inside voxel with a 6-neighbour outside the mask or outside the grid. */
function isSurface(
  data: ArrayLike<number>, slope: number, inter: number, n: number,
  i: number, j: number, k: number, nx: number, ny: number, nz: number, sy: number, sz: number,
): boolean {
  if (i === 0 || j === 0 || k === 0 || i === nx - 1 || j === ny - 1 || k === nz - 1) return true;
  return (
    !(data[n - 1] * slope + inter > 0) || !(data[n + 1] * slope + inter > 0) ||
    !(data[n - sy] * slope + inter > 0) || !(data[n + sy] * slope + inter > 0) ||
    !(data[n - sz] * slope + inter > 0) || !(data[n + sz] * slope + inter > 0)
  );
}

/**
 * Voxel offsets within a ball in world mm (not a box of voxels, which would tilt normals on
 * anisotropic grids), with each offset's world vector. A few voxels across, so the staircase of a
 * voxelised surface averages out.
 */
interface NormalBall {
  di: Int32Array;
  dj: Int32Array;
  dk: Int32Array;
  world: Float64Array;
  count: number;
  /** Radius of the sphere with the ball's voxel volume (centre voxel included), mm. */
  radiusMm: number;
  /** Largest sub-voxel shift allowed, mm: one voxel step. */
  maxShiftMm: number;
}

function normalBall(v: Volume): NormalBall {
  const [sx, sy, sz] = v.spacingMm;
  const radius = Math.max(3 * Math.min(sx, sy, sz), 1.5 * Math.max(sx, sy, sz));
  const ri = Math.floor(radius / sx), rj = Math.floor(radius / sy), rk = Math.floor(radius / sz);
  const A = v.affine;
  const di: number[] = [], dj: number[] = [], dk: number[] = [], world: number[] = [];
  for (let c = -rk; c <= rk; c++) {
    for (let b = -rj; b <= rj; b++) {
      for (let a = -ri; a <= ri; a++) {
        const x = A[0] * a + A[1] * b + A[2] * c, y = A[4] * a + A[5] * b + A[6] * c, z = A[8] * a + A[9] * b + A[10] * c;
        if (Math.hypot(x, y, z) > radius || (a === 0 && b === 0 && c === 0)) continue;
        di.push(a); dj.push(b); dk.push(c); world.push(x, y, z);
      }
    }
  }
  const voxelMm3 = Math.abs(sx * sy * sz);
  return {
    di: Int32Array.from(di), dj: Int32Array.from(dj), dk: Int32Array.from(dk), world: Float64Array.from(world), count: di.length,
    radiusMm: Math.cbrt(((di.length + 1) * voxelMm3 * 3) / (4 * Math.PI)),
    maxShiftMm: Math.max(sx, sy, sz),
  };
}

/**
 * Writes the outward unit normal at a surface voxel (the sum of the world offsets to outside or
 * off-grid voxels in the ball) and returns how far inside the surface the voxel centre lies, mm:
 * for a locally flat surface the outside share of a ball of radius R whose centre is at depth δ is
 * (R − δ)²(2R + δ) / 4R³, inverted here by bisection.
 */
function outwardNormal(
  data: ArrayLike<number>, slope: number, inter: number, i: number, j: number, k: number,
  nx: number, ny: number, nz: number, ball: NormalBall, out: Float64Array, at: number,
): number {
  let x = 0, y = 0, z = 0, outsideCount = 0;
  for (let o = 0; o < ball.count; o++) {
    const a = i + ball.di[o], b = j + ball.dj[o], c = k + ball.dk[o];
    const outside = a < 0 || b < 0 || c < 0 || a >= nx || b >= ny || c >= nz || !(data[a + nx * (b + ny * c)] * slope + inter > 0);
    if (!outside) continue;
    outsideCount++;
    x += ball.world[3 * o]; y += ball.world[3 * o + 1]; z += ball.world[3 * o + 2];
  }
  const len = Math.hypot(x, y, z);
  if (len === 0) return 0;
  out[at] = x / len; out[at + 1] = y / len; out[at + 2] = z / len;
  const share = outsideCount / (ball.count + 1);
  const R = ball.radiusMm;
  let lo = -R, hi = R;
  for (let it = 0; it < 40; it++) {
    const d = (lo + hi) / 2;
    const f = ((R - d) * (R - d) * (2 * R + d)) / (4 * R * R * R);
    if (f > share) lo = d;
    else hi = d;
  }
  const depth = (lo + hi) / 2;
  return Math.max(-ball.maxShiftMm, Math.min(ball.maxShiftMm, depth));
}

/** A·C·Aᵀ for row-major 3×3 matrices. */
function conjugate(a: number[], c: number[]): number[] {
  const ac = new Array<number>(9);
  for (let r = 0; r < 3; r++) for (let q = 0; q < 3; q++) ac[r * 3 + q] = a[r * 3] * c[q] + a[r * 3 + 1] * c[3 + q] + a[r * 3 + 2] * c[6 + q];
  const out = new Array<number>(9);
  for (let r = 0; r < 3; r++) for (let q = 0; q < 3; q++) out[r * 3 + q] = ac[r * 3] * a[q * 3] + ac[r * 3 + 1] * a[q * 3 + 1] + ac[r * 3 + 2] * a[q * 3 + 2];
  return out;
}
