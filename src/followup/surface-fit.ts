import { applyRigid, fitRigidFlat, type RigidTransform } from '../geometry/rigid.js';
import { mul3, transpose3 } from '../geometry/eigen.js';
import type { LiverShape } from './liver-shape.js';
import { PointGrid } from './point-grid.js';

/**
 * Rigid alignment of one liver surface onto another: principal-axis starts, then trimmed
 * iterative closest point (ICP) on surface voxel centres.
 *
 * - Starts: the axes of a mask's second moments are known only up to sign, so each of the four
 *   proper sign choices is a candidate, plus "no rotation" (serial scans are often already close
 *   in world space and near-round livers have unstable axes). Each start is refined briefly and
 *   the best-fitting one is refined to convergence.
 * - Trimming: only the closest TRIM_KEEP share of pairs enters each fit, so a resected part, a
 *   different field of view or a segmentation difference at one end does not drag the whole liver.
 * - Refinement is point-to-plane (distance along the reference surface's normal): point-to-point
 *   pairs on two voxel staircases lock onto each other's steps and stall a few tenths of a degree
 *   short; measuring along the normal lets the surfaces slide into place.
 */

const MOVING_POINTS = 3000;
const TRIM_KEEP = 0.9;
const START_ITERATIONS = 12;
const MAX_ITERATIONS = 60;
const CONVERGED_MM = 1e-4;
const CONVERGED_RAD = 1e-7;

export interface SurfaceFit {
  transform: RigidTransform;
  /** RMS surface distance (along the reference normal) over the kept, trimmed, points after the fit, mm. */
  residualMm: number;
}

/** Rigid transform taking `moving` (this visit's liver) onto `fixed` (the reference liver). */
export function fitLiverSurfaces(moving: LiverShape, fixed: LiverShape): SurfaceFit {
  const grid = new PointGrid(fixed.surface, fixed.surfaceCount);
  const src = subsample(moving.surface, moving.surfaceCount, MOVING_POINTS);
  const work = new IcpBuffers(src.length / 3);

  let best: SurfaceFit | null = null;
  for (const start of startingTransforms(moving, fixed)) {
    const fit = icp(src, grid, fixed.surface, start, START_ITERATIONS, work);
    if (best === null || fit.residualMm < best.residualMm - 1e-9) best = fit;
  }
  if (best === null) throw new Error('no starting transform');
  const coarse = icp(src, grid, fixed.surface, best.transform, MAX_ITERATIONS, work);
  return refineAlongNormals(src, grid, fixed, coarse.transform, work);
}

/** Principal-axis rotations R = E_fixed·S·E_movingᵀ for the four sign patterns S with det +1, and the identity. */
function startingTransforms(moving: LiverShape, fixed: LiverShape): RigidTransform[] {
  const signs = [[1, 1, 1], [1, -1, -1], [-1, 1, -1], [-1, -1, 1]];
  const rotations: number[][] = signs.map(([a, b, c]) => {
    const s = [a, 0, 0, 0, b, 0, 0, 0, c];
    return mul3(mul3(fixed.axes, s), transpose3(moving.axes));
  });
  rotations.push([1, 0, 0, 0, 1, 0, 0, 0, 1]);
  return rotations.map((rotation) => {
    const c = applyRigid({ rotation, translation: [0, 0, 0] }, moving.centroid);
    return { rotation, translation: [fixed.centroid[0] - c[0], fixed.centroid[1] - c[1], fixed.centroid[2] - c[2]] };
  });
}

class IcpBuffers {
  /** Each source point moved by the transform being tried. */
  readonly moved: Float64Array;
  /** Index of the reference surface point nearest each moved point. */
  readonly nearest: Int32Array;
  readonly d2: Float64Array;
  readonly sorted: Float64Array;
  /** The kept pairs of a point-to-point step: source points and their partners. */
  readonly keptSrc: Float64Array;
  readonly kept: Float64Array;
  constructor(n: number) {
    this.moved = new Float64Array(3 * n);
    this.nearest = new Int32Array(n);
    this.d2 = new Float64Array(n);
    this.sorted = new Float64Array(n);
    this.keptSrc = new Float64Array(3 * n);
    this.kept = new Float64Array(3 * n);
  }
}

/** How many of n pairs the trimming keeps. */
const trimmedCount = (n: number) => Math.max(3, Math.floor(n * TRIM_KEEP));

/**
 * Moves every source point by `t` and pairs it with its nearest reference surface point (into
 * `w.moved`, `w.nearest`, `w.d2`). Returns the squared distance within which the kept share lies.
 */
function pairWithSurface(src: Float64Array, grid: PointGrid, t: RigidTransform, w: IcpBuffers): number {
  const n = src.length / 3;
  const r = t.rotation, p = t.translation;
  for (let s = 0; s < n; s++) {
    const x = src[3 * s], y = src[3 * s + 1], z = src[3 * s + 2];
    const px = r[0] * x + r[1] * y + r[2] * z + p[0];
    const py = r[3] * x + r[4] * y + r[5] * z + p[1];
    const pz = r[6] * x + r[7] * y + r[8] * z + p[2];
    w.nearest[s] = grid.nearest(px, py, pz);
    w.d2[s] = grid.lastDistance2;
    w.moved[3 * s] = px; w.moved[3 * s + 1] = py; w.moved[3 * s + 2] = pz;
  }
  w.sorted.set(w.d2);
  w.sorted.sort();
  return w.sorted[Math.min(n, trimmedCount(n)) - 1];
}

function icp(
  src: Float64Array, grid: PointGrid, target: Float64Array, start: RigidTransform, iterations: number, w: IcpBuffers,
): SurfaceFit {
  const n = src.length / 3;
  const keep = trimmedCount(n);
  let t = start;
  let previous = Infinity;
  let residual = Infinity;
  for (let it = 0; it <= iterations; it++) {
    const cut = pairWithSurface(src, grid, t, w);
    let m = 0, ss = 0;
    for (let s = 0; s < n && m < keep; s++) {
      if (w.d2[s] > cut) continue;
      ss += w.d2[s];
      const q = w.nearest[s];
      for (let c = 0; c < 3; c++) {
        w.keptSrc[3 * m + c] = src[3 * s + c];
        w.kept[3 * m + c] = target[3 * q + c];
      }
      m++;
    }
    residual = Math.sqrt(ss / m);
    if (it === iterations || previous - residual < CONVERGED_MM) break;
    previous = residual;
    t = fitRigidFlat(w.keptSrc, w.kept, m).transform;
  }
  return { transform: t, residualMm: residual };
}

/**
 * Point-to-plane ICP: each step solves the small-angle linearisation of
 * Σ ((R·p + t − q)·n)² over the kept pairs for a rotation vector ω and a translation, a 6×6
 * normal-equation system, then applies the exact rotation of ω.
 */
function refineAlongNormals(src: Float64Array, grid: PointGrid, fixed: LiverShape, start: RigidTransform, w: IcpBuffers): SurfaceFit {
  const n = src.length / 3;
  const target = fixed.surface, normals = fixed.normals;
  const ata = new Float64Array(36);
  const atb = new Float64Array(6);
  const row = new Float64Array(6);
  let t = start;
  for (let it = 0; it < MAX_ITERATIONS; it++) {
    const cut = pairWithSurface(src, grid, t, w);
    ata.fill(0);
    atb.fill(0);
    for (let s = 0; s < n; s++) {
      if (w.d2[s] > cut) continue;
      const q = w.nearest[s];
      const nx = normals[3 * q], ny = normals[3 * q + 1], nz = normals[3 * q + 2];
      const px = w.moved[3 * s], py = w.moved[3 * s + 1], pz = w.moved[3 * s + 2];
      row[0] = py * nz - pz * ny; row[1] = pz * nx - px * nz; row[2] = px * ny - py * nx;
      row[3] = nx; row[4] = ny; row[5] = nz;
      const b = -((px - target[3 * q]) * nx + (py - target[3 * q + 1]) * ny + (pz - target[3 * q + 2]) * nz);
      for (let a = 0; a < 6; a++) {
        atb[a] += row[a] * b;
        for (let c = 0; c < 6; c++) ata[a * 6 + c] += row[a] * row[c];
      }
    }
    const x = solve6(ata, atb);
    if (x === null) break;
    const inc = rotationOfVector(x[0], x[1], x[2]);
    t = {
      rotation: mul3(inc, t.rotation),
      translation: add(applyRigid({ rotation: inc, translation: [0, 0, 0] }, t.translation), [x[3], x[4], x[5]]),
    };
    if (Math.hypot(x[0], x[1], x[2]) < CONVERGED_RAD && Math.hypot(x[3], x[4], x[5]) < CONVERGED_MM) break;
  }
  return { transform: t, residualMm: trimmedResidual(src, grid, fixed, t, w) };
}

/**
 * RMS distance along the reference surface's normal for the kept share of points under `t`: the
 * surface mismatch itself, without the spacing between sampled surface points.
 */
function trimmedResidual(src: Float64Array, grid: PointGrid, fixed: LiverShape, t: RigidTransform, w: IcpBuffers): number {
  const n = src.length / 3;
  const target = fixed.surface, normals = fixed.normals;
  const cut = pairWithSurface(src, grid, t, w);
  let ss = 0, m = 0;
  for (let s = 0; s < n; s++) {
    if (w.d2[s] > cut) continue;
    const q = w.nearest[s];
    const along = (w.moved[3 * s] - target[3 * q]) * normals[3 * q] + (w.moved[3 * s + 1] - target[3 * q + 1]) * normals[3 * q + 1] +
      (w.moved[3 * s + 2] - target[3 * q + 2]) * normals[3 * q + 2];
    ss += along * along;
    m++;
  }
  return Math.sqrt(ss / m);
}

/** Gaussian elimination with partial pivoting; null when the system is singular (a degenerate surface). */
function solve6(a: Float64Array, b: Float64Array): number[] | null {
  const m = Array.from(a);
  const v = Array.from(b);
  for (let c = 0; c < 6; c++) {
    let piv = c;
    for (let r = c + 1; r < 6; r++) if (Math.abs(m[r * 6 + c]) > Math.abs(m[piv * 6 + c])) piv = r;
    if (Math.abs(m[piv * 6 + c]) < 1e-12) return null;
    if (piv !== c) {
      for (let k = 0; k < 6; k++) [m[c * 6 + k], m[piv * 6 + k]] = [m[piv * 6 + k], m[c * 6 + k]];
      [v[c], v[piv]] = [v[piv], v[c]];
    }
    for (let r = c + 1; r < 6; r++) {
      const f = m[r * 6 + c] / m[c * 6 + c];
      for (let k = c; k < 6; k++) m[r * 6 + k] -= f * m[c * 6 + k];
      v[r] -= f * v[c];
    }
  }
  const x = new Array<number>(6).fill(0);
  for (let r = 5; r >= 0; r--) {
    let s = v[r];
    for (let k = r + 1; k < 6; k++) s -= m[r * 6 + k] * x[k];
    x[r] = s / m[r * 6 + r];
  }
  return x;
}

/** Rotation of angle |ω| about ω (Rodrigues), row-major. */
function rotationOfVector(wx: number, wy: number, wz: number): number[] {
  const angle = Math.hypot(wx, wy, wz);
  if (angle === 0) return [1, 0, 0, 0, 1, 0, 0, 0, 1];
  const x = wx / angle, y = wy / angle, z = wz / angle;
  const c = Math.cos(angle), s = Math.sin(angle), C = 1 - c;
  return [
    c + x * x * C, x * y * C - z * s, x * z * C + y * s,
    y * x * C + z * s, c + y * y * C, y * z * C - x * s,
    z * x * C - y * s, z * y * C + x * s, c + z * z * C,
  ];
}

function add(a: readonly number[], b: readonly number[]): [number, number, number] {
  return [a[0] + b[0], a[1] + b[1], a[2] + b[2]];
}

/** Every k-th point so at most `max` remain, in stored order. */
function subsample(points: Float64Array, count: number, max: number): Float64Array {
  const stride = Math.max(1, Math.ceil(count / max));
  const kept = Math.ceil(count / stride);
  const out = new Float64Array(3 * kept);
  for (let n = 0, o = 0; n < count && o < kept; n += stride, o++) {
    out[3 * o] = points[3 * n];
    out[3 * o + 1] = points[3 * n + 1];
    out[3 * o + 2] = points[3 * n + 2];
  }
  return out;
}
