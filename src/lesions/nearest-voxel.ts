import type { Vec3 } from '../geometry/mat4.js';
import type { Volume } from '../volume/volume.js';
import { ballHalfWidths, orthogonalColumns } from './grid.js';

/**
 * The voxel of `v` nearest to world point `p`, within `radiusMm`, among voxels `accept` takes (given
 * the linear index). `to` says what is measured: the voxel's centre, or its box (the cell it fills:
 * 0 inside it). On a grid with skewed axes a voxel's box is taken as its world bounding box, which
 * is never farther than the cell. Scans only the grid box that holds the ball. Ties keep the first
 * voxel in storage order. Returns the linear index and the distance in mm, or null.
 */
export function nearestVoxelInBall(
  v: Volume,
  p: Vec3,
  radiusMm: number,
  accept: (n: number) => boolean,
  to: 'centre' | 'box' = 'centre',
): { index: number; distanceMm: number } | null {
  const [nx, ny, nz] = v.dims;
  const inv = v.inverse;
  const A = v.affine;
  const boxHalf = [0, 1, 2].map((r) => 0.5 * (Math.abs(A[4 * r]) + Math.abs(A[4 * r + 1]) + Math.abs(A[4 * r + 2])));
  const h = ballHalfWidths(v, radiusMm + (to === 'box' ? Math.hypot(boxHalf[0], boxHalf[1], boxHalf[2]) : 0));
  const u = [0, 1, 2].map((r) => inv[r * 4] * p[0] + inv[r * 4 + 1] * p[1] + inv[r * 4 + 2] * p[2] + inv[r * 4 + 3]);
  const i0 = Math.max(0, Math.ceil(u[0] - h[0])), i1 = Math.min(nx - 1, Math.floor(u[0] + h[0]));
  const j0 = Math.max(0, Math.ceil(u[1] - h[1])), j1 = Math.min(ny - 1, Math.floor(u[1] + h[1]));
  const k0 = Math.max(0, Math.ceil(u[2] - h[2])), k1 = Math.min(nz - 1, Math.floor(u[2] + h[2]));
  let best = radiusMm * radiusMm * (1 + 1e-12);
  let bestIndex = -1;
  if (to === 'box') {
    // Perpendicular axes: per-axis gaps in the grid's own frame, half a voxel off each centre offset.
    const ortho = orthogonalColumns(A);
    const sp = v.spacingMm;
    for (let k = k0; k <= k1; k++) {
      for (let j = j0; j <= j1; j++) {
        const row = nx * (j + ny * k);
        for (let i = i0; i <= i1; i++) {
          let d2: number;
          if (ortho) {
            const gi = Math.max(0, Math.abs(u[0] - i) - 0.5) * sp[0];
            const gj = Math.max(0, Math.abs(u[1] - j) - 0.5) * sp[1];
            const gk = Math.max(0, Math.abs(u[2] - k) - 0.5) * sp[2];
            d2 = gi * gi + gj * gj + gk * gk;
          } else {
            d2 = 0;
            for (let r = 0; r < 3; r++) {
              const g = Math.max(0, Math.abs(A[4 * r] * i + A[4 * r + 1] * j + A[4 * r + 2] * k + A[4 * r + 3] - p[r]) - boxHalf[r]);
              d2 += g * g;
            }
          }
          if (d2 < best && accept(row + i)) {
            best = d2;
            bestIndex = row + i;
          }
        }
      }
    }
    return bestIndex < 0 ? null : { index: bestIndex, distanceMm: Math.sqrt(best) };
  }
  for (let k = k0; k <= k1; k++) {
    for (let j = j0; j <= j1; j++) {
      // World position of (i0, j, k) minus p; each step in i adds column 0.
      let x = A[0] * i0 + A[1] * j + A[2] * k + A[3] - p[0];
      let y = A[4] * i0 + A[5] * j + A[6] * k + A[7] - p[1];
      let z = A[8] * i0 + A[9] * j + A[10] * k + A[11] - p[2];
      const row = nx * (j + ny * k);
      for (let i = i0; i <= i1; i++) {
        const d2 = x * x + y * y + z * z;
        if (d2 < best && accept(row + i)) {
          best = d2;
          bestIndex = row + i;
        }
        x += A[0];
        y += A[4];
        z += A[8];
      }
    }
  }
  return bestIndex < 0 ? null : { index: bestIndex, distanceMm: Math.sqrt(best) };
}
