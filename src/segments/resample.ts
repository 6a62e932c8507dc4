import { multiply } from '../geometry/mat4.js';
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
  const [sx, sy, sz] = src.dims;
  const [nx, ny, nz] = target.dims;
  const data = src.data;
  const slope = src.slope;
  const inter = src.inter;
  const codeOf = new Map<number, number>();
  for (const [value, name] of map.scheme) codeOf.set(value, SEGMENT_CODES[name]);
  // Target index → source index in one affine, so each voxel costs three multiply-adds.
  const T = multiply(src.inverse, target.affine);
  const ai = T[0], bi = T[4], ci = T[8];
  const out = new Uint8Array(nx * ny * nz);
  // Label maps come in long runs of one value: remember the last lookup.
  let lastRaw = Number.NaN;
  let lastCode = 0;
  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      const a = T[1] * j + T[2] * k + T[3];
      const b = T[5] * j + T[6] * k + T[7];
      const c = T[9] * j + T[10] * k + T[11];
      const row = nx * (j + ny * k);
      for (let i = 0; i < nx; i++) {
        const si = Math.round(a + ai * i), sj = Math.round(b + bi * i), sk = Math.round(c + ci * i);
        if (si < 0 || sj < 0 || sk < 0 || si >= sx || sj >= sy || sk >= sz) continue;
        const raw = data[si + sx * (sj + sy * sk)];
        if (raw !== lastRaw) {
          lastRaw = raw;
          lastCode = codeOf.get(raw * slope + inter) ?? 0;
        }
        out[row + i] = lastCode;
      }
    }
  }
  return out;
}
