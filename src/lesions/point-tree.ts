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
  private hx = 0;
  private hy = 0;
  private hz = 0;

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

  /**
   * Index of the point nearest to (x, y, z) closer than sqrt(bound2), and its squared distance. With
   * `slack` the distance is between boxes of those half-widths per axis (summed for the two boxes)
   * centred on the points: each axis offset less its slack, floored at 0.
   */
  nearest(x: number, y: number, z: number, bound2: number, slack: readonly number[] = NO_SLACK): { index: number; d2: number } {
    this.qx = x;
    this.qy = y;
    this.qz = z;
    this.hx = slack[0];
    this.hy = slack[1];
    this.hz = slack[2];
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
    // Every point beyond the split lies at least this far along the split axis.
    const gap = Math.max(0, Math.abs(diff) - (ax === 0 ? this.hx : ax === 1 ? this.hy : this.hz));
    this.visit(p);
    if (diff < 0) {
      this.search(lo, mid);
      if (gap * gap < this.best) this.search(mid + 1, hi);
    } else {
      this.search(mid + 1, hi);
      if (gap * gap < this.best) this.search(lo, mid);
    }
  }

  private visit(p: number): void {
    const pts = this.pts;
    const dx = Math.max(0, Math.abs(pts[3 * p] - this.qx) - this.hx);
    const dy = Math.max(0, Math.abs(pts[3 * p + 1] - this.qy) - this.hy);
    const dz = Math.max(0, Math.abs(pts[3 * p + 2] - this.qz) - this.hz);
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
const NO_SLACK = [0, 0, 0] as const;
