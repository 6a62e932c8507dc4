import { resampleNearest, sameGrid } from '../volume/resample.js';
import type { Volume } from '../volume/volume.js';
import { SEGMENT_CODES } from './scheme.js';
import type { SegmentMap } from './segment-map.js';

/**
 * The map's segments on another grid (for display over a scan): for each target voxel the map voxel
 * nearest the same world point, the same lookup as `segmentAtWorld`. Values are the default scheme's
 * codes whatever the map's scheme (0 background, 1–8 I–VIII, 4 also IVa, 9 IVb), so one colour table
 * serves every map; i fastest, like `Volume.data`. May be the map's own voxel array (not a copy).
 */
export function resampleLabels(map: SegmentMap, target: Volume): Uint8Array {
  const src = map.labels;
  const codeOf = new Map<number, number>();
  for (const [value, name] of map.scheme) codeOf.set(value, SEGMENT_CODES[name]);
  // The usual case, a default-scheme uint8 map on the scan's own grid: its stored values already are
  // the codes, which the counts the map carries show without another pass over the voxels.
  const counts = map.labelCounts;
  if (src.data instanceof Uint8Array && src.slope === 1 && src.inter === 0 && counts && sameGrid(src, target) &&
    [...counts.keys()].every((v) => v === 0 || codeOf.get(v) === v)) return src.data;
  const raw = resampleNearest(src.data, src, target);
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
