import { CODE_RGB, MAX_CODE, STRIPED_CODE } from './palette.js';
import type { NumberArray } from './slice.js';
import { MIN_WIDTH, type WindowLevel } from './window-level.js';

export interface SliceImageInput {
  width: number;
  height: number;
  /** Stored scan values of the slice; the physical value is value × slope + inter. */
  scan: NumberArray;
  slope: number;
  inter: number;
  window: WindowLevel;
  /** Default-scheme segment codes of the slice, or null for no wash. */
  segments: NumberArray | null;
  /** 0–1. */
  opacity: number;
}

/**
 * The slice as RGBA pixels: the scan in grey through the window, with each segment's colour washed
 * over it at the chosen opacity. Stripes (every other pair of diagonals at half strength) mark IVb.
 */
export function composeSlice(input: SliceImageInput, out: Uint8ClampedArray): void {
  const { width, height, scan, segments } = input;
  const w = Math.max(MIN_WIDTH, input.window.width);
  const lo = input.window.centre - w / 2;
  // gray = (value·slope + inter − lo)·255/w, folded into one multiply-add on the stored value.
  const gain = (input.slope * 255) / w;
  const offset = ((input.inter - lo) * 255) / w;
  const alpha = Math.min(1, Math.max(0, input.opacity));
  let n = 0;
  for (let r = 0; r < height; r++) {
    for (let c = 0; c < width; c++, n++) {
      let g = scan[n] * gain + offset;
      g = g <= 0 ? 0 : g >= 255 ? 255 : g;
      let red = g, green = g, blue = g;
      const code = segments === null ? 0 : segments[n];
      if (code > 0 && code <= MAX_CODE) {
        const a = code === STRIPED_CODE && ((c + r) & 2) === 0 ? alpha * 0.35 : alpha;
        const at = code * 3;
        red += (CODE_RGB[at] - red) * a;
        green += (CODE_RGB[at + 1] - green) * a;
        blue += (CODE_RGB[at + 2] - blue) * a;
      }
      const o = n * 4;
      out[o] = red;
      out[o + 1] = green;
      out[o + 2] = blue;
      out[o + 3] = 255;
    }
  }
}

/** Outline of one lesion in one slice: voxel-edge segments x0 y0 x1 y1 in voxel units, and where to put its id. */
export interface LesionOutline {
  label: number;
  edges: number[];
  /** Top-left voxel of the lesion in this slice (its id goes just above). */
  anchor: { col: number; row: number };
}

/**
 * Edges between each lesion's voxels and anything else in a slice of lesion labels (0 none), as
 * line segments along voxel borders: crisp at any zoom, unlike a painted outline.
 */
export function lesionOutlines(labels: NumberArray, width: number, height: number): LesionOutline[] {
  const byLabel = new Map<number, LesionOutline>();
  let n = 0;
  for (let r = 0; r < height; r++) {
    for (let c = 0; c < width; c++, n++) {
      const l = labels[n];
      if (l === 0) continue;
      let o = byLabel.get(l);
      if (!o) {
        o = { label: l, edges: [], anchor: { col: c, row: r } };
        byLabel.set(l, o);
      }
      const e = o.edges;
      if (r === 0 || labels[n - width] !== l) e.push(c, r, c + 1, r);
      if (r === height - 1 || labels[n + width] !== l) e.push(c, r + 1, c + 1, r + 1);
      if (c === 0 || labels[n - 1] !== l) e.push(c, r, c, r + 1);
      if (c === width - 1 || labels[n + 1] !== l) e.push(c + 1, r, c + 1, r + 1);
    }
  }
  return [...byLabel.values()];
}

/** Runs of set pixels in a slice of a 0/1 mask, row by row: row, first column, one past the last. */
export function maskRuns(mask: NumberArray, width: number, height: number): number[] {
  const runs: number[] = [];
  for (let r = 0, n = 0; r < height; r++) {
    let start = -1;
    for (let c = 0; c < width; c++, n++) {
      if (mask[n] !== 0) {
        if (start < 0) start = c;
      } else if (start >= 0) {
        runs.push(r, start, c);
        start = -1;
      }
    }
    if (start >= 0) runs.push(r, start, width);
  }
  return runs;
}
