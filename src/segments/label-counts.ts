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
  if (data instanceof Uint8Array && data.byteOffset % 4 === 0) {
    // Label maps are long runs of one value: a word of four equal bytes is counted in one step.
    const hist = new Float64Array(256);
    const words = new Uint32Array(data.buffer, data.byteOffset, data.length >>> 2);
    for (let w = 0; w < words.length; w++) {
      const x = words[w];
      const b = x & 0xff;
      if (Math.imul(b, 0x01010101) >>> 0 === x) hist[b] += 4;
      else {
        hist[b]++;
        hist[(x >>> 8) & 0xff]++;
        hist[(x >>> 16) & 0xff]++;
        hist[x >>> 24]++;
      }
    }
    for (let n = words.length * 4; n < data.length; n++) hist[data[n]]++;
    for (let h = 0; h < 256; h++) if (hist[h] > 0) raw.set(h, hist[h]);
  } else if (data instanceof Uint8Array || data instanceof Int8Array || data instanceof Uint16Array || data instanceof Int16Array) {
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
