import { DEFAULT_SETTINGS, type WindowPreset } from '../../src/model/records.js';
import type { NumberArray } from './slice.js';

/** A display window in the scan's units (HU for CT): values from centre − width/2 to centre + width/2 run black to white. */
export interface WindowLevel {
  centre: number;
  width: number;
}

/**
 * The app's CT presets (liver W160 L60, abdomen soft tissue W400 L40, bone W1800 L400: common
 * practice), kept in the store's settings so a site can change them.
 */
export const CT_PRESETS: readonly WindowPreset[] = DEFAULT_SETTINGS.windowPresets;

/** Narrowest window the controls allow, so a drag never divides by zero. */
export const MIN_WIDTH = 1;

/** Grey level 0–255 of one physical value (linear ramp, clipped at both ends). */
export function grayOf(value: number, wl: WindowLevel): number {
  const width = Math.max(MIN_WIDTH, wl.width);
  const g = ((value - (wl.centre - width / 2)) / width) * 255;
  return g <= 0 ? 0 : g >= 255 ? 255 : Math.round(g);
}

/**
 * Window from drag: moving right widens, moving down raises the level (lower values turn brighter
 * sooner), the direction most reading software shares (common practice). Step scales with the width
 * so fine and coarse windows both respond.
 */
export function dragWindow(start: WindowLevel, dxPx: number, dyPx: number): WindowLevel {
  const perPx = Math.max(1, start.width / 200);
  return { centre: Math.round(start.centre + dyPx * perPx), width: Math.max(MIN_WIDTH, Math.round(start.width + dxPx * perPx)) };
}

export interface ValueSummary {
  min: number;
  max: number;
  /** 1st to 99th percentile of the values, as a window: a fair start for MR, whose values have no fixed scale. */
  auto: WindowLevel;
  /** The value range looks like Hounsfield units (air near −1000). */
  looksLikeCt: boolean;
}

const BINS = 2048;

/**
 * Stored-value histogram of a small integer type (a CT is int16) in one pass, with the offset that
 * maps a value to its bin; null for wider or floating types.
 */
function integerHistogram(data: NumberArray): { hist: Float64Array; offset: number } | null {
  const offset = data instanceof Int8Array ? 128 : data instanceof Int16Array ? 32768 : 0;
  const size = data instanceof Uint8Array || data instanceof Int8Array ? 256 : data instanceof Uint16Array || data instanceof Int16Array ? 65536 : 0;
  if (size === 0) return null;
  const hist = new Float64Array(size);
  for (let q = 0; q < data.length; q++) hist[data[q] + offset]++;
  return { hist, offset };
}

/**
 * Range and robust window of a volume's physical values, by a histogram (no sorting). Integer scans
 * take one pass over the voxels, the rest of the work being on their histogram; other types two.
 */
export function summariseValues(data: NumberArray, slope: number, inter: number): ValueSummary {
  const n = data.length;
  if (n === 0) return { min: 0, max: 0, auto: { centre: 0, width: MIN_WIDTH }, looksLikeCt: false };
  const ints = integerHistogram(data);
  let lo = Infinity, hi = -Infinity;
  if (ints) {
    const { hist, offset } = ints;
    for (let h = 0; h < hist.length; h++) if (hist[h] > 0) { lo = h - offset; break; }
    for (let h = hist.length - 1; h >= 0; h--) if (hist[h] > 0) { hi = h - offset; break; }
  } else {
    for (let q = 0; q < n; q++) {
      const v = data[q];
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
  }
  const a = lo * slope + inter, b = hi * slope + inter;
  const min = Math.min(a, b), max = Math.max(a, b);
  if (!(max > min)) return { min, max, auto: { centre: min, width: MIN_WIDTH }, looksLikeCt: false };
  const counts = new Float64Array(BINS);
  const scale = (BINS - 1) / (max - min);
  const add = (v: number, count: number) => {
    if (v === v) counts[Math.floor((v - min) * scale)] += count;
  };
  if (ints) ints.hist.forEach((count, h) => { if (count > 0) add((h - ints.offset) * slope + inter, count); });
  else for (let q = 0; q < n; q++) add(data[q] * slope + inter, 1);
  const at = (fraction: number) => {
    const want = fraction * n;
    let seen = 0;
    for (let k = 0; k < BINS; k++) {
      seen += counts[k];
      if (seen >= want) return min + k / scale;
    }
    return max;
  };
  const p1 = at(0.01), p99 = at(0.99);
  return {
    min,
    max,
    auto: { centre: Math.round(((p1 + p99) / 2) * 10) / 10, width: Math.max(MIN_WIDTH, Math.round((p99 - p1) * 10) / 10) },
    looksLikeCt: min <= -500 && min >= -3100 && max < 5000,
  };
}
