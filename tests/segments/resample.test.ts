import { describe, expect, it } from 'vitest';
import { buildSegmentMap } from '../../src/segments/build.js';
import { importSegmentMap } from '../../src/segments/import.js';
import { resampleLabels } from '../../src/segments/volumes.js';
import { parseScheme, SEGMENT_CODES } from '../../src/segments/scheme.js';
import { segmentAtWorld } from '../../src/segments/segment-map.js';
import { makeVolume } from '../../src/volume/volume.js';
import { gridAffine, liverVolume, phantomLandmarks, rotation, worldOf, LIVER, type V3 } from './phantom.js';

describe('segment map on another grid (source: brief, geometry conventions: always through world coordinates)', () => {
  const mapDims: V3 = [130, 115, 45];
  const mapAffine = gridAffine(rotation(0.2, -0.15, 0.35), [1.6, 1.6, 5], mapDims, LIVER.centre);
  const { map } = buildSegmentMap(liverVolume(mapDims, mapAffine), phantomLandmarks(), { splitIV: true });

  it('gives each target voxel the segment found at its world point (nearest voxel)', () => {
    const dims: V3 = [120, 100, 70];
    const affine = gridAffine(rotation(-0.1, 0.3, -0.2), [-1.7, 1.7, 2.9], dims, [-25, 5, 18]);
    const target = makeVolume(dims, new Uint8Array(dims[0] * dims[1] * dims[2]), affine, 'uint8');
    const out = resampleLabels(map, target);
    let n = 0, mismatches = 0, segmentVoxels = 0;
    for (let k = 0; k < dims[2]; k++) for (let j = 0; j < dims[1]; j++) for (let i = 0; i < dims[0]; i++, n++) {
      const s = segmentAtWorld(map, worldOf(affine, i, j, k));
      const want = s === null ? 0 : SEGMENT_CODES[s];
      if (want !== 0) segmentVoxels++;
      if (out[n] !== want) mismatches++;
    }
    expect(segmentVoxels).toBeGreaterThan(100_000);
    expect(mismatches).toBe(0);
  });

  it('returns the default codes whatever the scheme, 0 outside the map', () => {
    const labels = makeVolume([3, 1, 1], Uint8Array.from([30, 31, 0]), [2, 0, 0, 0, 0, 2, 0, 0, 0, 0, 2, 0, 0, 0, 0, 1], 'uint8');
    const custom = { labels, scheme: parseScheme('{"labels": {"30": "VII", "31": "IVb"}}', 's.json') };
    const target = makeVolume([5, 1, 1], new Uint8Array(5), [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1], 'uint8');
    // Target x = 0..4 mm; source voxels at 0, 2, 4 mm (ties at 1 and 3 mm round up).
    expect([...resampleLabels(custom, target)]).toEqual([7, 9, 9, 0, 0]);
  });

  it('on the same grid, a default-scheme map is its own codes; unknown values still turn to background', () => {
    const affine = [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1];
    const same = makeVolume([6, 1, 1], new Uint8Array(6), affine, 'uint8');
    const clean = importSegmentMap(makeVolume([6, 1, 1], Uint8Array.from([0, 1, 4, 9, 8, 8]), affine, 'uint8'), 'default', 's.nii').map;
    const codes = resampleLabels(clean, same);
    expect([...codes]).toEqual([0, 1, 4, 9, 8, 8]);
    expect(codes).toBe(clean.labels.data);
    // 12 is no segment of the default scheme: background on screen as in the analysis.
    const odd = importSegmentMap(makeVolume([6, 1, 1], Uint8Array.from([0, 1, 12, 9, 8, 8]), affine, 'uint8'), 'default', 's.nii').map;
    expect([...resampleLabels(odd, same)]).toEqual([0, 1, 0, 9, 8, 8]);
  });
});
