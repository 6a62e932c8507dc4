import { beforeAll, describe, expect, it } from 'vitest';
import { lesionsFromMask } from '../../src/lesions/components.js';
import { markMargin, maskLesionMargin } from '../../src/lesions/margin.js';
import { segmentIndexOf } from '../../src/lesions/segment-lookup.js';
import { analyzeVisit } from '../../src/visit/analyze.js';
import type { VoxelArray } from '../../src/volume/volume.js';
import { ellipsoid, noiseScan, obliqueAffine, paint, runPython, scratchDir, segmentMap, volume, writeRaw, type Dims } from './fixtures.js';

const dims: Dims = [50, 40, 30];
const spacing = [0.7, 1.3, 2.0];

/** Segment map by index: V where i < 30, VIII where i ≥ 30 and k ≥ 20, else V; background for j ≥ 38. */
function mapData(): Uint8Array {
  const [nx, ny, nz] = dims;
  const d = new Uint8Array(nx * ny * nz);
  for (let k = 0; k < nz; k++) for (let j = 0; j < 38; j++) for (let i = 0; i < nx; i++) d[i + nx * (j + ny * k)] = i >= 30 && k >= 20 ? 8 : 5;
  return d;
}

function block(i0: number, i1: number, j0: number, j1: number, k0: number, k1: number): Uint8Array {
  const [nx, ny, nz] = dims;
  const d = new Uint8Array(nx * ny * nz);
  for (let k = k0; k <= k1; k++) for (let j = j0; j <= j1; j++) for (let i = i0; i <= i1; i++) d[i + nx * (j + ny * k)] = 1;
  return d;
}

describe.each([
  ['axis-aligned', obliqueAffine(spacing, [0, 0, 0], [-10, -20, -30])],
  ['oblique', obliqueAffine(spacing, [0.3, -0.2, 0.6], [-10, -20, -30])],
])('margin on a known layout (%s grid)', (_name, affine) => {
  const map = segmentMap(volume(dims, mapData(), affine, 'uint8'));
  const scan = volume(dims, noiseScan(dims), affine, 'int16');

  it('is the exact anisotropic gap from the lesion\'s faces to the border surface of another segment', () => {
    // Source: analytic. The lesion's corner voxel (15, ·, 10) is 15 steps of 0.7 mm and 10 steps of
    // 2 mm from VIII's corner voxel (30, ·, 20); face to face that is half a voxel less at each end
    // along both axes crossed: 14 × 0.7 mm and 9 × 2 mm.
    const mask = volume(dims, block(10, 15, 5, 10, 4, 10), affine, 'uint8');
    const expected = Math.hypot(14 * 0.7, 9 * 2);
    const lv = lesionsFromMask(mask).lesions[0];
    for (const method of ['edt', 'search'] as const) {
      const m = maskLesionMargin(mask, lv, map, segmentIndexOf('V'), 60, method);
      expect(m.marginMm).toBeCloseTo(expected, 9);
      expect(m.nearestOtherSegment).toBe('VIII');
    }
    const a = analyzeVisit({ scan, segments: map, lesionMask: mask, marginMm: 10 });
    expect(a.lesions[0].marginMm).toBeCloseTo(expected, 9);
    expect(a.lesions[0].marginAlert).toBe(false);
    expect(analyzeVisit({ scan, segments: map, lesionMask: mask, marginMm: 21 }).lesions[0].marginAlert).toBe(true);
  });

  it('is 0 for a lesion touching the border, which alerts at a set margin of 0', () => {
    // Source: the definition (docs/formats.md, margin to the border surface). Voxel (29, ·, 20) of the
    // lesion shares a face with VIII's voxel (30, ·, 20): between centres that is 0.7 mm, face to face 0.
    // Above, the slice k = 19 of a lesion under VIII's first slice is one 2 mm step away: 0 too.
    for (const [m, what] of [[block(25, 29, 5, 8, 20, 22), 'beside'], [block(31, 34, 5, 8, 16, 19), 'below']] as const) {
      const mask = volume(dims, m, affine, 'uint8');
      const lv = lesionsFromMask(mask).lesions[0];
      for (const method of ['edt', 'search'] as const) {
        const r = maskLesionMargin(mask, lv, map, segmentIndexOf('V'), 30, method);
        expect(r.marginMm, `${what}, ${method}`).toBe(0);
        expect(r.nearestOtherSegment).toBe('VIII');
      }
      const l = analyzeVisit({ scan, segments: map, lesionMask: mask, marginMm: 0 }).lesions[0];
      expect(l).toMatchObject({ segment: 'V', segmentFractions: { V: 1 }, marginMm: 0, marginAlert: true });
    }
    // One voxel of V between them: one step of that axis (0.7 mm beside, 2 mm below).
    const gap = volume(dims, block(25, 28, 5, 8, 20, 22), affine, 'uint8');
    expect(analyzeVisit({ scan, segments: map, lesionMask: gap, marginMm: 0 }).lesions[0]).toMatchObject({ marginMm: expect.closeTo(0.7, 12), marginAlert: false });
    const below = volume(dims, block(31, 34, 5, 8, 15, 18), affine, 'uint8');
    expect(analyzeVisit({ scan, segments: map, lesionMask: below, marginMm: 2.5 }).lesions[0]).toMatchObject({ marginMm: expect.closeTo(2, 12), marginAlert: true });
  });

  it('is 0 for a lesion across two segments, with both fractions', () => {
    // Source: the definition (brief, "Measures"): 0 when the lesion spans segments.
    const mask = volume(dims, block(27, 31, 5, 8, 18, 22), affine, 'uint8');
    const a = analyzeVisit({ scan, segments: map, lesionMask: mask });
    const l = a.lesions[0];
    // 5·4·5 voxels, centroid at (29, 6.5, 20) in V; VIII holds i 30–31, k 20–22: 2·4·3.
    expect(l.segmentFractions.VIII).toBeCloseTo(24 / 100, 12);
    expect(l.segmentFractions.V).toBeCloseTo(76 / 100, 12);
    expect(l.segment).toBe('V');
    expect(l.marginMm).toBe(0);
    expect(l.nearestOtherSegment).toBe('VIII');
    expect(l.marginAlert).toBe(true);
  });

  it('is null beyond three times the set margin, with no alert', () => {
    // Source: contracts (analyze output): exact up to at least 3× the set margin, else null.
    const mask = volume(dims, block(2, 4, 5, 8, 2, 3), affine, 'uint8');
    const far = Math.hypot(25 * 0.7, 16 * 2); // ≈ 36.5 mm, face to face
    const lv = lesionsFromMask(mask).lesions[0];
    expect(maskLesionMargin(mask, lv, map, segmentIndexOf('V'), 30).marginMm).toBeNull();
    expect(maskLesionMargin(mask, lv, map, segmentIndexOf('V'), 40).marginMm).toBeCloseTo(far, 9);
    const l = analyzeVisit({ scan, segments: map, lesionMask: mask, marginMm: 10 }).lesions[0];
    expect(l.marginMm).toBeNull();
    expect(l.nearestOtherSegment).toBeNull();
    expect(l.marginAlert).toBe(false);
    expect(analyzeVisit({ scan, segments: map, lesionMask: mask, marginMm: 13 }).lesions[0].marginMm).toBeCloseTo(far, 9);
  });

  it('leaves a lesion outside the liver without segment or margin, and says so', () => {
    // Source: the definition (brief): background with no segment within 5 mm → outside, warned.
    const mask = volume(dims, block(10, 12, 39, 39, 5, 5), affine, 'uint8');
    // j = 39 lies 1.3 mm beyond the map's last row (j = 37 is 2.6 mm away): the fallback applies.
    const near = analyzeVisit({ scan, segments: map, lesionMask: mask });
    expect(near.lesions[0].segment).toBe('V');
    expect(near.warnings[0]).toMatch(/^L1: centroid falls on background.*placed in segment V.*\(2\.6 mm away\)/);
    const far = volume([50, 60, 30], new Uint8Array(50 * 60 * 30), affine, 'uint8');
    for (let i = 10; i < 13; i++) far.data[i + 50 * (57 + 60 * 5)] = 1;
    const out = analyzeVisit({ scan, segments: map, lesionMask: far });
    expect(out.lesions[0].segment).toBeNull();
    expect(out.lesions[0].marginMm).toBeNull();
    expect(out.lesions[0].marginAlert).toBe(false);
    expect(out.warnings).toEqual([expect.stringMatching(/^L1: centroid lies outside the segment map with no segment within 5 mm/)]);
  });
});

describe('margin of a manual mark', () => {
  const affine = [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1];
  const d = new Uint8Array(60 * 20 * 20);
  for (let n = 0; n < d.length; n++) d[n] = n % 60 < 30 ? 5 : 6;
  const map = segmentMap(volume([60, 20, 20], d, affine, 'uint8'));

  it('is the distance from the centre to the border surface less half the diameter, floored at 0', () => {
    // Source: the definition (brief, "Measures", with the border surface of docs/formats.md). The
    // nearest VI voxel to x = 20.2 is centred at x = 30 on 1 mm voxels: its face, the border, is at 29.5.
    expect(markMargin(map, [20.2, 10, 10], 6, segmentIndexOf('V'), 30)).toEqual({ marginMm: expect.closeTo(9.3 - 3, 12), nearestOtherSegment: 'VI' });
    expect(markMargin(map, [20.2, 10, 10], 25, segmentIndexOf('V'), 30).marginMm).toBe(0);
    expect(markMargin(map, [2, 10, 10], 4, segmentIndexOf('V'), 20).marginMm).toBeNull();
  });
});

describe('margin cost', () => {
  it('reads only a box around the lesion, however large the map', () => {
    // A map that counts its own voxel reads: the margin must not scan the whole grid.
    const big: Dims = [200, 200, 200];
    const affine = obliqueAffine([2, 2, 2], [0, 0, 0], [0, 0, 0]);
    const raw = new Uint8Array(200 * 200 * 200);
    paint(raw, big, affine, (x) => x < 200, 5);
    paint(raw, big, affine, (x) => x >= 200, 8);
    let reads = 0;
    const counted = new Proxy(raw, {
      get(target, key) {
        if (typeof key === 'string' && key.charCodeAt(0) <= 57) reads++;
        return Reflect.get(target, key);
      },
    }) as unknown as VoxelArray;
    const map = segmentMap(volume(big, counted, affine, 'uint8'));
    const maskData = new Uint8Array(raw.length);
    paint(maskData, big, affine, ellipsoid([180, 200, 200], [6, 6, 6]), 1);
    const mask = volume(big, maskData, affine, 'uint8');
    const lv = lesionsFromMask(mask).lesions[0];
    for (const method of ['edt', 'search'] as const) {
      reads = 0;
      const m = maskLesionMargin(mask, lv, map, segmentIndexOf('V'), 30, method);
      // Analytic: the lesion's last voxel centre is at x = 186, VIII's first at x = 200 (2 mm voxels):
      // 14 mm between centres, one voxel less face to face.
      expect(m.marginMm).toBeCloseTo(12, 9);
      // Box: the lesion's 7 voxels plus 16 on each side per axis (30 mm, and one voxel for the
      // faces), 39³ ≈ 59 000 voxels; the search also looks at each candidate's six neighbours.
      expect(reads).toBeLessThan(8 * 39 ** 3);
      expect(reads).toBeLessThan(raw.length / 20);
    }
  });
});

describe('margin of a lesion with a large search box', () => {
  it('is the same whichever exact method the box size picks', () => {
    // An 80 mm radius on a 1 mm grid makes a box of 130 × 150 × 120 voxels, over the transform's limit.
    const big: Dims = [150, 150, 120];
    const affine = obliqueAffine([1, 1, 1], [0, 0, 0], [0, 0, 0]);
    const labels = new Uint8Array(150 * 150 * 120);
    paint(labels, big, affine, (x, y, z) => x + 0.3 * y + 0.2 * z < 100, 5);
    paint(labels, big, affine, (x, y, z) => x + 0.3 * y + 0.2 * z >= 100, 7);
    const map = segmentMap(volume(big, labels, affine, 'uint8'));
    const maskData = new Uint8Array(labels.length);
    paint(maskData, big, affine, ellipsoid([40, 75, 60], [9, 7, 8], [0.3, 0.2, 0.1]), 1);
    const mask = volume(big, maskData, affine, 'uint8');
    const lv = lesionsFromMask(mask).lesions[0];
    const auto = maskLesionMargin(mask, lv, map, segmentIndexOf('V'), 80);
    const edt = maskLesionMargin(mask, lv, map, segmentIndexOf('V'), 80, 'edt');
    expect(edt.marginMm).toBeGreaterThan(10);
    expect(auto.marginMm).toBeCloseTo(edt.marginMm as number, 9);
    expect(auto.nearestOtherSegment).toBe('VII');
  });
});

describe('margin to a plane border from a sphere, on 0.8 × 0.8 × 5 mm voxels', () => {
  // Axis-aligned grid, voxel (i, j, k) centred at (0.8 i, 0.8 j, 5 k) mm. A sphere of radius 12 mm
  // centred at (32, 24, 20) mm, the voxel (40, 30, 4). Its voxels are those whose centre lies inside.
  const sp = [0.8, 0.8, 5];
  const dims: Dims = [80, 60, 16];
  const affine = [0.8, 0, 0, 0, 0, 0.8, 0, 0, 0, 0, 5, 0, 0, 0, 0, 1];
  const sphere = new Uint8Array(80 * 60 * 16);
  paint(sphere, dims, affine, ellipsoid([32, 24, 20], [12, 12, 12]), 1);
  const mask = volume(dims, sphere, affine, 'uint8');
  const scan = volume(dims, noiseScan(dims), affine, 'int16');
  /** Segment V, and VIII where the voxel centre passes `inVIII`. */
  const planeMap = (inVIII: (x: number, y: number, z: number) => boolean) => {
    const d = new Uint8Array(sphere.length).fill(5);
    paint(d, dims, affine, inVIII, 8);
    return d;
  };
  // Source: analytic, by hand from the geometry (the expected value beside each case).
  //  above: VIII from slice k = 10 (z = 50 mm) up; the border surface is the face z = 47.5 mm. The
  //    sphere's top slice is k = 6 (z = 30, 10 mm above the centre, within 12; k = 7 is 15 mm off),
  //    whose voxels' upper faces lie at z = 32.5 mm: margin 47.5 − 32.5 = 15 mm (the continuous
  //    sphere's gap would be 47.5 − 32 = 15.5 mm).
  //  beside: VIII from column i = 60 (x = 48 mm) on; the border face is x = 47.6 mm. The sphere's
  //    last column is i = 55 (x = 44, 15 steps of 0.8 = 12 mm from the centre), face at x = 44.4 mm:
  //    margin 47.6 − 44.4 = 3.2 mm.
  //  touching: VIII from k = 7 (z = 35 mm) up; border face z = 32.5 mm, the sphere's top face: 0 mm,
  //    an alert even at a set margin of 0 (between voxel centres this read 5 mm, one slice).
  const cases = [
    { name: 'above', data: planeMap((_x, _y, z) => z >= 50), expected: 15, setMargin: 10, alert: false },
    { name: 'beside', data: planeMap((x) => x >= 48), expected: 3.2, setMargin: 3.2, alert: true },
    { name: 'touching', data: planeMap((_x, _y, z) => z >= 35), expected: 0, setMargin: 0, alert: true },
  ];

  let ref: { name: string; edtMm: number; pairsMm: number }[] = [];
  beforeAll(() => {
    const dir = scratchDir();
    const job = {
      cases: cases.map((c, n) => ({
        name: c.name, dims, spacing: sp, own: 5,
        mask: writeRaw(dir, `sphere${n}.raw`, sphere), segments: writeRaw(dir, `plane${n}.raw`, c.data),
      })),
    };
    ref = (runPython('tests/reference/margin_reference.py', job, dir) as { cases: typeof ref }).cases;
  });

  it.each(cases)('$name: the hand-computed margin, as SciPy finds it with the same rule', (c) => {
    const map = segmentMap(volume(dims, c.data, affine, 'uint8'));
    const lv = lesionsFromMask(mask).lesions[0];
    for (const method of ['edt', 'search'] as const) {
      const m = maskLesionMargin(mask, lv, map, segmentIndexOf('V'), 30, method);
      expect(m.marginMm, method).toBeCloseTo(c.expected, 9);
      expect(m.nearestOtherSegment).toBe('VIII');
    }
    const l = analyzeVisit({ scan, segments: map, lesionMask: mask, marginMm: c.setMargin }).lesions[0];
    expect(l).toMatchObject({ segment: 'V', segmentFractions: { V: 1 }, nearestOtherSegment: 'VIII', marginAlert: c.alert });
    expect(l.marginMm).toBeCloseTo(c.expected, 9);
    // Source: scipy.ndimage.distance_transform_edt (sampling, on a grid of half the spacing where
    // faces are samples) and a brute-force pass over every voxel pair applying the half-voxel rule,
    // both run live with /usr/bin/python3 (tests/reference/margin_reference.py).
    const r = ref.find((x) => x.name === c.name)!;
    expect(r.edtMm).toBeCloseTo(c.expected, 9);
    expect(r.pairsMm).toBeCloseTo(c.expected, 9);
    expect(l.marginMm).toBeCloseTo(r.edtMm, 9);
  });
});

describe('margin on a tilted grid stored in float32', () => {
  it('is measured by the distance transform, the same as the search', () => {
    // NIfTI keeps the sform in float32 (nifti1.h: float srow_x[4] …): a tilted grid read back has
    // axes perpendicular only to about 1e-7, which must still count as perpendicular.
    const affine = obliqueAffine(spacing, [0.14, 0, 0], [-10, -20, -30]).map(Math.fround);
    const map = segmentMap(volume(dims, mapData(), affine, 'uint8'));
    const mask = volume(dims, block(10, 15, 5, 10, 4, 10), affine, 'uint8');
    const lv = lesionsFromMask(mask).lesions[0];
    const edt = maskLesionMargin(mask, lv, map, segmentIndexOf('V'), 60, 'edt');
    expect(edt.marginMm).toBeCloseTo(Math.hypot(14 * 0.7, 9 * 2), 5);
    expect(maskLesionMargin(mask, lv, map, segmentIndexOf('V'), 60, 'search').marginMm).toBeCloseTo(edt.marginMm as number, 6);
  });
});
