import { describe, expect, it } from 'vitest';
import { isFalciformError } from '../../src/errors.js';
import type { Mark } from '../../src/lesions/marks.js';
import { liverVolumeMl, segmentVolumes } from '../../src/segments/volumes.js';
import { analyzeVisit, DEFAULT_MARGIN_MM } from '../../src/visit/analyze.js';
import { noiseScan, segmentMap, volume, type Dims } from '../lesions/fixtures.js';

// A 1 × 1 × 2 mm grid: V for i < 20, VIII for i ≥ 20 (rows j < 28), background beyond.
const dims: Dims = [40, 30, 20];
const affine = [1, 0, 0, -20, 0, 1, 0, -15, 0, 0, 2, -20, 0, 0, 0, 1];
const labels = new Uint8Array(40 * 30 * 20);
for (let n = 0; n < labels.length; n++) {
  const i = n % 40, j = Math.floor(n / 40) % 30;
  if (j < 28) labels[n] = i < 20 ? 5 : 8;
}
const map = segmentMap(volume(dims, labels, affine, 'uint8'));
const scan = volume(dims, noiseScan(dims), affine, 'int16');

/** World point of voxel (i, j, k). */
const w = (i: number, j: number, k: number): [number, number, number] => [i - 20, j - 15, 2 * k - 20];

function mark(id: string, centre: [number, number, number], longest: number, extra: Partial<Mark> = {}): Mark {
  return { id, centreMm: centre, longestAxialMm: longest, shortAxisMm: longest / 2, endpointsMm: null, ...extra };
}

describe('analyzeVisit', () => {
  it('reports segment volumes and the liver volume of the map', () => {
    // Source: segment volumes by their own module; liver = every labelled voxel.
    const a = analyzeVisit({ scan, segments: map, marks: [] });
    expect(a.segments).toEqual(segmentVolumes(map));
    expect(a.segments.map((s) => s.segment)).toEqual(['V', 'VIII']);
    expect(a.liverVolumeMl).toBeCloseTo(liverVolumeMl(map), 9);
    expect(a.liverVolumeMl).toBeCloseTo((40 * 28 * 20 * 2) / 1000, 9);
    expect(a.lesions).toEqual([]);
  });

  it('places marks by their centre and measures their margin from the calipers', () => {
    // Source: the definitions (brief, "Measures"; border surface, docs/formats.md). The nearest VIII
    // voxel to x = w(12) is w(20); its face, the border, lies half a 1 mm voxel nearer: 7.5 mm.
    const a = analyzeVisit({
      scan,
      segments: map,
      marks: [mark('M7', w(12, 10, 10), 6, { viableAxialMm: 4 }), mark('M2', w(25, 10, 10), 14), mark('M3', w(10, 29, 10), 4)],
    });
    const [m7, m2, m3] = a.lesions;
    expect(m7).toMatchObject({
      id: 'M7', source: 'mark', segment: 'V', segmentFractions: { V: 1 }, volumeMl: null, longestAxialMm: 6, shortAxisMm: 3,
      nearestOtherSegment: 'VIII', marginAlert: true, viableAxialMm: 4, segmentWarning: null,
    });
    expect(m7.marginMm).toBeCloseTo(7.5 - 3, 12);
    // 5.5 mm from V's border face at i = 19.5, less half of 14 mm: floored at 0.
    expect(m2).toMatchObject({ segment: 'VIII', marginMm: 0, nearestOtherSegment: 'V', marginAlert: true });
    expect('viableAxialMm' in m2).toBe(false);
    // Row j = 29 is background, 2 mm from the last liver row: placed in V with a warning.
    expect(m3.segment).toBe('V');
    expect(a.warnings).toEqual([m3.segmentWarning]);
    expect(m3.segmentWarning).toMatch(/^M3: centre falls on background.*segment V.*\(2\.0 mm away\)/);
  });

  it('alerts at or within the set margin, 10 mm by default (common practice)', () => {
    const m = [mark('A', w(5, 10, 10), 2)]; // 14.5 mm to VIII's face at x = w(19.5), less 1 mm: 13.5 mm
    expect(DEFAULT_MARGIN_MM).toBe(10);
    expect(analyzeVisit({ scan, segments: map, marks: m }).lesions[0]).toMatchObject({ marginMm: 13.5, marginAlert: false });
    expect(analyzeVisit({ scan, segments: map, marks: m, marginMm: 14 }).lesions[0].marginAlert).toBe(true);
    expect(analyzeVisit({ scan, segments: map, marks: m, marginMm: 13.5 }).lesions[0].marginAlert).toBe(true);
    expect(analyzeVisit({ scan, segments: map, marks: m, marginMm: 13.4 }).lesions[0].marginAlert).toBe(false);
    // A mark whose edge reaches the border surface reads 0 and alerts at a set margin of 0.
    const touching = [mark('B', w(15, 10, 10), 9)]; // 4.5 mm to the face, less 4.5 mm
    expect(analyzeVisit({ scan, segments: map, marks: touching, marginMm: 0 }).lesions[0]).toMatchObject({ marginMm: 0, marginAlert: true });
  });

  it('numbers mask lesions L1, L2 … before the marks, which keep their ids', () => {
    const d = new Uint8Array(labels.length);
    d[5 + 40 * (5 + 30 * 5)] = 1;
    d[30 + 40 * (3 + 30 * 2)] = 1;
    const lesionMask = volume(dims, d, affine, 'uint8');
    const a = analyzeVisit({ scan, segments: map, lesionMask, marks: [mark('T9', w(10, 10, 10), 3)] });
    expect(a.lesions.map((l) => [l.id, l.source, l.segment])).toEqual([['L1', 'mask', 'VIII'], ['L2', 'mask', 'V'], ['T9', 'mark', 'V']]);
    expect(a.lesions[0].volumeMl).toBeCloseTo(0.002, 12);
    expect(() => analyzeVisit({ scan, segments: map, lesionMask, marks: [mark('L2', w(10, 10, 10), 3)] })).toThrow(/mark "L2" has the id of a lesion/);
  });

  it('warns about an empty lesion mask and refuses a negative margin', () => {
    const a = analyzeVisit({ scan, segments: map, lesionMask: volume(dims, new Uint8Array(labels.length), affine, 'uint8'), lesionFile: 'v1/lesions.nii.gz' });
    expect(a.lesions).toEqual([]);
    expect(a.warnings).toEqual(['v1/lesions.nii.gz: holds no lesion voxels']);
    let err: unknown;
    try {
      analyzeVisit({ scan, segments: map, marks: [], marginMm: -1 });
    } catch (e) {
      err = e;
    }
    expect(isFalciformError(err) && err.kind).toBe('bad-input');
  });
});
