import { resampleNearest } from '../volume/resample.js';
import type { Volume } from '../volume/volume.js';
import { SEGMENT_CODES } from './scheme.js';
import type { SegmentMap } from './segment-map.js';

/**
 * The map's segments on another grid (for display over a scan): for each target voxel the map voxel
 * nearest the same world point, the same lookup as `segmentAtWorld`. Values are the default scheme's
 * codes whatever the map's scheme (0 background, 1–8 I–VIII, 4 also IVa, 9 IVb), so one colour table
 * serves every map; i fastest, like `Volume.data`.
 */
export function resampleLabels(map: SegmentMap, target: Volume): Uint8Array {
  const src = map.labels;
  const raw = resampleNearest(src.data, src, target);
  const codeOf = new Map<number, number>();
  for (const [value, name] of map.scheme) codeOf.set(value, SEGMENT_CODES[name]);
  const out = new Uint8Array(raw.length);
  // Label maps come in long runs of one value: remember the last lookup.
  let lastRaw = Number.NaN;
  let lastCode = 0;
  for (let n = 0; n < raw.length; n++) {
    const r = raw[n];
    if (r !== lastRaw) {
      lastRaw = r;
      lastCode = codeOf.get(r * src.slope + src.inter) ?? 0;
    }
    out[n] = lastCode;
  }
  return out;
}
