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

/** Lesions per visit above which a mask is refused (settable): well above any real liver. */
export const DEFAULT_MAX_LESIONS = 1000;

/**
 * Lesions of a lesion mask. A mask with a single non-zero value is binary and gives its 26-connected
 * components, ordered by their first voxel in storage order; a mask with several values gives one
 * lesion per value (connected or not), ordered by value. A mask with more than `maxLesions` lesions
 * (components or values), or with negative values, is refused before anything is measured.
 *
 * Memory is bounded by the grid, not by what the mask holds: one provisional label and one output
 * index per lesion voxel, two slices of labels and a union-find table of at most one entry per
 * 2×2×2 block; all lesions' voxel lists share one buffer.
 */
export function lesionsFromMask(mask: Volume, file = 'lesion mask', maxLesions = DEFAULT_MAX_LESIONS): MaskLesions {
  if (mask.data.length > 0xffffffff) throw tooLarge(file, 'more than 2^32 voxels');
  const { count, storedValues } = maskValues(mask, file, maxLesions);
  const toLabel = (s: number) => s * mask.slope + mask.inter;
  if (count === 0) return { kind: 'empty', lesions: [] };
  if (storedValues.length === 1) {
    const storedValue = storedValues[0];
    const parts = components26(mask.data, mask.dims, storedValue, count, file, maxLesions);
    return { kind: 'binary', lesions: parts.map((voxels) => ({ storedValue, label: toLabel(storedValue), voxels })) };
  }
  return { kind: 'multi-label', lesions: splitByValue(mask, count, storedValues, toLabel) };
}

/** Whether a stored value is lesion: non-zero after scaling (NaN counts as zero). */
function isLesion(v: number, slope: number, inter: number): boolean {
  const x = slope === 1 && inter === 0 ? v : v * slope + inter;
  return x !== 0 && x === x;
}

/**
 * How many voxels are lesion and the distinct stored values found there, sorted by label. Stops at
 * the first value that shows the file is not a label mask, so a scan given by mistake costs one pass.
 */
function maskValues(mask: Volume, file: string, maxLesions: number): { count: number; storedValues: number[] } {
  const { data, slope, inter } = mask;
  const values = new Set<number>();
  let count = 0;
  let last = NaN;
  const note = (v: number) => {
    if (v === last || values.has(v)) return;
    last = v;
    const label = v * slope + inter;
    if (!Number.isInteger(label)) {
      throw badFile(file, `holds the non-integer value ${label}; a lesion mask must be binary or hold one whole-number label per lesion`);
    }
    if (label < 0) throw badFile(file, `holds the negative value ${label}: an image, not a label mask (a lesion mask holds 0 and positive whole-number labels)`);
    values.add(v);
    if (values.size > maxLesions) {
      throw badFile(file, `holds more than ${maxLesions} distinct label values: an image, not a label mask (the cap is ${maxLesions} lesions per visit)`);
    }
  };
  if (slope === 1 && inter === 0 && data instanceof Uint8Array && data.byteOffset % 4 === 0) {
    // Lesion masks are mostly zero: test four voxels per read.
    const words = new Uint32Array(data.buffer, data.byteOffset, data.length >>> 2);
    for (let w = 0; w < words.length; w++) {
      if (words[w] === 0) continue;
      for (let n = w * 4; n < w * 4 + 4; n++) {
        if (data[n] !== 0) {
          count++;
          note(data[n]);
        }
      }
    }
    for (let n = words.length * 4; n < data.length; n++) {
      if (data[n] !== 0) {
        count++;
        note(data[n]);
      }
    }
  } else {
    for (let n = 0; n < data.length; n++) {
      const v = data[n];
      if (isLesion(v, slope, inter)) {
        count++;
        note(v);
      }
    }
  }
  const storedValues = [...values].sort((a, b) => a * slope + inter - (b * slope + inter));
  return { count, storedValues };
}

/** One lesion per stored value, each with its voxels in ascending order, all in one shared buffer. */
function splitByValue(mask: Volume, count: number, storedValues: number[], toLabel: (s: number) => number): LesionVoxels[] {
  const { data, slope, inter } = mask;
  const slot = new Map<number, number>();
  storedValues.forEach((s, n) => slot.set(s, n));
  const counts = new Uint32Array(storedValues.length);
  let last = NaN;
  let lastSlot = 0;
  for (let n = 0; n < data.length; n++) {
    const v = data[n];
    if (v === 0 && slope === 1 && inter === 0) continue;
    if (!isLesion(v, slope, inter)) continue;
    if (v !== last) {
      last = v;
      lastSlot = slot.get(v) as number;
    }
    counts[lastSlot]++;
  }
  const all = new Uint32Array(count);
  const fill = new Uint32Array(storedValues.length);
  for (let s = 1; s < fill.length; s++) fill[s] = fill[s - 1] + counts[s - 1];
  const starts = Uint32Array.from(fill);
  last = NaN;
  for (let n = 0; n < data.length; n++) {
    const v = data[n];
    if (v === 0 && slope === 1 && inter === 0) continue;
    if (!isLesion(v, slope, inter)) continue;
    if (v !== last) {
      last = v;
      lastSlot = slot.get(v) as number;
    }
    all[fill[lastSlot]++] = n;
  }
  return storedValues.map((storedValue, n) => ({
    storedValue,
    label: toLabel(storedValue),
    voxels: all.subarray(starts[n], starts[n] + counts[n]),
  }));
}

/**
 * 26-connected components of the `count` voxels holding `storedValue`, by two raster passes with
 * union-find. The first pass gives each voxel a provisional label from its thirteen earlier
 * neighbours (only the current and previous slice are kept) and joins labels that meet; the second
 * maps every provisional label to its component and lays the voxels out component by component.
 * A component's first voxel (storage order) opens its smallest label, and unions keep the smaller
 * root, so components come out in the order of their first voxel, each one's indices ascending.
 */
function components26(
  data: VoxelArray,
  dims: readonly [number, number, number],
  storedValue: number,
  count: number,
  file: string,
  maxLesions: number,
): Uint32Array[] {
  const [nx, ny, nz] = dims;
  const sxy = nx * ny;
  // Voxels that open a label have no earlier neighbour in the mask, so no two of them touch: at
  // most one per 2×2×2 block.
  const most = Math.min(count, Math.ceil(nx / 2) * Math.ceil(ny / 2) * Math.ceil(nz / 2));
  const parent = new Uint32Array(most + 1);
  const provisional = new Uint32Array(count);
  let prev = new Uint32Array(sxy);
  let cur = new Uint32Array(sxy);
  let labels = 0;
  let t = 0;
  const find = (a: number) => {
    while (parent[a] !== a) {
      parent[a] = parent[parent[a]];
      a = parent[a];
    }
    return a;
  };
  const join = (a: number, b: number) => {
    let ra = find(a);
    let rb = find(b);
    if (ra === rb) return ra;
    if (rb < ra) [ra, rb] = [rb, ra];
    parent[rb] = ra;
    return ra;
  };
  const meet = (l: number, m: number) => (m === 0 ? l : l === 0 ? m : join(l, m));
  for (let k = 0; k < nz; k++) {
    [prev, cur] = [cur, prev];
    cur.fill(0);
    const base = k * sxy;
    for (let j = 0; j < ny; j++) {
      for (let i = 0; i < nx; i++) {
        const p = i + nx * j;
        if (data[base + p] !== storedValue) continue;
        let l = 0;
        // Earlier neighbours: (i-1, j) in this row; the row j-1 of this slice; rows j-1..j+1 of the last.
        if (i > 0) l = meet(l, cur[p - 1]);
        if (j > 0) {
          if (i > 0) l = meet(l, cur[p - nx - 1]);
          l = meet(l, cur[p - nx]);
          if (i < nx - 1) l = meet(l, cur[p - nx + 1]);
        }
        if (k > 0) {
          for (let b = -1; b <= 1; b++) {
            const jj = j + b;
            if (jj < 0 || jj >= ny) continue;
            const q = p + nx * b;
            if (i > 0) l = meet(l, prev[q - 1]);
            l = meet(l, prev[q]);
            if (i < nx - 1) l = meet(l, prev[q + 1]);
          }
        }
        if (l === 0) {
          l = ++labels;
          parent[l] = l;
        }
        cur[p] = l;
        provisional[t++] = l;
      }
    }
  }
  // Component numbers in the order of their smallest label, i.e. of their first voxel.
  let components = 0;
  // A label's parent is never larger than itself, so in ascending order its parent already holds
  // the component number.
  for (let l = 1; l <= labels; l++) parent[l] = parent[l] === l ? components++ : parent[parent[l]];
  if (components > maxLesions) {
    throw tooLarge(file, `holds ${components} lesions (26-connected components), above the cap of ${maxLesions} lesions per visit`);
  }
  const sizes = new Uint32Array(components);
  for (let s = 0; s < count; s++) {
    provisional[s] = parent[provisional[s]];
    sizes[provisional[s]]++;
  }
  const starts = new Uint32Array(components + 1);
  for (let c = 0; c < components; c++) starts[c + 1] = starts[c] + sizes[c];
  const fill = starts.slice(0, components);
  const all = new Uint32Array(count);
  let s = 0;
  for (let n = 0; n < data.length; n++) if (data[n] === storedValue) all[fill[provisional[s++]]++] = n;
  const parts: Uint32Array[] = [];
  for (let c = 0; c < components; c++) parts.push(all.subarray(starts[c], starts[c + 1]));
  return parts;
}
