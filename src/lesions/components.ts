import { badFile, tooLarge } from '../errors.js';
import type { Volume, VoxelArray } from '../volume/volume.js';

/** The voxels of one lesion in a lesion mask. */
export interface LesionVoxels {
  /** Stored (unscaled) mask value of the lesion's voxels. */
  readonly storedValue: number;
  /** The same value after scl_slope/scl_inter: the label a multi-label mask gives the lesion. */
  readonly label: number;
  /** Linear voxel indices (i fastest) in the mask's grid, ascending. */
  readonly voxels: Uint32Array;
}

export interface MaskLesions {
  /** `binary`: one non-zero value, split into 26-connected components; `multi-label`: one lesion per value. */
  readonly kind: 'empty' | 'binary' | 'multi-label';
  readonly lesions: LesionVoxels[];
}

/**
 * Lesions of a lesion mask. A mask with a single non-zero value is binary and gives its 26-connected
 * components, ordered by their first voxel in storage order; a mask with several values gives one
 * lesion per value (connected or not), ordered by value.
 */
export function lesionsFromMask(mask: Volume, file = 'lesion mask'): MaskLesions {
  if (mask.data.length > 0xffffffff) throw tooLarge(file, 'more than 2^32 voxels');
  const { indices, storedValues } = nonZeroVoxels(mask);
  const toLabel = (s: number) => s * mask.slope + mask.inter;
  for (const s of storedValues) {
    const label = toLabel(s);
    if (!Number.isInteger(label)) {
      throw badFile(file, `holds the non-integer value ${label}; a lesion mask must be binary or hold one whole-number label per lesion`);
    }
  }
  if (indices.length === 0) return { kind: 'empty', lesions: [] };
  if (storedValues.length === 1) {
    const storedValue = storedValues[0];
    const parts = components26(mask.data, mask.dims, storedValue, indices);
    return { kind: 'binary', lesions: parts.map((voxels) => ({ storedValue, label: toLabel(storedValue), voxels })) };
  }
  return { kind: 'multi-label', lesions: splitByValue(mask.data, indices, storedValues, toLabel) };
}

/**
 * Linear indices of the voxels whose scaled value is non-zero (NaN counts as zero), ascending, and
 * the distinct stored values found there.
 */
function nonZeroVoxels(mask: Volume): { indices: Uint32Array; storedValues: number[] } {
  const { data, slope, inter } = mask;
  const out = new GrowingIndices();
  const values = new Set<number>();
  let last = NaN;
  const note = (n: number, v: number) => {
    out.push(n);
    if (v !== last) {
      values.add(v);
      last = v;
    }
  };
  if (slope === 1 && inter === 0) {
    if (data instanceof Uint8Array && data.byteOffset % 4 === 0) {
      // Lesion masks are mostly zero: test four voxels per read.
      const words = new Uint32Array(data.buffer, data.byteOffset, data.length >>> 2);
      for (let w = 0; w < words.length; w++) {
        if (words[w] === 0) continue;
        for (let n = w * 4; n < w * 4 + 4; n++) if (data[n] !== 0) note(n, data[n]);
      }
      for (let n = words.length * 4; n < data.length; n++) if (data[n] !== 0) note(n, data[n]);
    } else {
      for (let n = 0; n < data.length; n++) {
        const v = data[n];
        if (v !== 0 && v === v) note(n, v);
      }
    }
  } else {
    for (let n = 0; n < data.length; n++) {
      const v = data[n];
      const x = v * slope + inter;
      if (x !== 0 && x === x) note(n, v);
    }
  }
  const storedValues = [...values].sort((a, b) => a * slope + inter - (b * slope + inter));
  return { indices: out.take(), storedValues };
}

/** One lesion per stored value, each with its voxels in ascending order. */
function splitByValue(
  data: VoxelArray,
  indices: Uint32Array,
  storedValues: number[],
  toLabel: (s: number) => number,
): LesionVoxels[] {
  const slot = new Map<number, number>();
  storedValues.forEach((s, n) => slot.set(s, n));
  const counts = new Uint32Array(storedValues.length);
  let last = NaN;
  let lastSlot = 0;
  for (let t = 0; t < indices.length; t++) {
    const v = data[indices[t]];
    if (v !== last) {
      last = v;
      lastSlot = slot.get(v) as number;
    }
    counts[lastSlot]++;
  }
  const lists = storedValues.map((_, n) => new Uint32Array(counts[n]));
  const fill = new Uint32Array(storedValues.length);
  last = NaN;
  for (let t = 0; t < indices.length; t++) {
    const v = data[indices[t]];
    if (v !== last) {
      last = v;
      lastSlot = slot.get(v) as number;
    }
    lists[lastSlot][fill[lastSlot]++] = indices[t];
  }
  return storedValues.map((storedValue, n) => ({ storedValue, label: toLabel(storedValue), voxels: lists[n] }));
}

/**
 * 26-connected components of the voxels holding `storedValue`, found by breadth-first flooding from
 * `seeds` (all such voxels, ascending). The output buffer doubles as the queue, so each component
 * ends up contiguous; a bit set over the seeds' index range marks visited voxels. Components come in
 * the order of their first voxel; each one's indices are sorted.
 */
function components26(
  data: VoxelArray,
  dims: readonly [number, number, number],
  storedValue: number,
  seeds: Uint32Array,
): Uint32Array[] {
  const [nx, ny, nz] = dims;
  const sxy = nx * ny;
  if (seeds.length === 0) return [];
  const lo = seeds[0];
  const span = seeds[seeds.length - 1] - lo + 1;
  const visited = new Uint32Array(Math.ceil(span / 32));
  const order = new Uint32Array(seeds.length);
  const offsets: number[] = [];
  const di: number[] = [], dj: number[] = [], dk: number[] = [];
  for (let c = -1; c <= 1; c++) {
    for (let b = -1; b <= 1; b++) {
      for (let a = -1; a <= 1; a++) {
        if (a === 0 && b === 0 && c === 0) continue;
        di.push(a);
        dj.push(b);
        dk.push(c);
        offsets.push(a + nx * b + sxy * c);
      }
    }
  }
  const off = Int32Array.from(offsets);
  const starts: number[] = [];
  let tail = 0;
  for (let s = 0; s < seeds.length; s++) {
    const seed = seeds[s];
    const sb = seed - lo;
    if (visited[sb >>> 5] & (1 << (sb & 31))) continue;
    visited[sb >>> 5] |= 1 << (sb & 31);
    starts.push(tail);
    let head = tail;
    order[tail++] = seed;
    while (head < tail) {
      const n = order[head++];
      const i = n % nx;
      const j = ((n - i) / nx) % ny;
      const k = (n - i - nx * j) / sxy;
      const inside = i > 0 && j > 0 && k > 0 && i < nx - 1 && j < ny - 1 && k < nz - 1;
      for (let t = 0; t < 26; t++) {
        if (!inside) {
          const a = i + di[t], b = j + dj[t], c = k + dk[t];
          if (a < 0 || b < 0 || c < 0 || a >= nx || b >= ny || c >= nz) continue;
        }
        const m = n + off[t];
        const mb = m - lo;
        // Every voxel with the value lies in [lo, lo + span): outside it there is nothing to visit.
        if (mb < 0 || mb >= span || data[m] !== storedValue) continue;
        const bit = 1 << (mb & 31);
        if (visited[mb >>> 5] & bit) continue;
        visited[mb >>> 5] |= bit;
        order[tail++] = m;
      }
    }
  }
  starts.push(tail);
  const parts: Uint32Array[] = [];
  for (let c = 0; c + 1 < starts.length; c++) parts.push(order.subarray(starts[c], starts[c + 1]).sort());
  return parts;
}

/** An append-only list of voxel indices that doubles its storage as it fills. */
class GrowingIndices {
  private buf = new Uint32Array(1 << 12);
  private n = 0;

  push(x: number): void {
    if (this.n === this.buf.length) {
      const next = new Uint32Array(this.buf.length * 2);
      next.set(this.buf);
      this.buf = next;
    }
    this.buf[this.n++] = x;
  }

  take(): Uint32Array {
    return this.buf.slice(0, this.n);
  }
}
