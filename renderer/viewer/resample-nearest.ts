import { multiply } from '../../src/geometry/mat4.js';
import type { Volume } from '../../src/volume/volume.js';

/** Same grid (dims and affine to a micrometre): values can be shown as they are. */
export function sameGrid(a: Volume, b: Volume): boolean {
  return a.dims.every((d, c) => d === b.dims[c]) && a.affine.every((x, k) => Math.abs(x - b.affine[k]) < 1e-3);
}

/**
 * Values of `src` (on the grid of `srcGrid`) at the nearest voxel to each voxel centre of `target`:
 * how lesion labels from a mask on its own grid are drawn over the scan. Three multiply-adds a voxel.
 */
export function resampleNearest<T extends Uint8Array | Uint16Array>(src: T, srcGrid: Volume, target: Volume): T {
  if (sameGrid(srcGrid, target)) return src;
  const [sx, sy, sz] = srcGrid.dims;
  const [nx, ny, nz] = target.dims;
  const T = multiply(srcGrid.inverse, target.affine);
  const out = (src instanceof Uint8Array ? new Uint8Array(nx * ny * nz) : new Uint16Array(nx * ny * nz)) as T;
  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      const a = T[1] * j + T[2] * k + T[3];
      const b = T[5] * j + T[6] * k + T[7];
      const c = T[9] * j + T[10] * k + T[11];
      const row = nx * (j + ny * k);
      for (let i = 0; i < nx; i++) {
        const si = Math.round(a + T[0] * i), sj = Math.round(b + T[4] * i), sk = Math.round(c + T[8] * i);
        if (si < 0 || sj < 0 || sk < 0 || si >= sx || sj >= sy || sk >= sz) continue;
        out[row + i] = src[si + sx * (sj + sy * sk)];
      }
    }
  }
  return out;
}
