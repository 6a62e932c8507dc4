import type { Volume } from '../volume/volume.js';
import type { SegmentMap } from './segment-map.js';

/** The counts the map carries, else counted now. */
export function labelCountsOf(map: SegmentMap): ReadonlyMap<number, number> {
  return map.labelCounts ?? countLabelValues(map.labels);
}

/**
 * Voxel count per distinct label value (after scaling), background included. Small integer types
 * use a histogram; wider types count runs, which are long in label maps, so the Map is touched
 * once per run rather than once per voxel.
 */
export function countLabelValues(v: Volume): Map<number, number> {
  const data = v.data;
  const raw = new Map<number, number>();
  if (data instanceof Uint8Array || data instanceof Int8Array || data instanceof Uint16Array || data instanceof Int16Array) {
    const offset = data instanceof Int8Array ? 128 : data instanceof Int16Array ? 32768 : 0;
    const hist = new Float64Array(data instanceof Uint8Array || data instanceof Int8Array ? 256 : 65536);
    for (let n = 0; n < data.length; n++) hist[data[n] + offset]++;
    for (let h = 0; h < hist.length; h++) if (hist[h] > 0) raw.set(h - offset, hist[h]);
  } else if (data.length > 0) {
    let run = data[0];
    let len = 0;
    for (let n = 0; n < data.length; n++) {
      const x = data[n];
      if (x === run) {
        len++;
        continue;
      }
      raw.set(run, (raw.get(run) ?? 0) + len);
      run = x;
      len = 1;
    }
    raw.set(run, (raw.get(run) ?? 0) + len);
  }
  if (v.slope === 1 && v.inter === 0) return raw;
  const out = new Map<number, number>();
  for (const [r, c] of raw) {
    const value = r * v.slope + v.inter;
    out.set(value, (out.get(value) ?? 0) + c);
  }
  return out;
}
