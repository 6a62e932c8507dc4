import { transformPoint, type Mat4, type Vec3 } from '../geometry/mat4.js';
import { gridToGrid, sameGrid } from '../volume/resample.js';
import { axialAxis, voxelVolumeMl, type Volume } from '../volume/volume.js';
import type { LesionVoxels } from './components.js';
import type { Lesion } from './lesion.js';

/**
 * Measures of a lesion from a lesion mask (brief, "Measures"): centroid, volume, longest axial
 * diameter with its short axis, largest 3-D diameter and mean scan value. `scan` may lie on another
 * grid; each lesion voxel then reads the scan voxel nearest to its centre.
 */
export function measureMaskLesion(id: string, mask: Volume, lesion: LesionVoxels, scan: Volume | null): Lesion {
  const coords = voxelCoords(mask.dims, lesion.voxels);
  const count = lesion.voxels.length;
  let si = 0, sj = 0, sk = 0;
  for (let t = 0; t < count; t++) {
    si += coords[3 * t];
    sj += coords[3 * t + 1];
    sk += coords[3 * t + 2];
  }
  // The affine is linear, so the mean of the world centres is the image of the mean index.
  const centroidMm = transformPoint(mask.affine, [si / count, sj / count, sk / count]);
  const axial = longestAxial(mask, coords);
  return {
    id,
    source: 'mask',
    centroidMm,
    volumeMl: count * voxelVolumeMl(mask),
    longestAxialMm: axial.longestMm,
    shortAxisMm: axial.shortMm,
    longestAxialEndpointsMm: axial.endpointsMm,
    max3dMm: max3dDiameter(mask, lesion, coords),
    meanValue: scan ? meanScanValue(mask, lesion.voxels, coords, scan) : null,
    voxelCount: count,
  };
}

/** (i, j, k) of each voxel, interleaved. */
export function voxelCoords(dims: readonly [number, number, number], voxels: Uint32Array): Int32Array {
  const [nx, ny] = dims;
  const out = new Int32Array(voxels.length * 3);
  for (let t = 0; t < voxels.length; t++) {
    const n = voxels[t];
    const i = n % nx;
    const j = ((n - i) / nx) % ny;
    out[3 * t] = i;
    out[3 * t + 1] = j;
    out[3 * t + 2] = (n - i - nx * j) / (nx * ny);
  }
  return out;
}

interface AxialResult {
  longestMm: number;
  shortMm: number;
  endpointsMm: [Vec3, Vec3] | null;
}

/**
 * Longest distance between voxel centres within one axial slice, over all slices, and the slice's
 * extent perpendicular to it. Within a slice only the ends of each grid row can be hull vertices, so
 * the hull is built from at most two points per row, in integer grid coordinates (a linear map keeps
 * convexity). The diameter is the farthest pair of hull vertices, measured in mm through an
 * orthonormal frame of the slice plane, so anisotropic and oblique grids are exact.
 */
function longestAxial(mask: Volume, coords: Int32Array): AxialResult {
  const A = mask.affine;
  const { ax, a0, a1, alpha, beta, gamma } = axialFrame(A);

  const count = coords.length / 3;
  let cMin = Infinity, cMax = -Infinity, qMin = Infinity, qMax = -Infinity;
  for (let t = 0; t < count; t++) {
    const c = coords[3 * t + ax], q = coords[3 * t + a1];
    if (c < cMin) cMin = c;
    if (c > cMax) cMax = c;
    if (q < qMin) qMin = q;
    if (q > qMax) qMax = q;
  }
  // Counting sort of the voxels by slice.
  const slices = cMax - cMin + 1;
  const start = new Uint32Array(slices + 1);
  for (let t = 0; t < count; t++) start[coords[3 * t + ax] - cMin + 1]++;
  for (let s = 0; s < slices; s++) start[s + 1] += start[s];
  const bySlice = new Uint32Array(count);
  const fill = start.slice(0, slices);
  for (let t = 0; t < count; t++) bySlice[fill[coords[3 * t + ax] - cMin]++] = t;

  const rows = qMax - qMin + 1;
  const rowMin = new Int32Array(rows).fill(0x7fffffff);
  const rowMax = new Int32Array(rows).fill(-0x80000000);
  const pts = new Int32Array(rows * 4);
  const hull = new Int32Array(rows * 4 + 4);
  const hx = new Float64Array(rows * 2 + 2);
  const hy = new Float64Array(rows * 2 + 2);

  let best = -1, bestShort = 0;
  let bestSlice = 0, bestP1 = 0, bestQ1 = 0, bestP2 = 0, bestQ2 = 0;
  for (let s = 0; s < slices; s++) {
    if (start[s] === start[s + 1]) continue;
    let lo = rows, hi = -1;
    for (let u = start[s]; u < start[s + 1]; u++) {
      const t = bySlice[u];
      const p = coords[3 * t + a0], r = coords[3 * t + a1] - qMin;
      if (p < rowMin[r]) rowMin[r] = p;
      if (p > rowMax[r]) rowMax[r] = p;
      if (r < lo) lo = r;
      if (r > hi) hi = r;
    }
    // Points sorted by (q, p): the order Andrew's monotone chain needs.
    let np = 0;
    for (let r = lo; r <= hi; r++) {
      if (rowMax[r] < rowMin[r]) continue;
      pts[2 * np] = r;
      pts[2 * np + 1] = rowMin[r];
      np++;
      if (rowMax[r] !== rowMin[r]) {
        pts[2 * np] = r;
        pts[2 * np + 1] = rowMax[r];
        np++;
      }
      rowMin[r] = 0x7fffffff;
      rowMax[r] = -0x80000000;
    }
    const nh = convexHull(pts, np, hull);
    for (let h = 0; h < nh; h++) {
      const q = hull[2 * h] + qMin, p = hull[2 * h + 1];
      hx[h] = p * alpha + q * beta;
      hy[h] = q * gamma;
    }
    let sliceBest = -1, e1 = 0, e2 = 0;
    for (let a = 0; a < nh; a++) {
      for (let b = a + 1; b < nh; b++) {
        const d2 = (hx[a] - hx[b]) ** 2 + (hy[a] - hy[b]) ** 2;
        if (d2 > sliceBest) {
          sliceBest = d2;
          e1 = a;
          e2 = b;
        }
      }
    }
    if (nh === 1) sliceBest = 0;
    // Ties keep the first slice found, so the result does not depend on floating noise.
    if (sliceBest > best * (1 + 1e-12) + 1e-12) {
      best = sliceBest;
      bestSlice = s + cMin;
      bestP1 = hull[2 * e1 + 1];
      bestQ1 = hull[2 * e1] + qMin;
      bestP2 = hull[2 * e2 + 1];
      bestQ2 = hull[2 * e2] + qMin;
      bestShort = nh < 3 ? 0 : perpendicularWidth(hx, hy, nh, e1, e2);
    }
  }
  if (best < 0) return { longestMm: 0, shortMm: 0, endpointsMm: null };
  const toWorld = (p: number, q: number): Vec3 => {
    const ijk: [number, number, number] = [0, 0, 0];
    ijk[a0] = p;
    ijk[a1] = q;
    ijk[ax] = bestSlice;
    return transformPoint(A, ijk);
  };
  return { longestMm: Math.sqrt(best), shortMm: bestShort, endpointsMm: [toWorld(bestP1, bestQ1), toWorld(bestP2, bestQ2)] };
}

/**
 * The axial grid axis `ax`, the two in-plane grid axes `a0`, `a1`, and an orthonormal frame of the
 * slice plane: grid point (p, q) on axes (a0, a1) lies at (p·alpha + q·beta, q·gamma) mm, so in-plane
 * distances are exact on anisotropic and oblique grids.
 */
export function axialFrame(A: Mat4): { ax: number; a0: number; a1: number; alpha: number; beta: number; gamma: number } {
  const ax = axialAxis(A);
  const [a0, a1] = ax === 0 ? [1, 2] : ax === 1 ? [0, 2] : [0, 1];
  const col = (c: number) => [A[c], A[4 + c], A[8 + c]];
  const c0 = col(a0), c1 = col(a1);
  // u along axis a0, v perpendicular to it within the plane.
  const alpha = Math.hypot(c0[0], c0[1], c0[2]);
  const beta = (c0[0] * c1[0] + c0[1] * c1[1] + c0[2] * c1[2]) / alpha;
  const gamma = Math.sqrt(Math.max(0, c1[0] ** 2 + c1[1] ** 2 + c1[2] ** 2 - beta * beta));
  return { ax, a0, a1, alpha, beta, gamma };
}

/** Width of the hull across the direction from vertex e1 to vertex e2. */
function perpendicularWidth(hx: Float64Array, hy: Float64Array, nh: number, e1: number, e2: number): number {
  const dx = hx[e2] - hx[e1], dy = hy[e2] - hy[e1];
  const len = Math.hypot(dx, dy);
  if (len === 0) return 0;
  const nx = -dy / len, ny = dx / len;
  let lo = Infinity, hi = -Infinity;
  for (let h = 0; h < nh; h++) {
    const s = hx[h] * nx + hy[h] * ny;
    if (s < lo) lo = s;
    if (s > hi) hi = s;
  }
  return hi - lo;
}

/**
 * Andrew's monotone chain over integer points (x, y interleaved) already sorted by x then y. Writes
 * the hull's vertices (no collinear ones) to `out`; returns how many.
 */
function convexHull(pts: Int32Array, np: number, out: Int32Array): number {
  if (np <= 2) {
    out.set(pts.subarray(0, 2 * np));
    return np === 2 && pts[0] === pts[2] && pts[1] === pts[3] ? 1 : np;
  }
  const cross = (o: number, a: number, bx: number, by: number) =>
    (out[2 * a] - out[2 * o]) * (by - out[2 * o + 1]) - (out[2 * a + 1] - out[2 * o + 1]) * (bx - out[2 * o]);
  let h = 0;
  for (let n = 0; n < np; n++) {
    const x = pts[2 * n], y = pts[2 * n + 1];
    while (h >= 2 && cross(h - 2, h - 1, x, y) <= 0) h--;
    out[2 * h] = x;
    out[2 * h + 1] = y;
    h++;
  }
  const lower = h + 1;
  for (let n = np - 2; n >= 0; n--) {
    const x = pts[2 * n], y = pts[2 * n + 1];
    while (h >= lower && cross(h - 2, h - 1, x, y) <= 0) h--;
    out[2 * h] = x;
    out[2 * h + 1] = y;
    h++;
  }
  return h - 1;
}

/**
 * Largest distance between two voxel centres. The farthest pair are vertices of the convex hull, and
 * a voxel with lesion neighbours on both sides along any of the 13 neighbour directions lies between
 * them and cannot be a vertex; the few voxels left are compared pairwise.
 */
function max3dDiameter(mask: Volume, lesion: LesionVoxels, coords: Int32Array): number {
  const [nx, ny, nz] = mask.dims;
  const data = mask.data;
  const value = lesion.storedValue;
  const dirs: number[][] = [];
  for (let c = -1; c <= 1; c++) {
    for (let b = -1; b <= 1; b++) {
      for (let a = -1; a <= 1; a++) {
        if (c > 0 || (c === 0 && b > 0) || (c === 0 && b === 0 && a > 0)) dirs.push([a, b, c]);
      }
    }
  }
  const off = dirs.map(([a, b, c]) => a + nx * (b + ny * c));
  const member = (i: number, j: number, k: number) =>
    i >= 0 && j >= 0 && k >= 0 && i < nx && j < ny && k < nz && data[i + nx * (j + ny * k)] === value;
  const count = lesion.voxels.length;
  const keep: number[] = [];
  for (let t = 0; t < count; t++) {
    const n = lesion.voxels[t];
    const i = coords[3 * t], j = coords[3 * t + 1], k = coords[3 * t + 2];
    const inside = i > 0 && j > 0 && k > 0 && i < nx - 1 && j < ny - 1 && k < nz - 1;
    let between = false;
    for (let d = 0; d < 13 && !between; d++) {
      if (inside) between = data[n + off[d]] === value && data[n - off[d]] === value;
      else {
        const [a, b, c] = dirs[d];
        between = member(i + a, j + b, k + c) && member(i - a, j - b, k - c);
      }
    }
    if (!between) keep.push(t);
  }
  const m = keep.length;
  const w = new Float64Array(m * 3);
  const A: Mat4 = mask.affine;
  for (let u = 0; u < m; u++) {
    const t = keep[u];
    const i = coords[3 * t], j = coords[3 * t + 1], k = coords[3 * t + 2];
    w[3 * u] = A[0] * i + A[1] * j + A[2] * k;
    w[3 * u + 1] = A[4] * i + A[5] * j + A[6] * k;
    w[3 * u + 2] = A[8] * i + A[9] * j + A[10] * k;
  }
  let best = 0;
  for (let a = 0; a < m; a++) {
    const x = w[3 * a], y = w[3 * a + 1], z = w[3 * a + 2];
    for (let b = a + 1; b < m; b++) {
      const d2 = (w[3 * b] - x) ** 2 + (w[3 * b + 1] - y) ** 2 + (w[3 * b + 2] - z) ** 2;
      if (d2 > best) best = d2;
    }
  }
  return Math.sqrt(best);
}

/** Mean scaled scan value over the lesion's voxels that fall inside the scan; null when none do. */
function meanScanValue(mask: Volume, voxels: Uint32Array, coords: Int32Array, scan: Volume): number | null {
  const data = scan.data;
  let sum = 0;
  let inside = 0;
  if (sameGrid(mask, scan)) {
    for (let t = 0; t < voxels.length; t++) sum += data[voxels[t]];
    inside = voxels.length;
  } else {
    const M = gridToGrid(mask, scan);
    const [nx, ny, nz] = scan.dims;
    for (let t = 0; t < voxels.length; t++) {
      const i = coords[3 * t], j = coords[3 * t + 1], k = coords[3 * t + 2];
      const a = Math.round(M[0] * i + M[1] * j + M[2] * k + M[3]);
      const b = Math.round(M[4] * i + M[5] * j + M[6] * k + M[7]);
      const c = Math.round(M[8] * i + M[9] * j + M[10] * k + M[11]);
      if (a < 0 || b < 0 || c < 0 || a >= nx || b >= ny || c >= nz) continue;
      sum += data[a + nx * (b + ny * c)];
      inside++;
    }
  }
  return inside === 0 ? null : (sum / inside) * scan.slope + scan.inter;
}
