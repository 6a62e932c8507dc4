import type { Box, Dims } from './box.js';

/**
 * Exact squared Euclidean distance transform on a box of a grid with perpendicular axes: separable
 * lower envelopes of parabolas (Felzenszwalb and Huttenlocher), one pass per axis with that axis's
 * spacing. The lesion margin and the mm-ball morphology both use it.
 */

/** Work buffers for passes over lines of up to `longest` samples (two extra for the grid's edges). */
export interface EnvelopeBuffers {
  f: Float64Array;
  out: Float64Array;
  v: Int32Array;
  z: Float64Array;
}

export function envelopeBuffers(longest: number): EnvelopeBuffers {
  return { f: new Float64Array(longest + 2), out: new Float64Array(longest + 2), v: new Int32Array(longest + 2), z: new Float64Array(longest + 3) };
}

/**
 * One pass along one box axis: `lines` lines of `n` samples `step` apart, line l starting at
 * base + l·lineStep. With `edgesZero` a virtual sample of value 0 sits one step beyond each end
 * (the world outside the grid counts as part of the set). Lines with no finite value stay infinite.
 */
export function transformAxis(
  d2: Float32Array | Float64Array,
  n: number,
  lines: number,
  step: number,
  lineStep: number,
  w2: number,
  buf: EnvelopeBuffers,
  base = 0,
  edgesZero = false,
  faces = false,
): void {
  const { f, out } = buf;
  const off = edgesZero ? 1 : 0;
  for (let l = 0; l < lines; l++) {
    const start = base + l * lineStep;
    let finite = edgesZero;
    let allZero = true;
    for (let q = 0; q < n; q++) {
      const x = d2[start + q * step];
      f[q + off] = x;
      if (x !== Infinity) finite = true;
      if (x !== 0) allZero = false;
    }
    if (!finite || allZero) continue;
    if (edgesZero) {
      f[0] = 0;
      f[n + 1] = 0;
    }
    if (faces) neighbourMin(f, n + 2 * off, out);
    lowerEnvelope(f, n + 2 * off, w2, out, buf.v, buf.z);
    for (let q = 0; q < n; q++) d2[start + q * step] = out[q + off];
  }
}

/**
 * f[q] becomes the least of f[q-1], f[q], f[q+1] (`tmp` is scratch). Before a pass this lets every
 * sample move one step towards the set for free: the offset along this axis counts one voxel less.
 */
function neighbourMin(f: Float64Array, n: number, tmp: Float64Array): void {
  for (let q = 0; q < n; q++) tmp[q] = Math.min(f[q], q > 0 ? f[q - 1] : Infinity, q < n - 1 ? f[q + 1] : Infinity);
  for (let q = 0; q < n; q++) f[q] = tmp[q];
}

/** 1-D squared distance transform of sampled function f with sample spacing² w2. */
function lowerEnvelope(f: Float64Array, n: number, w2: number, out: Float64Array, v: Int32Array, z: Float64Array): void {
  let k = -1;
  for (let q = 0; q < n; q++) {
    const fq = f[q];
    if (fq === Infinity) continue;
    if (k < 0) {
      k = 0;
      v[0] = q;
      z[0] = -Infinity;
      z[1] = Infinity;
      continue;
    }
    let s: number;
    for (;;) {
      const p = v[k];
      s = (fq + w2 * q * q - (f[p] + w2 * p * p)) / (2 * w2 * (q - p));
      if (s <= z[k]) k--;
      else break;
    }
    k++;
    v[k] = q;
    z[k] = s;
    z[k + 1] = Infinity;
  }
  k = 0;
  for (let q = 0; q < n; q++) {
    while (z[k + 1] < q) k++;
    const p = v[k];
    out[q] = w2 * (q - p) * (q - p) + f[p];
  }
}

/**
 * Squared distance in mm² from each voxel of `box` (box order, i fastest) to the nearest voxel of the
 * set, given as a box-sized array with 0 on set voxels and Infinity elsewhere (transformed in place).
 * With `outsideInSet` every voxel beyond the box counts as part of the set.
 *
 * `between` says what is measured: 'centres', voxel centre to voxel centre; 'faces', the gap between
 * the voxels' boxes (each voxel filling its cell), so along every axis the offset counts one voxel
 * less (half a voxel at each end, floored at 0) and voxels that share a face, edge or corner are 0
 * apart. Per axis the faces gap is min over a step of -1, 0 or +1 of the centres offset, so one
 * neighbour minimum before each axis's pass gives it exactly.
 */
export function squaredDistanceInBox(
  d2: Float32Array | Float64Array,
  box: Box,
  spacingMm: readonly number[],
  outsideInSet = false,
  between: 'centres' | 'faces' = 'centres',
): void {
  const { bx, by, bz } = box;
  const faces = between === 'faces';
  const buf = envelopeBuffers(Math.max(bx, by, bz));
  transformAxis(d2, bx, by * bz, 1, bx, spacingMm[0] * spacingMm[0], buf, 0, outsideInSet, faces);
  for (let k = 0; k < bz; k++) transformAxis(d2, by, bx, bx, 1, spacingMm[1] * spacingMm[1], buf, k * bx * by, outsideInSet, faces);
  transformAxis(d2, bz, bx * by, bx * by, 1, spacingMm[2] * spacingMm[2], buf, 0, outsideInSet, faces);
}

/** Box-order array with 0 where the grid mask (at the box's place) equals `inSet` (0 or non-zero), Infinity elsewhere. */
export function setIndicator(mask: Uint8Array, dims: Dims, box: Box, inSet: boolean): Float32Array {
  const [nx, ny] = dims;
  const { i0, j0, k0, bx, by, bz } = box;
  const d2 = new Float32Array(bx * by * bz);
  let b = 0;
  for (let k = 0; k < bz; k++) {
    for (let j = 0; j < by; j++) {
      const row = i0 + nx * (j0 + j + ny * (k0 + k));
      for (let i = 0; i < bx; i++, b++) d2[b] = (mask[row + i] !== 0) === inSet ? 0 : Infinity;
    }
  }
  return d2;
}
