import type { Dims } from './box.js';
import { GrowingStack } from './morphology.js';

/** Face neighbours (6) or face, edge and corner neighbours (26). */
export type Connectivity = 6 | 26;

/**
 * The voxels of `candidate` (non-zero) connected to any of the seeds (linear indices) through
 * candidate voxels. Seeds that are not candidates start nothing. As skimage.segmentation.flood with
 * connectivity 1 (6) or 3 (26) when `candidate` is the tolerance test.
 */
export function seedComponent(candidate: Uint8Array, dims: Dims, seeds: readonly number[], connectivity: Connectivity): Uint8Array {
  const out = new Uint8Array(candidate.length);
  const [nx, ny, nz] = dims;
  const sy = nx, sz = nx * ny;
  const stack = new GrowingStack();
  for (const s of seeds) {
    if (s >= 0 && s < candidate.length && candidate[s] !== 0 && out[s] === 0) {
      out[s] = 1;
      stack.push(s);
    }
  }
  const take = (m: number) => {
    if (candidate[m] !== 0 && out[m] === 0) {
      out[m] = 1;
      stack.push(m);
    }
  };
  while (stack.size > 0) {
    const n = stack.pop();
    const i = n % nx;
    const t = (n - i) / nx;
    const j = t % ny;
    const k = (t - j) / ny;
    if (connectivity === 6) {
      if (i > 0) take(n - 1);
      if (i < nx - 1) take(n + 1);
      if (j > 0) take(n - sy);
      if (j < ny - 1) take(n + sy);
      if (k > 0) take(n - sz);
      if (k < nz - 1) take(n + sz);
      continue;
    }
    const dk0 = k > 0 ? -1 : 0, dk1 = k < nz - 1 ? 1 : 0;
    const dj0 = j > 0 ? -1 : 0, dj1 = j < ny - 1 ? 1 : 0;
    const di0 = i > 0 ? -1 : 0, di1 = i < nx - 1 ? 1 : 0;
    for (let dk = dk0; dk <= dk1; dk++) {
      for (let dj = dj0; dj <= dj1; dj++) {
        const row = n + dj * sy + dk * sz;
        for (let di = di0; di <= di1; di++) take(row + di);
      }
    }
  }
  return out;
}

/** 1 where lo ≤ value ≤ hi (and `within`, when given, is non-zero). */
export function windowMask(values: Float32Array, lo: number, hi: number, within?: Uint8Array): Uint8Array {
  const out = new Uint8Array(values.length);
  for (let n = 0; n < values.length; n++) {
    const v = values[n];
    out[n] = v >= lo && v <= hi && (within === undefined || within[n] !== 0) ? 1 : 0;
  }
  return out;
}

/**
 * Seeded growing on an intensity window: the voxels with lo ≤ value ≤ hi connected to a seed.
 */
export function growInWindow(values: Float32Array, dims: Dims, seeds: readonly number[], lo: number, hi: number, connectivity: Connectivity, within?: Uint8Array): Uint8Array {
  return seedComponent(windowMask(values, lo, hi, within), dims, seeds, connectivity);
}

/**
 * Splits the candidate voxels reachable from two groups of seeds by which group reaches each first
 * (breadth-first, face neighbours: a geodesic Voronoi split). Returns 1 for voxels the `keep` seeds
 * reach first, so a thin contact to an unwanted region is cut where the two fronts meet.
 */
export function competingGrowth(candidate: Uint8Array, dims: Dims, keep: readonly number[], reject: readonly number[]): Uint8Array {
  const [nx, ny, nz] = dims;
  const sy = nx, sz = nx * ny;
  // 0 unreached, 1 keep, 2 reject.
  const owner = new Uint8Array(candidate.length);
  let queue = new Int32Array(1 << 16);
  let head = 0, tail = 0;
  const push = (m: number, who: number) => {
    owner[m] = who;
    if (tail === queue.length) {
      // Compact what has been read, and double when still full.
      const live = queue.subarray(head, tail);
      const next = tail - head > queue.length / 2 ? new Int32Array(queue.length * 2) : queue;
      next.set(live);
      queue = next;
      tail -= head;
      head = 0;
    }
    queue[tail++] = m;
  };
  for (const s of reject) if (s >= 0 && s < candidate.length && candidate[s] !== 0 && owner[s] === 0) push(s, 2);
  for (const s of keep) if (s >= 0 && s < candidate.length && candidate[s] !== 0 && owner[s] === 0) push(s, 1);
  while (head < tail) {
    const n = queue[head++];
    const who = owner[n];
    const i = n % nx;
    const t = (n - i) / nx;
    const j = t % ny;
    const k = (t - j) / ny;
    if (i > 0 && owner[n - 1] === 0 && candidate[n - 1] !== 0) push(n - 1, who);
    if (i < nx - 1 && owner[n + 1] === 0 && candidate[n + 1] !== 0) push(n + 1, who);
    if (j > 0 && owner[n - sy] === 0 && candidate[n - sy] !== 0) push(n - sy, who);
    if (j < ny - 1 && owner[n + sy] === 0 && candidate[n + sy] !== 0) push(n + sy, who);
    if (k > 0 && owner[n - sz] === 0 && candidate[n - sz] !== 0) push(n - sz, who);
    if (k < nz - 1 && owner[n + sz] === 0 && candidate[n + sz] !== 0) push(n + sz, who);
  }
  for (let n = 0; n < owner.length; n++) owner[n] = owner[n] === 1 ? 1 : 0;
  return owner;
}
