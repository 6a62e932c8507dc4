/**
 * Optimal assignment (Hungarian method, shortest augmenting paths with row and column potentials).
 * Exactness matters more than speed here: a greedy
 * nearest-first match swaps neighbouring lesions whenever two of them move together.
 */

/**
 * Pairs rows with columns where a pair is allowed (finite cost), leaving either side unpaired at
 * `unpairedCost` each. A pair is therefore taken only when it costs less than leaving both of its
 * members unpaired (2 × unpairedCost), and among such choices the total is least.
 *
 * Solved as an assignment in which every row also has a private "unpaired" column costing
 * 2 × unpairedCost (the total differs from the padded square's by a constant), by shortest
 * augmenting paths over the allowed pairs only (Dijkstra with row and column potentials). A search
 * stops at the first free column, and a row's own unpaired column bounds its length, so lesions far
 * from every other cost next to nothing and the work follows the gated pairs, not rows × columns.
 */
export function assignWithGate(cost: readonly (readonly number[])[], unpairedCost: number): [number, number][] {
  const m = cost.length === 0 ? 0 : cost[0].length;
  const rows = cost.map((row) => {
    const own: Candidates = { cols: [], costs: [] };
    row.forEach((c, j) => {
      if (Number.isFinite(c)) {
        own.cols.push(j);
        own.costs.push(c);
      }
    });
    return own;
  });
  return assignCandidates(rows, m, unpairedCost);
}

/** One row's allowed pairs: column indices and their costs. */
export interface Candidates {
  cols: number[];
  costs: number[];
}

/** `assignWithGate` for rows given as their allowed pairs only, over `m` columns. */
export function assignCandidates(candidates: readonly Candidates[], m: number, unpairedCost: number): [number, number][] {
  const n = candidates.length;
  if (n === 0 || m === 0) return [];
  // Row i's own unpaired column is m + i.
  const edgeCols = candidates.map((c, i) => [...c.cols, m + i]);
  const edgeCosts = candidates.map((c) => [...c.costs, 2 * unpairedCost]);
  const columns = m + n;
  const colRow = new Int32Array(columns).fill(-1);
  const rowCol = new Int32Array(n).fill(-1);
  const rowPot = new Float64Array(n);
  const colPot = new Float64Array(columns);
  const dist = new Float64Array(columns).fill(Infinity);
  const from = new Int32Array(columns);
  const done = new Uint8Array(columns);
  const rowDist = new Float64Array(n);
  const heap = new MinHeap();
  for (let s = 0; s < n; s++) {
    const touched: number[] = [];
    const rows: number[] = [s];
    const relax = (i: number, di: number) => {
      const cols = edgeCols[i], costs = edgeCosts[i];
      for (let e = 0; e < cols.length; e++) {
        const j = cols[e];
        if (done[j]) continue;
        const d = di + costs[e] - rowPot[i] - colPot[j];
        if (d < dist[j]) {
          if (dist[j] === Infinity) touched.push(j);
          dist[j] = d;
          from[j] = i;
          heap.push(d, j);
        }
      }
    };
    rowDist[s] = 0;
    relax(s, 0);
    let free = -1;
    while (free < 0) {
      const [d, j] = heap.pop();
      if (done[j] || d > dist[j]) continue;
      done[j] = 1;
      const i = colRow[j];
      if (i < 0) free = j;
      else {
        rowDist[i] = d;
        rows.push(i);
        relax(i, d);
      }
    }
    const reach = dist[free];
    // Potentials keep every reduced cost ≥ 0 and the matched ones 0.
    for (const i of rows) rowPot[i] += reach - rowDist[i];
    for (const j of touched) if (done[j]) colPot[j] -= reach - dist[j];
    for (let j = free; ;) {
      const i = from[j];
      const next = rowCol[i];
      rowCol[i] = j;
      colRow[j] = i;
      if (i === s) break;
      j = next;
    }
    for (const j of touched) {
      dist[j] = Infinity;
      done[j] = 0;
    }
    heap.clear();
  }
  const pairs: [number, number][] = [];
  for (let i = 0; i < n; i++) if (rowCol[i] < m) pairs.push([i, rowCol[i]]);
  return pairs;
}

/** A binary min-heap of (key, value) pairs; stale entries are skipped by the caller. */
class MinHeap {
  private keys: number[] = [];
  private values: number[] = [];

  push(key: number, value: number): void {
    const { keys, values } = this;
    let x = keys.length;
    keys.push(key);
    values.push(value);
    while (x > 0) {
      const up = (x - 1) >> 1;
      if (keys[up] <= key) break;
      keys[x] = keys[up];
      values[x] = values[up];
      x = up;
    }
    keys[x] = key;
    values[x] = value;
  }

  pop(): [number, number] {
    const { keys, values } = this;
    const top: [number, number] = [keys[0], values[0]];
    const key = keys.pop() as number;
    const value = values.pop() as number;
    const size = keys.length;
    if (size > 0) {
      let x = 0;
      for (;;) {
        let c = 2 * x + 1;
        if (c >= size) break;
        if (c + 1 < size && keys[c + 1] < keys[c]) c++;
        if (keys[c] >= key) break;
        keys[x] = keys[c];
        values[x] = values[c];
        x = c;
      }
      keys[x] = key;
      values[x] = value;
    }
    return top;
  }

  clear(): void {
    this.keys.length = 0;
    this.values.length = 0;
  }
}
