/**
 * Optimal assignment (Hungarian method, shortest augmenting paths with row and column potentials),
 * O(n²·m). Lesion counts per visit are small, so exactness matters more than speed here: a greedy
 * nearest-first match swaps neighbouring lesions whenever two of them move together.
 */

/**
 * Minimum-cost assignment of every row to a distinct column for an n×m matrix with n ≤ m and finite
 * costs. Returns the column of each row.
 */
export function assignRows(cost: readonly (readonly number[])[]): number[] {
  const n = cost.length;
  if (n === 0) return [];
  const m = cost[0].length;
  if (n > m) throw new Error('assignRows needs no more rows than columns');
  // 1-based arrays with a virtual column 0, as the method is usually stated.
  const u = new Float64Array(n + 1);
  const v = new Float64Array(m + 1);
  const rowOfCol = new Int32Array(m + 1);
  const way = new Int32Array(m + 1);
  const minv = new Float64Array(m + 1);
  const used = new Uint8Array(m + 1);
  for (let i = 1; i <= n; i++) {
    rowOfCol[0] = i;
    let j0 = 0;
    minv.fill(Infinity);
    used.fill(0);
    do {
      used[j0] = 1;
      const i0 = rowOfCol[j0];
      let delta = Infinity;
      let j1 = 0;
      for (let j = 1; j <= m; j++) {
        if (used[j]) continue;
        const cur = cost[i0 - 1][j - 1] - u[i0] - v[j];
        if (cur < minv[j]) {
          minv[j] = cur;
          way[j] = j0;
        }
        if (minv[j] < delta) {
          delta = minv[j];
          j1 = j;
        }
      }
      for (let j = 0; j <= m; j++) {
        if (used[j]) {
          u[rowOfCol[j]] += delta;
          v[j] -= delta;
        } else minv[j] -= delta;
      }
      j0 = j1;
    } while (rowOfCol[j0] !== 0);
    do {
      const j1 = way[j0];
      rowOfCol[j0] = rowOfCol[j1];
      j0 = j1;
    } while (j0 !== 0);
  }
  const colOfRow = new Array<number>(n).fill(-1);
  for (let j = 1; j <= m; j++) if (rowOfCol[j] > 0) colOfRow[rowOfCol[j] - 1] = j;
  return colOfRow.map((j) => j - 1);
}

/**
 * Pairs rows with columns where a pair is allowed (finite cost), leaving either side unpaired at
 * `unpairedCost` each. A pair is therefore taken only when it costs less than leaving both of its
 * members unpaired (2 × unpairedCost), and among such choices the total is least. Built as the
 * usual (n+m)×(n+m) padded square: real block, a diagonal of "row unpaired" and of "column
 * unpaired" entries, and a zero block for dummy-with-dummy.
 */
export function assignWithGate(cost: readonly (readonly number[])[], unpairedCost: number): [number, number][] {
  const n = cost.length;
  const m = n === 0 ? 0 : cost[0].length;
  if (n === 0 || m === 0) return [];
  const size = n + m;
  // Larger than any sum of allowed entries, so a forbidden entry is never chosen over the padding.
  let big = 1 + 2 * size * unpairedCost;
  for (const row of cost) for (const c of row) if (Number.isFinite(c)) big += Math.abs(c);
  const square: number[][] = [];
  for (let i = 0; i < size; i++) {
    const row = new Array<number>(size);
    for (let j = 0; j < size; j++) {
      if (i < n && j < m) row[j] = Number.isFinite(cost[i][j]) ? cost[i][j] : big;
      else if (i < n) row[j] = j - m === i ? unpairedCost : big;
      else if (j < m) row[j] = i - n === j ? unpairedCost : big;
      else row[j] = 0;
    }
    square.push(row);
  }
  const cols = assignRows(square);
  const pairs: [number, number][] = [];
  for (let i = 0; i < n; i++) {
    const j = cols[i];
    if (j < m && Number.isFinite(cost[i][j])) pairs.push([i, j]);
  }
  return pairs;
}
