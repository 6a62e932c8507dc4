import type { Mat4, Vec3 } from '../geometry/mat4.js';
import type { Box } from '../image/box.js';
import { squaredDistanceInBox } from '../image/distance.js';
import type { SegmentMap, SegmentName } from '../segments/segment-map.js';
import { sameGrid } from '../volume/resample.js';
import type { Volume } from '../volume/volume.js';
import type { LesionVoxels } from './components.js';
import { ORTHOGONAL_TOLERANCE, orthogonalColumns } from './grid.js';
import { nearestVoxelInBall } from './nearest-voxel.js';
import { PointTree } from './point-tree.js';
import { BACKGROUND, segmentLookup, segmentName, type SegmentIndex } from './segment-lookup.js';

export interface MarginResult {
  /** Distance in mm to the border surface of another segment (see maskLesionMargin); null: none within the search radius. */
  marginMm: number | null;
  nearestOtherSegment: SegmentName | null;
}

const NONE: MarginResult = { marginMm: null, nearestOtherSegment: null };

/**
 * The margin-alert rule, in one place: an alert when the margin is at or within the set margin
 * (≤), so a lesion touching or spanning a border alerts even at a set margin of 0. The default set
 * margin of 10 mm is a common surgical rule of thumb (common practice), settable per patient.
 */
export function isMarginAlert(marginMm: number | null, setMarginMm: number): boolean {
  return marginMm !== null && marginMm <= setMarginMm;
}

/**
 * Margin of a lesion from a mask whose voxels all lie in segment `own` or background (a lesion that
 * spans segments has margin 0 by definition; the caller decides that first), exact up to `capMm`.
 *
 * The margin is measured surface to surface: from the lesion's outer faces (each voxel fills its
 * cell) to the border surface, the faces of the other segment's voxels. Between a lesion voxel and
 * an other-segment voxel on one grid that is the centre offset less half a voxel at each end along
 * every axis crossed (floored at 0), with each axis's own spacing: a lesion voxel that shares a face
 * (or an edge or corner) with another segment's voxel is 0 mm from the border, so it alerts at any
 * set margin. Only a box around the lesion reaching `capMm` beyond it is read, so the cost follows
 * the lesion's size and the radius, not the scan's.
 *
 * On a shared grid with perpendicular axes this is a box-limited Euclidean distance transform; on
 * other grids, for very large boxes, or on request, a nearest-point search between the two voxel
 * sets' borders. Both give the same distance on one grid. On grids that are not parallel to each
 * other, the map's voxels are taken as their bounding boxes along the lesion grid's axes, which can
 * only bring the border nearer (by less than a map voxel), never hide an alert.
 */
export function maskLesionMargin(
  mask: Volume,
  lesion: LesionVoxels,
  map: SegmentMap,
  own: SegmentIndex,
  capMm: number,
  method: 'auto' | 'edt' | 'search' = 'auto',
): MarginResult {
  if (own === BACKGROUND || lesion.voxels.length === 0) return NONE;
  const edtFits = sameGrid(mask, map.labels) && orthogonalColumns(mask.affine);
  if (method === 'edt' && !edtFits) throw new Error('the distance-transform margin needs one grid with perpendicular axes');
  if (method === 'search' || !edtFits) return marginBySearch(mask, lesion, map, own, capMm);
  // A voxel within capMm of the lesion's faces is at most one voxel further from its centres.
  const box = lesionBox(mask.dims, lesion.voxels, mask.spacingMm.map((s) => Math.ceil(capMm / s) + 1));
  // The transform holds 8 bytes per box voxel; past this size the search, which holds only border
  // points, costs about the same time in a fraction of the memory.
  if (method === 'auto' && box.bx * box.by * box.bz > EDT_MAX_BOX_VOXELS) return marginBySearch(mask, lesion, map, own, capMm);
  return marginByDistanceTransform(mask, lesion, map, own, capMm, box);
}

const EDT_MAX_BOX_VOXELS = 1 << 21;

/**
 * Margin of a manual mark: distance from its centre to the border surface of another segment (the
 * nearest face of an other-segment voxel, as for a mask), less half its longest diameter, floored
 * at 0 (brief, "Measures", with the border surface as in maskLesionMargin).
 */
export function markMargin(map: SegmentMap, centreMm: Vec3, longestMm: number, own: SegmentIndex, capMm: number): MarginResult {
  if (own === BACKGROUND) return NONE;
  const seg = segmentLookup(map);
  const near = nearestVoxelInBall(map.labels, centreMm, capMm + longestMm / 2, (n) => {
    const s = seg(n);
    return s !== own && s !== BACKGROUND;
  }, 'box');
  if (!near) return NONE;
  return { marginMm: Math.max(0, near.distanceMm - longestMm / 2), nearestOtherSegment: segmentName(seg(near.index)) };
}

/** Index-space bounding box of the voxels, grown by `grow` voxels per axis and clipped to the grid. */
function lesionBox(dims: readonly [number, number, number], voxels: Uint32Array, grow: readonly number[]): Box {
  const [nx, ny, nz] = dims;
  let iMin = nx, iMax = -1, jMin = ny, jMax = -1;
  // Voxels are ascending, so the k range comes from the ends.
  const kMin = Math.floor(voxels[0] / (nx * ny));
  const kMax = Math.floor(voxels[voxels.length - 1] / (nx * ny));
  for (let t = 0; t < voxels.length; t++) {
    const n = voxels[t];
    const i = n % nx;
    const j = ((n - i) / nx) % ny;
    if (i < iMin) iMin = i;
    if (i > iMax) iMax = i;
    if (j < jMin) jMin = j;
    if (j > jMax) jMax = j;
  }
  const i0 = Math.max(0, iMin - grow[0]), i1 = Math.min(nx - 1, iMax + grow[0]);
  const j0 = Math.max(0, jMin - grow[1]), j1 = Math.min(ny - 1, jMax + grow[1]);
  const k0 = Math.max(0, kMin - grow[2]), k1 = Math.min(nz - 1, kMax + grow[2]);
  return { i0, j0, k0, bx: i1 - i0 + 1, by: j1 - j0 + 1, bz: k1 - k0 + 1 };
}

/**
 * Exact squared Euclidean distance transform of the lesion over a box, face to face (separable lower
 * envelope of parabolas, one pass per axis with that axis's spacing), then the smallest value over
 * the box's voxels of other segments.
 */
function marginByDistanceTransform(
  mask: Volume,
  lesion: LesionVoxels,
  map: SegmentMap,
  own: SegmentIndex,
  capMm: number,
  box: Box,
): MarginResult {
  const [nx, ny] = mask.dims;
  const sp = mask.spacingMm;
  const { i0, j0, k0, bx, by, bz } = box;
  const seg = segmentLookup(map);
  const isOther = (s: SegmentIndex) => s !== own && s !== BACKGROUND;

  let anyOther = false;
  for (let k = 0; k < bz && !anyOther; k++) {
    for (let j = 0; j < by && !anyOther; j++) {
      const row = i0 + nx * (j0 + j + ny * (k0 + k));
      for (let i = 0; i < bx; i++) {
        if (isOther(seg(row + i))) {
          anyOther = true;
          break;
        }
      }
    }
  }
  if (!anyOther) return NONE;

  const d2 = new Float64Array(bx * by * bz).fill(Infinity);
  for (let t = 0; t < lesion.voxels.length; t++) {
    const n = lesion.voxels[t];
    const i = n % nx;
    const j = ((n - i) / nx) % ny;
    const k = (n - i - nx * j) / (nx * ny);
    d2[i - i0 + bx * (j - j0 + by * (k - k0))] = 0;
  }
  squaredDistanceInBox(d2, box, sp, false, 'faces');

  let best = capMm * capMm * (1 + 1e-12);
  let bestSeg: SegmentIndex = BACKGROUND;
  for (let k = 0; k < bz; k++) {
    for (let j = 0; j < by; j++) {
      const row = i0 + nx * (j0 + j + ny * (k0 + k));
      const b = bx * (j + by * k);
      for (let i = 0; i < bx; i++) {
        const d = d2[b + i];
        if (d < best) {
          const s = seg(row + i);
          if (isOther(s)) {
            best = d;
            bestSeg = s;
          }
        }
      }
    }
  }
  return bestSeg === BACKGROUND ? NONE : { marginMm: Math.sqrt(best), nearestOtherSegment: segmentName(bestSeg) };
}

/**
 * Nearest pair between the lesion's voxels and the other segments' voxels, face to face, for grids
 * that differ. Distances are taken in the lesion grid's own frame (its unit axes; world axes when
 * they are skewed), where each lesion voxel is a box of half its spacing per axis and each map voxel
 * the bounding box of its cell; the gap between two boxes is each axis offset less the two half-widths,
 * floored at 0. Where a grid's axes are perpendicular (and, for the map, parallel to the frame) a
 * voxel set's gap to anything outside it is reached from its face border, so interior voxels of
 * either set are dropped. A map voxel centre inside a lesion voxel's cell is 0 mm away.
 */
function marginBySearch(mask: Volume, lesion: LesionVoxels, map: SegmentMap, own: SegmentIndex, capMm: number): MarginResult {
  const labels = map.labels;
  const maskOrthogonal = orthogonalColumns(mask.affine);
  const R = maskOrthogonal ? unitColumns(mask.affine) : IDENTITY;
  const lesionHalf = halfWidthsIn(mask.affine, R);
  const mapHalf = halfWidthsIn(labels.affine, R);
  const slack = [0, 1, 2].map((r) => lesionHalf[r] + mapHalf[r]);
  const tree = new PointTree(lesionBorderPoints(mask, lesion, R));
  const [mx, my, mz] = labels.dims;
  const seg = segmentLookup(map);
  const isOther = (s: SegmentIndex) => s !== own && s !== BACKGROUND;
  const mapBox = worldBoxOnGrid(mask, lesion.voxels, labels, capMm + Math.hypot(slack[0], slack[1], slack[2]));
  const mapExact = orthogonalColumns(labels.affine) && parallelToFrame(labels.affine, R);
  const [nx, ny, nz] = mask.dims;
  const Mi = mask.inverse;
  const A = labels.affine;

  let best = capMm * capMm * (1 + 1e-12);
  let bestSeg: SegmentIndex = BACKGROUND;
  const borderOfOthers = (a: number, b: number, c: number, n: number) => {
    if (!mapExact) return true;
    if (a === 0 || b === 0 || c === 0 || a === mx - 1 || b === my - 1 || c === mz - 1) return true;
    return !isOther(seg(n - 1)) || !isOther(seg(n + 1)) || !isOther(seg(n - mx)) || !isOther(seg(n + mx)) ||
      !isOther(seg(n - mx * my)) || !isOther(seg(n + mx * my));
  };
  for (let c = mapBox.k0; c < mapBox.k0 + mapBox.bz && best > 0; c++) {
    for (let b = mapBox.j0; b < mapBox.j0 + mapBox.by; b++) {
      for (let a = mapBox.i0; a < mapBox.i0 + mapBox.bx; a++) {
        const n = a + mx * (b + my * c);
        const s = seg(n);
        if (!isOther(s) || !borderOfOthers(a, b, c, n)) continue;
        const x = A[0] * a + A[1] * b + A[2] * c + A[3];
        const y = A[4] * a + A[5] * b + A[6] * c + A[7];
        const z = A[8] * a + A[9] * b + A[10] * c + A[11];
        if (maskOrthogonal) {
          const i = Math.round(Mi[0] * x + Mi[1] * y + Mi[2] * z + Mi[3]);
          const j = Math.round(Mi[4] * x + Mi[5] * y + Mi[6] * z + Mi[7]);
          const k = Math.round(Mi[8] * x + Mi[9] * y + Mi[10] * z + Mi[11]);
          if (i >= 0 && j >= 0 && k >= 0 && i < nx && j < ny && k < nz && contains(lesion.voxels, i + nx * (j + ny * k))) {
            best = 0;
            bestSeg = s;
            break;
          }
        }
        const hit = tree.nearest(R[0] * x + R[1] * y + R[2] * z, R[3] * x + R[4] * y + R[5] * z, R[6] * x + R[7] * y + R[8] * z, best, slack);
        if (hit.index >= 0) {
          best = hit.d2;
          bestSeg = s;
        }
      }
      if (best === 0) break;
    }
  }
  if (bestSeg === BACKGROUND) return NONE;
  // World coordinates carry rounding (about 1e-15 mm); faces that meet must read 0, which alerts at 0.
  const mm = Math.sqrt(best);
  return { marginMm: mm < FACE_TOLERANCE_MM ? 0 : mm, nearestOtherSegment: segmentName(bestSeg) };
}

const FACE_TOLERANCE_MM = 1e-9;

/** A frame as a row-major 3×3 rotation: row r is frame axis r in world coordinates. */
type Frame = readonly number[];
const IDENTITY: Frame = [1, 0, 0, 0, 1, 0, 0, 0, 1];

/** The grid's unit axes as a frame (for perpendicular axes). */
function unitColumns(affine: Mat4): Frame {
  const out: number[] = [];
  for (let c = 0; c < 3; c++) {
    const len = Math.hypot(affine[c], affine[4 + c], affine[8 + c]);
    out.push(affine[c] / len, affine[4 + c] / len, affine[8 + c] / len);
  }
  return out;
}

/** Half-widths along each frame axis of the bounding box of one voxel's cell of the grid. */
function halfWidthsIn(affine: Mat4, R: Frame): number[] {
  return [0, 1, 2].map((r) => {
    let h = 0;
    for (let c = 0; c < 3; c++) h += Math.abs(R[3 * r] * affine[c] + R[3 * r + 1] * affine[4 + c] + R[3 * r + 2] * affine[8 + c]);
    return h / 2;
  });
}

/** True when every grid axis lies along one frame axis (the cells are boxes in the frame). */
function parallelToFrame(affine: Mat4, R: Frame): boolean {
  for (let c = 0; c < 3; c++) {
    const len = Math.hypot(affine[c], affine[4 + c], affine[8 + c]);
    let along = 0;
    for (let r = 0; r < 3; r++) {
      if (Math.abs(R[3 * r] * affine[c] + R[3 * r + 1] * affine[4 + c] + R[3 * r + 2] * affine[8 + c]) > ORTHOGONAL_TOLERANCE * len) along++;
    }
    if (along !== 1) return false;
  }
  return true;
}

/** Centres, in the frame, of the lesion's voxels that have a face neighbour outside it (all voxels on a skewed grid). */
function lesionBorderPoints(mask: Volume, lesion: LesionVoxels, R: Frame): Float64Array {
  const [nx, ny, nz] = mask.dims;
  const data = mask.data;
  const value = lesion.storedValue;
  const all = !orthogonalColumns(mask.affine);
  const A = mask.affine;
  const out: number[] = [];
  for (let t = 0; t < lesion.voxels.length; t++) {
    const n = lesion.voxels[t];
    const i = n % nx;
    const j = ((n - i) / nx) % ny;
    const k = (n - i - nx * j) / (nx * ny);
    // A face neighbour with the lesion's value is part of this lesion (26-connected or same label).
    const border = all || i === 0 || j === 0 || k === 0 || i === nx - 1 || j === ny - 1 || k === nz - 1 ||
      data[n - 1] !== value || data[n + 1] !== value || data[n - nx] !== value || data[n + nx] !== value ||
      data[n - nx * ny] !== value || data[n + nx * ny] !== value;
    if (!border) continue;
    const x = A[0] * i + A[1] * j + A[2] * k + A[3], y = A[4] * i + A[5] * j + A[6] * k + A[7], z = A[8] * i + A[9] * j + A[10] * k + A[11];
    out.push(R[0] * x + R[1] * y + R[2] * z, R[3] * x + R[4] * y + R[5] * z, R[6] * x + R[7] * y + R[8] * z);
  }
  return Float64Array.from(out);
}

/**
 * Box on `grid` holding every point within `mm` of the voxels' centres: the world bounding box of the
 * voxels' index box, grown by `mm`, mapped to `grid` indices and clipped.
 */
function worldBoxOnGrid(mask: Volume, voxels: Uint32Array, grid: Volume, mm: number): Box {
  const b = lesionBox(mask.dims, voxels, [0, 0, 0]);
  const lo = [Infinity, Infinity, Infinity], hi = [-Infinity, -Infinity, -Infinity];
  const A = mask.affine;
  for (const i of [b.i0, b.i0 + b.bx - 1]) {
    for (const j of [b.j0, b.j0 + b.by - 1]) {
      for (const k of [b.k0, b.k0 + b.bz - 1]) {
        for (let r = 0; r < 3; r++) {
          const w = A[4 * r] * i + A[4 * r + 1] * j + A[4 * r + 2] * k + A[4 * r + 3];
          lo[r] = Math.min(lo[r], w - mm);
          hi[r] = Math.max(hi[r], w + mm);
        }
      }
    }
  }
  const glo = [Infinity, Infinity, Infinity], ghi = [-Infinity, -Infinity, -Infinity];
  const G = grid.inverse;
  for (const x of [lo[0], hi[0]]) {
    for (const y of [lo[1], hi[1]]) {
      for (const z of [lo[2], hi[2]]) {
        for (let r = 0; r < 3; r++) {
          const u = G[4 * r] * x + G[4 * r + 1] * y + G[4 * r + 2] * z + G[4 * r + 3];
          glo[r] = Math.min(glo[r], u);
          ghi[r] = Math.max(ghi[r], u);
        }
      }
    }
  }
  const [gx, gy, gz] = grid.dims;
  const i0 = Math.max(0, Math.ceil(glo[0])), i1 = Math.min(gx - 1, Math.floor(ghi[0]));
  const j0 = Math.max(0, Math.ceil(glo[1])), j1 = Math.min(gy - 1, Math.floor(ghi[1]));
  const k0 = Math.max(0, Math.ceil(glo[2])), k1 = Math.min(gz - 1, Math.floor(ghi[2]));
  return { i0, j0, k0, bx: Math.max(0, i1 - i0 + 1), by: Math.max(0, j1 - j0 + 1), bz: Math.max(0, k1 - k0 + 1) };
}

/** Binary search in an ascending list. */
function contains(sorted: Uint32Array, x: number): boolean {
  let lo = 0, hi = sorted.length - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    const v = sorted[mid];
    if (v === x) return true;
    if (v < x) lo = mid + 1;
    else hi = mid - 1;
  }
  return false;
}
