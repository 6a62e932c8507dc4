import { describe, expect, it } from 'vitest';
import { buildSegmentMap } from '../../src/segments/build.js';
import { importSegmentMap } from '../../src/segments/import.js';
import { countLabelValues } from '../../src/segments/label-counts.js';
import { defaultScheme } from '../../src/segments/scheme.js';
import { liverVolumeMl, segmentVolumes } from '../../src/segments/volumes.js';
import { makeVolume } from '../../src/volume/volume.js';
import { fastRule, gridAffine, liverVolume, phantomLandmarks, rotation, LIVER, type V3 } from './phantom.js';

/** Segment volumes (mL) of the analytic phantom by midpoint counting on a 0.5-mm world grid. */
function integrate(splitIV: boolean): Map<string, number> {
  const rule = fastRule(phantomLandmarks(), splitIV);
  const h = 0.5;
  const counts = new Map<string, number>();
  const [cx, cy, cz] = LIVER.centre, [ax, ay, az] = LIVER.semiAxes;
  for (let z = cz - az + h / 2; z < cz + az; z += h) {
    for (let y = cy - ay + h / 2; y < cy + ay; y += h) {
      for (let x = cx - ax + h / 2; x < cx + ax; x += h) {
        const s = rule(x, y, z);
        if (s !== null) counts.set(s, (counts.get(s) ?? 0) + 1);
      }
    }
  }
  return new Map([...counts].map(([s, c]) => [s, (c * h ** 3) / 1000]));
}

// A voxel cut by a segment border counts wholly or not at all: an error between −½ and +½ voxel
// that averages out when the border is oblique to the grid, leaving about 0.3 voxel × √(cut voxels).
// On the 0.8×0.8×2.5-mm grid (~25 000 cut voxels of 1.6 mm³ per segment) that is ~0.1 mL, on the
// 2.2×2.2×4-mm grid (~5 000 of 19 mm³) ~0.4 mL. Tolerances are four times that against the smallest
// segment (~140 mL): 0.3 % and 1.1 %, rounded up to 0.5 % and 1.5 %. The 0.5-mm reference's own
// error is ~0.01 mL by the same estimate.
const CASES: { name: string; dims: V3; spacing: V3; R: number[]; relTol: number }[] = [
  { name: 'oblique 0.8×0.8×2.5 mm', dims: [260, 230, 90], spacing: [0.8, 0.8, 2.5], R: rotation(0.2, -0.15, 0.35), relTol: 0.005 },
  { name: 'flipped axes 0.8×0.8×2.5 mm', dims: [260, 210, 60], spacing: [-0.8, -0.8, 2.5], R: rotation(0, 0, 0.05), relTol: 0.005 },
  { name: 'coarse oblique 2.2×2.2×4 mm', dims: [100, 80, 40], spacing: [2.2, 2.2, 4], R: rotation(0.1, 0.2, 0.3), relTol: 0.015 },
];

describe('segment volumes against numeric integration at 0.5 mm (source: analytic phantom, midpoint rule)', () => {
  const reference = { false: integrate(false), true: integrate(true) };
  for (const c of CASES) {
    for (const splitIV of [false, true]) {
      it(`${c.name}, IV ${splitIV ? 'split' : 'whole'}`, () => {
        const affine = gridAffine(c.R, c.spacing, c.dims, LIVER.centre);
        const { map } = buildSegmentMap(liverVolume(c.dims, affine), phantomLandmarks(), { splitIV });
        const vols = segmentVolumes(map);
        const ref = reference[splitIV ? 'true' : 'false'];
        expect(vols.map((v) => v.segment)).toEqual(
          splitIV ? ['II', 'III', 'IVa', 'IVb', 'V', 'VI', 'VII', 'VIII'] : ['II', 'III', 'IV', 'V', 'VI', 'VII', 'VIII'],
        );
        for (const v of vols) {
          const want = ref.get(v.segment) as number;
          expect(Math.abs(v.volumeMl / want - 1), `${v.segment}: ${v.volumeMl} vs ${want} mL`).toBeLessThan(c.relTol);
        }
        const sum = vols.reduce((s, v) => s + v.volumeMl, 0);
        expect(liverVolumeMl(map)).toBeCloseTo(sum, 9);
      });
    }
  }

  it('liver volume matches the ellipsoid volume 4/3·π·abc (source: geometry)', () => {
    const c = CASES[0];
    const affine = gridAffine(c.R, c.spacing, c.dims, LIVER.centre);
    const { map } = buildSegmentMap(liverVolume(c.dims, affine), phantomLandmarks());
    const [a, b, cc] = LIVER.semiAxes;
    const exact = ((4 / 3) * Math.PI * a * b * cc) / 1000;
    expect(Math.abs(liverVolumeMl(map) / exact - 1)).toBeLessThan(0.002);
  });
});

describe('segment volumes from an imported label volume', () => {
  it('leaves out absent segments, keeps the order I, II, …, uses the voxel volume |det A| and reads scaled values', () => {
    // 2×2×2 mm voxels of 8 mm³; stored value v means v * 2 - 2 (so stored 2 is segment II, stored 5 is VIII).
    const data = new Int16Array([1, 2, 2, 5, 5, 5, 3, 3]);
    const affine = [0, 0, 2, 0, 2, 0, 0, 0, 0, -2, 0, 0, 0, 0, 0, 1];
    const map = { labels: makeVolume([2, 2, 2], data, affine, 'int16', 2, -2), scheme: defaultScheme() };
    expect(segmentVolumes(map)).toEqual([
      { segment: 'II', volumeMl: 0.016 },
      { segment: 'IV', volumeMl: 0.016 },
      { segment: 'VIII', volumeMl: 0.024 },
    ]);
    expect(liverVolumeMl(map)).toBeCloseTo(0.056, 12);
  });
});

describe('label counts a map carries', () => {
  it('are those a fresh count gives, for a built map and an imported one', () => {
    const c = CASES[2];
    const affine = gridAffine(c.R, c.spacing, c.dims, LIVER.centre);
    for (const splitIV of [false, true]) {
      const { map } = buildSegmentMap(liverVolume(c.dims, affine), phantomLandmarks(), { splitIV });
      const fresh = countLabelValues(map.labels);
      expect(map.labelCounts).toEqual(fresh);
      const imported = importSegmentMap(map.labels, 'default', 'segments.nii').map;
      expect(imported.labelCounts).toEqual(fresh);
      expect(segmentVolumes(imported)).toEqual(segmentVolumes({ labels: imported.labels, scheme: imported.scheme }));
    }
  });
});

describe('label counting of a uint8 map, four voxels a step', () => {
  it('counts runs, mixed words and a ragged tail as one voxel at a time does', () => {
    // Runs of one value (most of a map) beside words of mixed bytes (segment borders), aligned and not.
    const n = 4096 + 3;
    const bytes = new Uint8Array(n + 1);
    let seed = 11;
    for (let q = 0; q < bytes.length; q++) {
      seed = (Math.imul(seed, 1103515245) + 12345) >>> 0;
      bytes[q] = q < 2000 ? Math.floor(q / 97) % 3 : (seed >>> 24) % 10;
    }
    for (const data of [bytes.subarray(0, n), bytes.subarray(1)]) {
      const byHand = new Map<number, number>();
      for (const x of data) byHand.set(x, (byHand.get(x) ?? 0) + 1);
      const counted = countLabelValues(makeVolume([data.length, 1, 1], data, [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1], 'uint8'));
      expect(new Map([...counted].sort((a, b) => a[0] - b[0]))).toEqual(new Map([...byHand].sort((a, b) => a[0] - b[0])));
    }
  });
});
