import { badInput } from '../errors.js';
import type { Vec3 } from '../geometry/mat4.js';
import { voxelIndexAtWorld, type Volume } from '../volume/volume.js';
import type { Box } from './box.js';

/** The scan's physical values (after scl_slope/scl_inter) as 32-bit floats, over the whole grid or a box. */
export function physicalValues(scan: Volume, box?: Box): Float32Array {
  const { data, slope, inter } = scan;
  if (!box) {
    const out = new Float32Array(data.length);
    for (let n = 0; n < data.length; n++) out[n] = data[n] * slope + inter;
    return out;
  }
  return cropValues(data, scan.dims, box, slope, inter);
}

/** Box-order copy of a grid array (values scaled by slope and inter). */
export function cropValues(data: ArrayLike<number>, dims: readonly number[], box: Box, slope = 1, inter = 0): Float32Array {
  const [nx, ny] = dims;
  const { i0, j0, k0, bx, by, bz } = box;
  const out = new Float32Array(bx * by * bz);
  let b = 0;
  for (let k = 0; k < bz; k++) {
    for (let j = 0; j < by; j++) {
      const row = i0 + nx * (j0 + j + ny * (k0 + k));
      for (let i = 0; i < bx; i++, b++) out[b] = data[row + i] * slope + inter;
    }
  }
  return out;
}

export interface SeedVoxel {
  ijk: [number, number, number];
  index: number;
}

/** Nearest voxels of world points; a point outside the grid is bad input. */
export function seedVoxels(scan: Volume, points: readonly Vec3[], what: string): SeedVoxel[] {
  const [nx, ny] = scan.dims;
  return points.map((p) => {
    if (!p.every(Number.isFinite)) throw badInput(what, 'needs three finite coordinates in mm');
    const index = voxelIndexAtWorld(scan, p);
    if (index < 0) throw badInput(what, `(${p.map((x) => x.toFixed(1)).join(', ')}) mm lies outside the scan`);
    const i = index % nx;
    const j = ((index - i) / nx) % ny;
    return { ijk: [i, j, (index - i - nx * j) / (nx * ny)], index };
  });
}
