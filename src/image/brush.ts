import type { Vec3 } from '../geometry/mat4.js';
import { ballHalfWidths } from '../lesions/grid.js';
import type { Volume, VoxelArray } from '../volume/volume.js';

/**
 * A spherical brush dab on a mask: every voxel whose centre lies within `radiusMm` of the world point
 * gets the stored value `value` (0 erases). Works on the mask's own grid through world mm, so a dab
 * placed on any plane of the viewer is the same ball. Returns a new data array and how many voxels
 * changed; the mask itself is left as it was (the caller keeps it for undo).
 */
export function paintBall(mask: Volume, centreMm: Vec3, radiusMm: number, value: number): { data: VoxelArray; changed: number } {
  return paintBalls(mask, [centreMm], radiusMm, value);
}

/** Dabs along a stroke are at most this share of the radius apart (see `strokeDabs`). */
export const DAB_SPACING = 0.5;

/**
 * The dab centres of a dragged stroke: the pointer's points joined by straight pieces, each cut into
 * steps of at most `DAB_SPACING` × radius, so a fast drag (few pointer events far apart) still leaves
 * no gap. Balls of radius r with centres s apart along a line cover the whole capsule of radius
 * √(r² − s²/4) around it: with s = r/2 that is 0.968 r.
 */
export function strokeDabs(pathMm: readonly Vec3[], radiusMm: number): Vec3[] {
  if (pathMm.length === 0) return [];
  const step = DAB_SPACING * radiusMm;
  const out: Vec3[] = [pathMm[0]];
  for (let n = 1; n < pathMm.length; n++) {
    const a = pathMm[n - 1], b = pathMm[n];
    const length = Math.hypot(b[0] - a[0], b[1] - a[1], b[2] - a[2]);
    const pieces = Math.ceil(length / step);
    for (let k = 1; k <= pieces; k++) {
      const t = k / pieces;
      out.push([a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1]), a[2] + t * (b[2] - a[2])]);
    }
  }
  return out;
}

/** Several dabs (a stroke) painted on one copy of the mask: one change, one undo step. */
export function paintBalls(mask: Volume, centresMm: readonly Vec3[], radiusMm: number, value: number): { data: VoxelArray; changed: number } {
  const data = mask.data.slice() as VoxelArray;
  let changed = 0;
  for (const c of centresMm) changed += dab(mask, data, c, radiusMm, value);
  return { data, changed };
}

function dab(mask: Volume, data: VoxelArray, centreMm: Vec3, radiusMm: number, value: number): number {
  const [nx, ny, nz] = mask.dims;
  const m = mask.inverse;
  const A = mask.affine;
  const c = [0, 1, 2].map((r) => m[4 * r] * centreMm[0] + m[4 * r + 1] * centreMm[1] + m[4 * r + 2] * centreMm[2] + m[4 * r + 3]);
  const half = ballHalfWidths(mask, radiusMm);
  const lo = c.map((x, a) => Math.max(0, Math.ceil(x - half[a])));
  const hi = c.map((x, a) => Math.min([nx, ny, nz][a] - 1, Math.floor(x + half[a])));
  const r2 = radiusMm * radiusMm;
  let changed = 0;
  for (let k = lo[2]; k <= hi[2]; k++) {
    for (let j = lo[1]; j <= hi[1]; j++) {
      for (let i = lo[0]; i <= hi[0]; i++) {
        const dx = A[0] * i + A[1] * j + A[2] * k + A[3] - centreMm[0];
        const dy = A[4] * i + A[5] * j + A[6] * k + A[7] - centreMm[1];
        const dz = A[8] * i + A[9] * j + A[10] * k + A[11] - centreMm[2];
        if (dx * dx + dy * dy + dz * dz > r2) continue;
        const n = i + nx * (j + ny * k);
        if (data[n] !== value) {
          data[n] = value;
          changed++;
        }
      }
    }
  }
  return changed;
}
