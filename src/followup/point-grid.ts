/**
 * Nearest-point queries over a fixed point cloud (liver surface voxel centres) by a uniform bucket
 * grid: points sorted by cell once (counting sort into flat arrays), then each query searches
 * growing shells of cells around its own until no unsearched cell can hold a closer point.
 * Exact, allocation-free per query, and fast for surface clouds where most cells are empty.
 */
export class PointGrid {
  private readonly points: Float64Array;
  private readonly order: Int32Array;
  private readonly cellStart: Int32Array;
  private readonly origin: [number, number, number];
  private readonly cellMm: number;
  private readonly cells: [number, number, number];
  /** Squared distance of the last `nearest` answer, mm². */
  lastDistance2 = Infinity;

  constructor(points: Float64Array, count: number) {
    if (count === 0) throw new Error('PointGrid needs at least one point');
    this.points = points;
    let x0 = Infinity, y0 = Infinity, z0 = Infinity, x1 = -Infinity, y1 = -Infinity, z1 = -Infinity;
    for (let n = 0; n < count; n++) {
      const x = points[3 * n], y = points[3 * n + 1], z = points[3 * n + 2];
      if (x < x0) x0 = x; if (x > x1) x1 = x;
      if (y < y0) y0 = y; if (y > y1) y1 = y;
      if (z < z0) z0 = z; if (z > z1) z1 = z;
    }
    // About 48 cells along the longest side: a few points per occupied cell for a surface cloud.
    const extent = Math.max(x1 - x0, y1 - y0, z1 - z0, 1e-6);
    this.cellMm = Math.max(extent / 48, 1e-3);
    this.origin = [x0, y0, z0];
    this.cells = [
      Math.floor((x1 - x0) / this.cellMm) + 1,
      Math.floor((y1 - y0) / this.cellMm) + 1,
      Math.floor((z1 - z0) / this.cellMm) + 1,
    ];
    const total = this.cells[0] * this.cells[1] * this.cells[2];
    this.cellStart = new Int32Array(total + 1);
    const cellOf = new Int32Array(count);
    for (let n = 0; n < count; n++) {
      const c = this.cellIndex(points[3 * n], points[3 * n + 1], points[3 * n + 2]);
      cellOf[n] = c;
      this.cellStart[c + 1]++;
    }
    for (let c = 0; c < total; c++) this.cellStart[c + 1] += this.cellStart[c];
    const fill = this.cellStart.slice(0, total);
    this.order = new Int32Array(count);
    for (let n = 0; n < count; n++) this.order[fill[cellOf[n]]++] = n;
  }

  /** Index of the stored point nearest to (x, y, z); its squared distance is left in `lastDistance2`. */
  nearest(x: number, y: number, z: number): number {
    const [cx, cy, cz] = this.cells;
    const ci = clamp(Math.floor((x - this.origin[0]) / this.cellMm), cx);
    const cj = clamp(Math.floor((y - this.origin[1]) / this.cellMm), cy);
    const ck = clamp(Math.floor((z - this.origin[2]) / this.cellMm), cz);
    const maxRing = Math.max(cx, cy, cz);
    let best = -1;
    let bestD2 = Infinity;
    for (let r = 0; r <= maxRing; r++) {
      for (let k = ck - r; k <= ck + r; k++) {
        if (k < 0 || k >= cz) continue;
        const onK = k === ck - r || k === ck + r;
        for (let j = cj - r; j <= cj + r; j++) {
          if (j < 0 || j >= cy) continue;
          const onJ = onK || j === cj - r || j === cj + r;
          // Only the shell of ring r: interior cells were searched at smaller r.
          const step = onJ ? 1 : 2 * r;
          for (let i = ci - r; i <= ci + r; i += step || 1) {
            if (i < 0 || i >= cx) continue;
            const c = i + cx * (j + cy * k);
            for (let s = this.cellStart[c]; s < this.cellStart[c + 1]; s++) {
              const n = this.order[s];
              const dx = this.points[3 * n] - x, dy = this.points[3 * n + 1] - y, dz = this.points[3 * n + 2] - z;
              const d2 = dx * dx + dy * dy + dz * dz;
              if (d2 < bestD2) {
                bestD2 = d2;
                best = n;
              }
            }
          }
        }
      }
      // Cells beyond ring r lie at least r cell widths away from the query's (clamped) cell.
      if (best >= 0 && bestD2 <= (r * this.cellMm) ** 2) break;
    }
    this.lastDistance2 = bestD2;
    return best;
  }

  private cellIndex(x: number, y: number, z: number): number {
    const [cx, cy, cz] = this.cells;
    const i = clamp(Math.floor((x - this.origin[0]) / this.cellMm), cx);
    const j = clamp(Math.floor((y - this.origin[1]) / this.cellMm), cy);
    const k = clamp(Math.floor((z - this.origin[2]) / this.cellMm), cz);
    return i + cx * (j + cy * k);
  }
}

function clamp(c: number, n: number): number {
  return c < 0 ? 0 : c >= n ? n - 1 : c;
}
