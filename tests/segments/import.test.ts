import { describe, expect, it } from 'vitest';
import { importSegmentMap } from '../../src/segments/import.js';
import { defaultScheme, parseScheme } from '../../src/segments/scheme.js';
import { segmentAtWorld } from '../../src/segments/segment-map.js';
import { makeVolume } from '../../src/volume/volume.js';
import { FalciformError } from '../../src/errors.js';

const EYE = [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1];
const vol = (values: number[], dims: [number, number, number] = [values.length, 1, 1]) =>
  makeVolume(dims, Uint8Array.from(values), EYE, 'uint8');

describe('default scheme (source: contracts.md, segment scheme)', () => {
  it('maps 1–8 to I–VIII', () => {
    expect([...defaultScheme()]).toEqual([[1, 'I'], [2, 'II'], [3, 'III'], [4, 'IV'], [5, 'V'], [6, 'VI'], [7, 'VII'], [8, 'VIII']]);
  });

  it('reads 4 as IV when 9 is absent, and 4 as IVa with 9 as IVb when 9 is present', () => {
    const whole = importSegmentMap(vol([0, 4, 5]), 'default', 'a.nii');
    expect(whole.map.scheme.get(4)).toBe('IV');
    expect(whole.map.scheme.has(9)).toBe(false);
    const split = importSegmentMap(vol([0, 4, 9, 5]), 'default', 'b.nii');
    expect(split.map.scheme.get(4)).toBe('IVa');
    expect(split.map.scheme.get(9)).toBe('IVb');
    expect(segmentAtWorld(split.map, [2, 0, 0])).toBe('IVb');
    expect(split.unknownLabels).toEqual([]);
    expect(split.warnings).toEqual([]);
  });

  it('reports values the scheme does not know and reads them as background', () => {
    const r = importSegmentMap(vol([0, 1, 12, 12, 10, 2]), 'default', 'seg.nii.gz');
    expect(r.unknownLabels).toEqual([10, 12]);
    expect(r.warnings).toEqual(['seg.nii.gz: label values 10, 12 not in the segment scheme; 3 voxels read as background']);
    expect(segmentAtWorld(r.map, [2, 0, 0])).toBeNull();
  });

  it('refuses a map with no segment voxel, naming the file', () => {
    expect(() => importSegmentMap(vol([0, 0, 12, 0]), 'default', 'empty.nii')).toThrow(
      /^empty\.nii: no voxel carries a segment label of the scheme \(values found: 0, 12\)$/,
    );
    try {
      importSegmentMap(vol([0, 0]), 'default', 'zero.nii');
    } catch (e) {
      expect((e as FalciformError).kind).toBe('bad-file');
    }
  });

  it('reads labels after scaling, from wide and float types', () => {
    const scaled = makeVolume([3, 1, 1], Int16Array.from([100, 101, 108]), EYE, 'int16', 1, -100);
    expect(importSegmentMap(scaled, 'default', 's.nii').unknownLabels).toEqual([]);
    expect(segmentAtWorld(importSegmentMap(scaled, 'default', 's.nii').map, [2, 0, 0])).toBe('VIII');
    const float = makeVolume([4, 1, 1], Float32Array.from([0, 7, 7, 2.5]), EYE, 'float32');
    const r = importSegmentMap(float, 'default', 'f.nii');
    expect(r.unknownLabels).toEqual([2.5]);
    const wide = makeVolume([3, 1, 1], Int32Array.from([70000, 3, 3]), EYE, 'int32');
    expect(importSegmentMap(wide, 'default', 'w.nii').unknownLabels).toEqual([70000]);
  });
});

describe('scheme files (source: contracts.md, segment scheme)', () => {
  it('parses values to names; values not listed are background', () => {
    const s = parseScheme('{"labels": {"1": "I", "2": "II", "4": "IVa", "9": "IVb", "20": "VIII"}}', 'scheme.json');
    expect([...s]).toEqual([[1, 'I'], [2, 'II'], [4, 'IVa'], [9, 'IVb'], [20, 'VIII']]);
    const r = importSegmentMap(vol([0, 20, 5]), s, 'seg.nii');
    expect(r.unknownLabels).toEqual([5]);
    expect(segmentAtWorld(r.map, [1, 0, 0])).toBe('VIII');
  });

  it.each([
    ['{"labels": ', /scheme\.json: not valid JSON/],
    ['{"segments": {}}', /scheme\.json: a segment scheme needs an object "labels"/],
    ['{"labels": {"1": "IX"}}', /label 1: unknown segment name "IX"/],
    ['{"labels": {"one": "I"}}', /label value "one" is not a whole number/],
    ['{"labels": {"0": "I"}}', /label value 0 is background/],
    ['{"labels": {}}', /lists no label values/],
    ['{"labels": {"4": "IV", "9": "IVb"}}', /IV together with IVa\/IVb/],
  ])('refuses %s', (text, message) => {
    expect(() => parseScheme(text, 'scheme.json')).toThrow(message);
    try {
      parseScheme(text, 'scheme.json');
    } catch (e) {
      expect((e as FalciformError).kind).toBe('bad-file');
    }
  });
});

describe('import checks shared by the app and the command line', () => {
  it('refuses NaN labels and a map away from its scan; warns of implausible voxel sizes and liver volume', async () => {
    const { checkLiverVolume, checkOverlap, checkSpacing, gridOf } = await import('../../src/segments/import-checks.js');
    const nan = makeVolume([3, 1, 1], Float32Array.from([1, NaN, 2]), EYE, 'float32');
    expect(() => importSegmentMap(nan, 'default', 'n.nii')).toThrow(/^n\.nii: holds the value NaN/);
    const metre = makeVolume([2, 2, 2], new Uint8Array(8), [1000, 0, 0, 0, 0, 1000, 0, 0, 0, 0, 1000, 0, 0, 0, 0, 1], 'uint8');
    expect(checkSpacing(metre, 'm.nii')[0]).toMatch(/^m\.nii: voxel sizes 1\.00e\+3 × .* outside the plausible/);
    // 10 m away: the map's box and the scan's box share no point.
    const far = makeVolume([2, 2, 2], new Uint8Array(8), [1, 0, 0, 10_000, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1], 'uint8');
    const scan = makeVolume([2, 2, 2], new Int16Array(8), EYE, 'int16');
    expect(() => checkOverlap(gridOf(far, 'far.nii'), gridOf(scan, 'scan.nii'))).toThrow(/^far\.nii: does not overlap the scan scan\.nii/);
    expect(checkLiverVolume(1_000_000, 'm.nii')[0]).toMatch(/liver volume 1000000 mL is above the plausible 6000 mL/);
    expect(checkLiverVolume(1500, 'm.nii')).toEqual([]);
    expect(() => checkLiverVolume(Infinity, 'm.nii')).toThrow(/liver volume of Infinity/);
  });
});
