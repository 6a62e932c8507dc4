import { describe, expect, it } from 'vitest';
import { FalciformError } from '../../src/errors.js';
import { SEGMENT_NAMES, segmentAtWorld, type SegmentName } from '../../src/segments/segment-map.js';
import { liverVolumeMl } from '../../src/segments/volumes.js';
import { makeVolume } from '../../src/volume/volume.js';
import { visitVolumetry } from '../../src/remnant/volumetry.js';
import { gridAffine, rotation, sphereMask, worldOf, type V3 } from '../segments/phantom.js';
import { blockMap, BLOCK_ML } from './phantom.js';

const byName = (v: ReturnType<typeof visitVolumetry>, s: SegmentName) => v.segments.find((x) => x.segment === s)!;

describe('segment sums equal the liver volume (source: the brief, volume = voxel count × voxel volume)', () => {
  it('eight 24 mL blocks add up to 192 mL, as the map itself counts it', () => {
    const map = blockMap();
    const v = visitVolumetry(map);
    expect(v.segments.map((s) => s.segment)).toEqual(['I', 'II', 'III', 'IV', 'V', 'VI', 'VII', 'VIII']);
    for (const s of v.segments) expect(s.volumeMl).toBeCloseTo(BLOCK_ML, 9);
    // Hand count: 8 blocks × 3000 voxels × 0.008 mL = 192 mL.
    expect(v.liverVolumeMl).toBeCloseTo(192, 9);
    expect(v.liverVolumeMl).toBe(v.segments.reduce((a, s) => a + s.volumeMl, 0));
    expect(v.liverVolumeMl).toBeCloseTo(liverVolumeMl(map), 9);
    expect(v.tumourVolumeMl).toBe(0);
    expect(v.tumourFrom).toBe('none');
  });

  it('a map with IV split keeps IVa and IVb apart and still sums to the liver', () => {
    const v = visitVolumetry(blockMap(true));
    expect(v.segments.map((s) => s.segment)).toEqual(['I', 'II', 'III', 'IVa', 'IVb', 'V', 'VI', 'VII', 'VIII']);
    expect(byName(v, 'IVa').volumeMl).toBeCloseTo(9.6, 9); // 1200 × 0.008
    expect(byName(v, 'IVb').volumeMl).toBeCloseTo(14.4, 9); // 1800 × 0.008
    expect(v.liverVolumeMl).toBeCloseTo(192, 9);
  });
});

describe('tumour per segment from a lesion mask on another grid (through world coordinates)', () => {
  it('shifted 1 mm grid: counts worked by hand', () => {
    // Lesion grid: 1 mm voxels, origin at (0.25, 0.25, 0.25) mm, so voxel a sits at a + 0.25 mm and
    // never on a tie. A map voxel i holds world x in [2i − 1, 2i + 1); blocks I and II meet at x = 43.
    const dims: V3 = [100, 80, 60];
    const data = new Uint8Array(dims[0] * dims[1] * dims[2]);
    const set = (a0: number, a1: number, b0: number, b1: number, c0: number, c1: number) => {
      for (let c = c0; c <= c1; c++) for (let b = b0; b <= b1; b++) for (let a = a0; a <= a1; a++) data[a + dims[0] * (b + dims[1] * c)] = 1;
    };
    // x 35.25..50.25 (16 voxels: 8 below 43 in I, 8 above in II), y 10.25..14.25 (5), z 10.25..13.25 (4).
    set(35, 50, 10, 14, 10, 13); // 160 voxels in I, 160 in II
    set(0, 1, 10, 14, 10, 13); // x 0.25, 1.25 → map i 0, 1: background rim, 40 voxels
    set(95, 96, 10, 14, 10, 13); // x 95.25, 96.25 → map i 48: off the map's grid, 40 voxels
    const affine = [1, 0, 0, 0.25, 0, 1, 0, 0.25, 0, 0, 1, 0.25, 0, 0, 0, 1];
    const v = visitVolumetry(blockMap(), makeVolume(dims, data, affine, 'uint8'));
    expect(v.tumourFrom).toBe('lesion mask');
    expect(v.estimated).toBe(false);
    expect(byName(v, 'I').tumourMl).toBeCloseTo(0.16, 12); // 160 × 0.001 mL
    expect(byName(v, 'II').tumourMl).toBeCloseTo(0.16, 12);
    expect(byName(v, 'I').tumourFreeMl).toBeCloseTo(23.84, 9);
    expect(v.tumourVolumeMl).toBeCloseTo(0.32, 12);
    expect(v.tumourOutsideSegmentsMl).toBeCloseTo(0.08, 12); // 80 voxels off the liver
    expect(v.tumourFreeLiverMl).toBeCloseTo(191.68, 9);
    expect(v.notes.some((n) => /80 lesion-mask voxels/.test(n))).toBe(true);
  });

  it('oblique anisotropic grid: every lesion voxel where segmentAtWorld puts it', () => {
    const map = blockMap();
    const dims: V3 = [130, 110, 70];
    const affine = gridAffine(rotation(0.3, -0.2, 0.5), [0.7, 0.9, 1.3], dims, [44, 34, 24]);
    // Lesions straddling block borders, one reaching past the liver's edge; a second label value.
    const data = sphereMask(dims, affine, [44, 34, 24], 9);
    const second = sphereMask(dims, affine, [10, 20, 10], 12, 2);
    for (let n = 0; n < data.length; n++) if (second[n]) data[n] = 2;
    const mask = makeVolume(dims, data, affine, 'uint8');
    const v = visitVolumetry(map, mask);

    // Reference: the world position of each voxel centre, looked up one by one.
    const count = new Map<SegmentName | null, number>();
    let n = 0;
    for (let k = 0; k < dims[2]; k++) for (let j = 0; j < dims[1]; j++) for (let i = 0; i < dims[0]; i++, n++) {
      if (data[n] === 0) continue;
      const s = segmentAtWorld(map, worldOf(affine, i, j, k));
      count.set(s, (count.get(s) ?? 0) + 1);
    }
    const voxelMl = 0.7 * 0.9 * 1.3 / 1000;
    expect(count.get(null)).toBeGreaterThan(0);
    expect(v.tumourOutsideSegmentsMl).toBeCloseTo((count.get(null) ?? 0) * voxelMl, 9);
    let segmentsWithTumour = 0;
    for (const s of v.segments) {
      expect(s.tumourMl).toBeCloseTo((count.get(s.segment) ?? 0) * voxelMl, 9);
      expect(s.tumourFreeMl + s.tumourMl).toBeCloseTo(s.volumeMl, 9);
      if (s.tumourMl > 0) segmentsWithTumour++;
    }
    expect(segmentsWithTumour).toBe(8); // the central sphere touches all eight blocks
    expect(v.tumourVolumeMl + v.tumourFreeLiverMl).toBeCloseTo(v.liverVolumeMl, 9);
  });

  it('counts only voxels whose scaled value is above zero', () => {
    const dims: V3 = [4, 4, 4];
    // Stored 1 with inter −1 is 0 (no lesion); stored 2 is 1 (lesion). Voxels at map voxels (5..8, 5..8, 5..8): block I.
    const data = new Int16Array(64).fill(1);
    data[0] = 2;
    data[5] = 2;
    const affine = [2, 0, 0, 10, 0, 2, 0, 10, 0, 0, 2, 10, 0, 0, 0, 1];
    const v = visitVolumetry(blockMap(), makeVolume(dims, data, affine, 'int16', 1, -1));
    expect(byName(v, 'I').tumourMl).toBeCloseTo(2 * 0.008, 12);
    expect(v.tumourVolumeMl).toBeCloseTo(0.016, 12);
  });
});

describe('tumour estimated from marked diameters', () => {
  it('ellipsoid π/6 · L · S², flagged as an estimate', () => {
    // π/6 × 20 × 10 × 10 = 1047.2 mm³ = 1.0472 mL (hand: 3.14159 / 6 = 0.523599; × 2000 = 1047.2).
    const v = visitVolumetry(blockMap(), [{ id: 'M1', segment: 'V', longestAxialMm: 20, shortAxisMm: 10 }]);
    expect(v.estimated).toBe(true);
    expect(v.tumourFrom).toBe('diameters');
    expect(byName(v, 'V').tumourMl).toBeCloseTo(1.0472, 4);
    expect(byName(v, 'V').tumourFreeMl).toBeCloseTo(24 - 1.0472, 4);
    expect(v.notes.join(' ')).toMatch(/ESTIMATES from the marked diameters/);
  });

  it('a segment missing from the map, a tumour bigger than its segment, bad diameters', () => {
    const v = visitVolumetry(blockMap(true), [
      { id: 'M1', segment: 'IV', longestAxialMm: 10, shortAxisMm: 10 },
      { id: 'M2', segment: 'VI', longestAxialMm: 60, shortAxisMm: 40 }, // π/6·60·1600 = 50.27 mL > 24 mL
    ]);
    expect(v.tumourOutsideSegmentsMl).toBeCloseTo((Math.PI / 6) * 1000 / 1000, 9);
    expect(v.notes.some((n) => /M1: segment IV is not in this visit's segment map/.test(n))).toBe(true);
    expect(byName(v, 'VI').tumourFreeMl).toBe(0);
    expect(v.notes.some((n) => /Segment VI: tumour .* exceeds the segment/.test(n))).toBe(true);
    expect(() => visitVolumetry(blockMap(), [{ segment: 'V', longestAxialMm: 10, shortAxisMm: 12 }])).toThrow(FalciformError);
    expect(() => visitVolumetry(blockMap(), [{ segment: 'V', longestAxialMm: NaN, shortAxisMm: 5 }])).toThrow(/lengths in mm ≥ 0/);
    expect(() => visitVolumetry(blockMap(), [{ segment: 'V', longestAxialMm: 10, shortAxisMm: -1 }])).toThrow(FalciformError);
  });

  it('takes every mark the marks reader takes: zero diameters, a short axis longer by rounding, a centre off the liver', () => {
    const v = visitVolumetry(blockMap(), [
      { id: 'Z', segment: 'V', longestAxialMm: 8, shortAxisMm: 0 },
      // Short axis 10.04 against 10 mm is typed-in rounding: taken as 10, π/6 × 1000 mm³ = 0.5236 mL.
      { id: 'R', segment: 'VI', longestAxialMm: 10, shortAxisMm: 10.04 },
      { id: 'X', segment: null, longestAxialMm: 10, shortAxisMm: 10 },
    ]);
    expect(byName(v, 'V').tumourMl).toBe(0);
    expect(byName(v, 'VI').tumourMl).toBeCloseTo(Math.PI / 6, 9);
    expect(v.tumourOutsideSegmentsMl).toBeCloseTo(Math.PI / 6, 9);
    expect(v.notes.some((n) => /X: lies outside the segment map's liver; its estimated 0.5 mL/.test(n))).toBe(true);
  });
});

it('SEGMENT_NAMES order is the order segments are reported in', () => {
  const v = visitVolumetry(blockMap(true));
  const order = v.segments.map((s) => SEGMENT_NAMES.indexOf(s.segment));
  expect([...order].sort((a, b) => a - b)).toEqual(order);
});
