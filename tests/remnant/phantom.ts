// A box liver cut into eight labelled blocks, on an axis-aligned 2 mm grid with the origin at world
// (0, 0, 0), so voxel (i, j, k) has its centre at (2i, 2j, 2k) mm and every count can be done by hand.
import { defaultScheme } from '../../src/segments/scheme.js';
import type { SegmentMap } from '../../src/segments/segment-map.js';
import { makeVolume } from '../../src/volume/volume.js';

export const MAP_DIMS = [44, 34, 24] as const;
/** Liver voxels: i 2..41, j 2..31, k 2..21 (a 2-voxel background rim); blocks split at i 22, j 17, k 12. */
export const SPLIT = [22, 17, 12] as const;
/** Each block is 20 × 15 × 10 = 3000 voxels of 8 mm³: 24 mL; the liver 8 × 24 = 192 mL. */
export const BLOCK_ML = 24;

/**
 * Label = 1 + [i ≥ 22] + 2·[j ≥ 17] + 4·[k ≥ 12], the default scheme's I…VIII. With `splitIV`,
 * the lower slices (k 2..7) of the IV block take 9 (IVb: 6 × 20 × 15 = 1800 voxels, 14.4 mL) and the
 * rest stays 4 (IVa: 1200 voxels, 9.6 mL).
 */
export function blockMap(splitIV = false): SegmentMap {
  const [nx, ny, nz] = MAP_DIMS;
  const data = new Uint8Array(nx * ny * nz);
  let n = 0;
  for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++, n++) {
    if (i < 2 || j < 2 || k < 2 || i >= nx - 2 || j >= ny - 2 || k >= nz - 2) continue;
    const label = 1 + (i >= SPLIT[0] ? 1 : 0) + (j >= SPLIT[1] ? 2 : 0) + (k >= SPLIT[2] ? 4 : 0);
    data[n] = splitIV && label === 4 && k < 8 ? 9 : label;
  }
  const affine = [2, 0, 0, 0, 0, 2, 0, 0, 0, 0, 2, 0, 0, 0, 0, 1];
  return { labels: makeVolume(MAP_DIMS, data, affine, 'uint8'), scheme: defaultScheme(splitIV) };
}
