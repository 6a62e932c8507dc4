/**
 * A static k-d tree over 3-D points (x, y, z interleaved) for exact nearest-point queries. The tree
 * is implicit in a permutation: the median of each range is its node, split on the range's widest
 * axis; small ranges are leaves scanned directly.
 */
export class PointTree {
  private readonly pts: Float64Array;
  private readonly perm: Uint32Array;
  private readonly axis: Uint8Array;
  private qx = 0;
  private qy = 0;
  private qz = 0;
  private best = 0;
  private bestIndex = -1;

  constructor(pts: Float64Array) {
    this.pts = pts;
    const n = pts.length / 3;
    this.perm = new Uint32Array(n);
    for (let t = 0; t < n; t++) this.perm[t] = t;
    this.axis = new Uint8Array(n);
    const stack = [0, n];
    while (stack.length > 0) {
      const hi = stack.pop() as number;
      const lo = stack.pop() as number;
      if (hi - lo <= LEAF) continue;
      const ax = this.widestAxis(lo, hi);
      const mid = (lo + hi) >> 1;
      this.select(lo, hi, mid, ax);
      this.axis[mid] = ax;
      stack.push(lo, mid, mid + 1, hi);
    }
  }

  /** Index of the point nearest to (x, y, z) closer than sqrt(bound2), and its squared distance. */
  nearest(x: number, y: number, z: number, bound2: number): { index: number; d2: number } {
    this.qx = x;
    this.qy = y;
    this.qz = z;
    this.best = bound2;
    this.bestIndex = -1;
    this.search(0, this.perm.length);
    return { index: this.bestIndex, d2: this.best };
  }

  private search(lo: number, hi: number): void {
    const pts = this.pts, perm = this.perm;
    if (hi - lo <= LEAF) {
      for (let t = lo; t < hi; t++) this.visit(perm[t]);
      return;
    }
    const mid = (lo + hi) >> 1;
    const p = perm[mid];
    const ax = this.axis[mid];
    const diff = (ax === 0 ? this.qx : ax === 1 ? this.qy : this.qz) - pts[3 * p + ax];
    this.visit(p);
    if (diff < 0) {
      this.search(lo, mid);
      if (diff * diff < this.best) this.search(mid + 1, hi);
    } else {
      this.search(mid + 1, hi);
      if (diff * diff < this.best) this.search(lo, mid);
    }
  }

  private visit(p: number): void {
    const pts = this.pts;
    const dx = pts[3 * p] - this.qx, dy = pts[3 * p + 1] - this.qy, dz = pts[3 * p + 2] - this.qz;
    const d2 = dx * dx + dy * dy + dz * dz;
    if (d2 < this.best) {
      this.best = d2;
      this.bestIndex = p;
    }
  }

  private widestAxis(lo: number, hi: number): number {
    const pts = this.pts, perm = this.perm;
    let best = 0, bestSpread = -1;
    for (let ax = 0; ax < 3; ax++) {
      let min = Infinity, max = -Infinity;
      for (let t = lo; t < hi; t++) {
        const v = pts[3 * perm[t] + ax];
        if (v < min) min = v;
        if (v > max) max = v;
      }
      if (max - min > bestSpread) {
        bestSpread = max - min;
        best = ax;
      }
    }
    return best;
  }

  /** Quickselect: reorders perm[lo, hi) so that perm[k] holds the k-th smallest along `ax`. */
  private select(lo: number, hi: number, k: number, ax: number): void {
    const pts = this.pts, perm = this.perm;
    let l = lo, r = hi - 1;
    while (r > l) {
      const pivot = pts[3 * perm[(l + r) >> 1] + ax];
      let i = l, j = r;
      while (i <= j) {
        while (pts[3 * perm[i] + ax] < pivot) i++;
        while (pts[3 * perm[j] + ax] > pivot) j--;
        if (i <= j) {
          const t = perm[i];
          perm[i] = perm[j];
          perm[j] = t;
          i++;
          j--;
        }
      }
      if (k <= j) r = j;
      else if (k >= i) l = i;
      else return;
    }
  }
}

const LEAF = 8;
