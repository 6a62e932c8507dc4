import type { Mat4, Vec3 } from '../geometry/mat4.js';
import { dot, norm } from '../geometry/vec3.js';
import type { Volume } from '../volume/volume.js';

/**
 * True when the grid axes are perpendicular in world space. Only then is a voxel's box its Voronoi
 * cell and a separable distance transform exact. NIfTI keeps the sform in float32, so axes written
 * perpendicular come back off by about 1e-7 of their length: the test allows 1e-6, where the
 * distances it then treats as exact are off by far less than a micrometre.
 */
export function orthogonalColumns(affine: Mat4): boolean {
  const col = (c: number): Vec3 => [affine[c], affine[4 + c], affine[8 + c]];
  const cols = [col(0), col(1), col(2)];
  for (const [a, b] of [[0, 1], [0, 2], [1, 2]]) {
    if (Math.abs(dot(cols[a], cols[b])) > ORTHOGONAL_TOLERANCE * norm(cols[a]) * norm(cols[b])) return false;
  }
  return true;
}

/**
 * Half-widths in voxels, per grid axis, of the smallest grid-aligned box that holds a world ball of
 * `mm` radius: along axis i a ball spans ±mm·|row i of the inverse|.
 */
export function ballHalfWidths(v: Volume, mm: number): [number, number, number] {
  const m = v.inverse;
  return [0, 1, 2].map((r) => mm * Math.hypot(m[r * 4], m[r * 4 + 1], m[r * 4 + 2])) as [number, number, number];
}

/** Relative tolerance for perpendicular or parallel grid axes (float32 affines). */
export const ORTHOGONAL_TOLERANCE = 1e-6;
