import { growBox, maskBox, voxelsForMm, type Box, type Dims } from './box.js';
import { setIndicator, squaredDistanceInBox } from './distance.js';

/**
 * Binary morphology with a ball of `radiusMm` in world mm, anisotropic voxels honoured: the
 * structuring element is every voxel offset d with |d|² ≤ r² (d scaled by the spacings), the same
 * element scipy.ndimage takes as a boolean array. Dilation and erosion are read off an exact
 * Euclidean distance transform, so the cost does not grow with the radius. As in scipy.ndimage with
 * its default border_value=0, voxels beyond the grid are background. Masks are 0/1 bytes, i fastest,
 * on a grid with perpendicular axes (oblique but orthogonal grids are fine; the spacings are the
 * column lengths of the affine).
 */

/** Squared radius with a relative slack so offsets exactly on the sphere count despite rounding. */
export function ballRadius2(radiusMm: number): number {
  return radiusMm * radiusMm * (1 + 1e-6);
}

export function dilate(mask: Uint8Array, dims: Dims, spacingMm: readonly number[], radiusMm: number): Uint8Array {
  const out = new Uint8Array(mask.length);
  const found = maskBox(mask, dims);
  if (!found) return out;
  const box = growBox(found, voxelsForMm(spacingMm, radiusMm), dims);
  const d2 = setIndicator(mask, dims, box, true);
  squaredDistanceInBox(d2, box, spacingMm);
  writeThreshold(out, dims, box, d2, ballRadius2(radiusMm), true);
  return out;
}

export function erode(mask: Uint8Array, dims: Dims, spacingMm: readonly number[], radiusMm: number): Uint8Array {
  const out = new Uint8Array(mask.length);
  const found = maskBox(mask, dims);
  if (!found) return out;
  // One voxel of background around the box makes everything beyond it background, as it is.
  const box = growBox(found, [1, 1, 1], dims);
  const d2 = setIndicator(mask, dims, box, false);
  squaredDistanceInBox(d2, box, spacingMm, true);
  writeThreshold(out, dims, box, d2, ballRadius2(radiusMm), false);
  return out;
}

export function open(mask: Uint8Array, dims: Dims, spacingMm: readonly number[], radiusMm: number): Uint8Array {
  return dilate(erode(mask, dims, spacingMm, radiusMm), dims, spacingMm, radiusMm);
}

export function close(mask: Uint8Array, dims: Dims, spacingMm: readonly number[], radiusMm: number): Uint8Array {
  return erode(dilate(mask, dims, spacingMm, radiusMm), dims, spacingMm, radiusMm);
}

/** Sets out=1 where d2 ≤ r2 (`within`) or d2 > r2 (not `within`) over the box. */
function writeThreshold(out: Uint8Array, dims: Dims, box: Box, d2: Float32Array, r2: number, within: boolean): void {
  const [nx, ny] = dims;
  const { i0, j0, k0, bx, by, bz } = box;
  let b = 0;
  for (let k = 0; k < bz; k++) {
    for (let j = 0; j < by; j++) {
      const row = i0 + nx * (j0 + j + ny * (k0 + k));
      for (let i = 0; i < bx; i++, b++) out[row + i] = (d2[b] <= r2) === within ? 1 : 0;
    }
  }
}

/**
 * Fills holes: background not 6-connected to the grid's border becomes foreground (as
 * scipy.ndimage.binary_fill_holes with its default structure). Only the mask's box, one voxel
 * wider, is searched: beyond it all background reaches the border.
 */
export function fillHoles(mask: Uint8Array, dims: Dims): Uint8Array {
  const out = Uint8Array.from(mask);
  const found = maskBox(mask, dims);
  if (!found) return out;
  const box = growBox(found, [1, 1, 1], dims);
  const [nx, ny] = dims;
  const { i0, j0, k0, bx, by, bz } = box;
  // reached: 1 for background connected to the box's faces (which are background or the grid's edge).
  const reached = new Uint8Array(bx * by * bz);
  const stack = new GrowingStack();
  const at = (i: number, j: number, k: number) => i0 + i + nx * (j0 + j + ny * (k0 + k));
  for (let k = 0; k < bz; k++) {
    for (let j = 0; j < by; j++) {
      for (let i = 0; i < bx; i++) {
        if (i !== 0 && j !== 0 && k !== 0 && i !== bx - 1 && j !== by - 1 && k !== bz - 1) continue;
        const b = i + bx * (j + by * k);
        if (mask[at(i, j, k)] === 0 && reached[b] === 0) {
          reached[b] = 1;
          stack.push(b);
        }
      }
    }
  }
  const sy = bx, sz = bx * by;
  while (stack.size > 0) {
    const b = stack.pop();
    const i = b % bx;
    const t = (b - i) / bx;
    const j = t % by;
    const k = (t - j) / by;
    const n = at(i, j, k);
    if (i > 0 && reached[b - 1] === 0 && mask[n - 1] === 0) { reached[b - 1] = 1; stack.push(b - 1); }
    if (i < bx - 1 && reached[b + 1] === 0 && mask[n + 1] === 0) { reached[b + 1] = 1; stack.push(b + 1); }
    if (j > 0 && reached[b - sy] === 0 && mask[n - nx] === 0) { reached[b - sy] = 1; stack.push(b - sy); }
    if (j < by - 1 && reached[b + sy] === 0 && mask[n + nx] === 0) { reached[b + sy] = 1; stack.push(b + sy); }
    if (k > 0 && reached[b - sz] === 0 && mask[n - nx * ny] === 0) { reached[b - sz] = 1; stack.push(b - sz); }
    if (k < bz - 1 && reached[b + sz] === 0 && mask[n + nx * ny] === 0) { reached[b + sz] = 1; stack.push(b + sz); }
  }
  let b = 0;
  for (let k = 0; k < bz; k++) {
    for (let j = 0; j < by; j++) {
      const row = at(0, j, k);
      for (let i = 0; i < bx; i++, b++) if (reached[b] === 0) out[row + i] = 1;
    }
  }
  return out;
}

/** A stack of voxel indices that grows by doubling, so a flood holds only what it has queued. */
export class GrowingStack {
  private data = new Int32Array(1 << 16);
  size = 0;
  push(n: number): void {
    if (this.size === this.data.length) {
      const bigger = new Int32Array(this.data.length * 2);
      bigger.set(this.data);
      this.data = bigger;
    }
    this.data[this.size++] = n;
  }
  pop(): number {
    return this.data[--this.size];
  }
}

/**
 * Cuts thin bridges from the seeds' region: an opening of `radiusMm` breaks every neck narrower than
 * the ball, the seeds' component of what is left is kept, and a dilation of it by the same ball,
 * taken inside the original mask, gives back the region's own edges and tips that the opening
 * shaved off (a bridge comes back only as a stub no longer than the radius).
 */
export function cutThinBridges(
  mask: Uint8Array,
  dims: Dims,
  spacingMm: readonly number[],
  radiusMm: number,
  keepComponent: (opened: Uint8Array) => Uint8Array,
): Uint8Array {
  const kept = keepComponent(open(mask, dims, spacingMm, radiusMm));
  const back = dilate(kept, dims, spacingMm, radiusMm);
  for (let n = 0; n < back.length; n++) back[n] &= mask[n];
  return back;
}
