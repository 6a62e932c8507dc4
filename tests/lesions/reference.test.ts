import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { lesionsFromMask } from '../../src/lesions/components.js';
import { maskLesionMargin } from '../../src/lesions/margin.js';
import { segmentIndexOf } from '../../src/lesions/segment-lookup.js';
import { analyzeVisit, type VisitAnalysis } from '../../src/visit/analyze.js';
import type { Volume } from '../../src/volume/volume.js';
import {
  ellipsoid, noiseScan, obliqueAffine, paint, runPython, SCHEME, scratchDir, segmentMap, volume, writeRaw, type Dims,
} from './fixtures.js';

// Lesion measures against scipy.ndimage, scipy.spatial and scikit-image, run live with Debian's
// python3 on the same raw arrays (tests/reference/lesion_reference.py).

const SCRIPT = 'tests/reference/lesion_reference.py';

interface RefLesion {
  voxels: number;
  firstVoxel: number;
  label: number;
  centroidMm: number[];
  skimageArea: number;
  skimageCentroidMm: number[];
  meanValue: number;
  ownLabel: number;
  fallbackMm: number | null;
  fractions: Record<string, number>;
  spans: boolean;
  marginMm: number | null;
  /** Segment labels at the margin distance (more than one on a tie). */
  nearestLabels: number[];
  longestAxialMm: number;
  shortAxisOptionsMm: number[];
  max3dMm: number;
  feretMaxPx: number;
}
interface RefCase { name: string; count: number; lesions: RefLesion[] }

interface Case {
  name: string;
  mask: Volume;
  scan: Volume;
  segments: Volume;
  multiLabel?: boolean;
}

/** Segment map painted by world planes inside a liver ellipsoid (values 4, 5, 7, 8; 0 outside). */
function paintSegments(data: Uint8Array, dims: Dims, affine: number[]) {
  const liver = ellipsoid([0, 0, 0], [34, 30, 40], [0.1, 0, 0.2]);
  paint(data, dims, affine, (x, y, z) => liver(x, y, z) && x < -4, 5);
  paint(data, dims, affine, (x, y, z) => liver(x, y, z) && x >= -4 && y < 3, 8);
  paint(data, dims, affine, (x, y, z) => liver(x, y, z) && x >= -4 && y >= 3, 7);
  paint(data, dims, affine, (x, y, z) => liver(x, y, z) && x >= -4 && y >= 3 && z > 14, 4);
}

/** Lesions: oblique ellipsoids (one deep in V, one across the V/VIII plane), corner-touching blocks, edge and single voxels. */
function paintLesions(data: Uint8Array, dims: Dims, affine: number[], multi: boolean) {
  const v = (n: number) => (multi ? n : 1);
  paint(data, dims, affine, ellipsoid([-20, -6, -3], [9, 5.5, 7], [0.4, -0.3, 0.7]), v(3));
  paint(data, dims, affine, ellipsoid([-4, -12, 4], [6, 4.5, 5], [0, 0.2, -0.5]), v(7));
  paint(data, dims, affine, ellipsoid([10, 12, -14], [4.2, 3.1, 6.3], [0.9, 0.1, 0.3]), v(2));
  const [nx, ny] = dims;
  const set = (i: number, j: number, k: number, x: number) => { data[i + nx * (j + ny * k)] = x; };
  // Two blocks meeting only at one corner: one lesion under 26-connectivity.
  for (let k = 3; k < 6; k++) for (let j = 40; j < 43; j++) for (let i = 44; i < 47; i++) set(i, j, k, v(5));
  for (let k = 6; k < 8; k++) for (let j = 43; j < 45; j++) for (let i = 47; i < 50; i++) set(i, j, k, v(5));
  // Touches the grid's edge.
  for (let k = 10; k < 13; k++) for (let j = 5; j < 9; j++) for (let i = 0; i < 3; i++) set(i, j, k, v(9));
  set(30, 2, 20, v(11));
}

function makeCase(name: string, dims: Dims, affine: number[], opts: { segDims?: Dims; segAffine?: number[]; multi?: boolean } = {}): Case {
  const n = dims[0] * dims[1] * dims[2];
  const maskData = new Uint8Array(n);
  paintLesions(maskData, dims, affine, opts.multi === true);
  const segDims = opts.segDims ?? dims;
  const segAffine = opts.segAffine ?? affine;
  const segData = new Uint8Array(segDims[0] * segDims[1] * segDims[2]);
  paintSegments(segData, segDims, segAffine);
  return {
    name,
    mask: volume(dims, maskData, affine, 'uint8'),
    scan: volume(dims, noiseScan(dims), affine, 'int16', 0.5, -100),
    segments: volume(segDims, segData, segAffine, 'uint8'),
    multiLabel: opts.multi,
  };
}

const cases: Case[] = [
  makeCase('oblique, anisotropic', [72, 60, 34], obliqueAffine([0.8, 1.1, 2.5], [0.25, -0.15, 0.4], [-30, -28, -40])),
  makeCase('axis-aligned, square pixels', [80, 80, 40], obliqueAffine([0.75, 0.75, 2], [0, 0, 0], [-30, -30, -40])),
  makeCase('coronal slices (j along S)', [70, 36, 64], [0.9, 0, 0, -31, 0, 0, 1.05, -33, 0, 2.2, 0, -40, 0, 0, 0, 1]),
  makeCase('multi-label mask', [72, 60, 34], obliqueAffine([0.8, 1.1, 2.5], [0.25, -0.15, 0.4], [-30, -28, -40]), { multi: true }),
  makeCase('segment map on another grid', [72, 60, 34], obliqueAffine([0.8, 1.1, 2.5], [0.25, -0.15, 0.4], [-30, -28, -40]), {
    segDims: [50, 58, 46],
    segAffine: obliqueAffine([1.3, 1.2, 1.7], [-0.1, 0.2, -0.3], [-33, -36, -38]),
  }),
];

const MARGIN_MM = 10;
const CAP_MM = 30; // three times the set margin: exact up to here (contracts)

let dir = '';
let ref: RefCase[] = [];
const ours = new Map<string, VisitAnalysis>();

beforeAll(() => {
  dir = scratchDir();
  const job = {
    cases: cases.map((c, n) => ({
      name: c.name,
      dims: c.mask.dims,
      affine: c.mask.affine,
      mask: writeRaw(dir, `mask${n}.raw`, c.mask.data),
      maskDtype: 'uint8',
      scan: writeRaw(dir, `scan${n}.raw`, c.scan.data),
      scanDtype: 'int16',
      scanSlope: c.scan.slope,
      scanInter: c.scan.inter,
      segments: writeRaw(dir, `seg${n}.raw`, c.segments.data),
      segmentsDtype: 'uint8',
      segmentsDims: c.segments.dims,
      segmentsAffine: c.segments.affine,
      labelsOut: join(dir, `labels${n}.raw`),
      multiLabel: c.multiLabel === true,
    })),
  };
  ref = (runPython(SCRIPT, job, dir) as { cases: RefCase[] }).cases;
  for (const c of cases) ours.set(c.name, analyzeVisit({ scan: c.scan, segments: segmentMap(c.segments), lesionMask: c.mask, marginMm: MARGIN_MM }));
});

afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe.each(cases.map((c, n) => [c.name, n] as const))('%s', (_name, n) => {
  const c = cases[n];
  const refOrdered = () => (c.multiLabel ? ref[n].lesions : [...ref[n].lesions].sort((a, b) => a.firstVoxel - b.firstVoxel));

  it('finds the same lesions with the same voxels', () => {
    // Source: scipy.ndimage.label (3×3×3 structure), run live; multi-label: the mask's own values.
    const labels = new Int32Array(readFileSync(join(dir, `labels${n}.raw`)).buffer.slice(0));
    const found = lesionsFromMask(c.mask);
    expect(found.kind).toBe(c.multiLabel ? 'multi-label' : 'binary');
    expect(found.lesions.length).toBe(ref[n].count);
    expect(found.lesions.length).toBeGreaterThanOrEqual(6);
    const used = new Set<number>();
    for (const lesion of found.lesions) {
      const theirs = labels[lesion.voxels[0]];
      expect(theirs).toBeGreaterThan(0);
      expect(used.has(theirs)).toBe(false);
      used.add(theirs);
      for (const v of lesion.voxels) expect(labels[v]).toBe(theirs);
      expect(lesion.voxels.length).toBe(ref[n].lesions.find((r) => r.label === theirs)?.voxels);
      if (c.multiLabel) expect(lesion.label).toBe(theirs);
    }
  });

  it('measures centroid, volume and mean value as scipy.ndimage and scikit-image do', () => {
    const a = ours.get(c.name) as VisitAnalysis;
    const voxelMl = Math.abs(c.mask.spacingMm[0] * c.mask.spacingMm[1] * c.mask.spacingMm[2]) / 1000;
    refOrdered().forEach((r, t) => {
      const l = a.lesions[t];
      // Source: scipy.ndimage.center_of_mass mapped through the affine, run live.
      l.centroidMm.forEach((x, d) => expect(x).toBeCloseTo(r.centroidMm[d], 9));
      // Source: skimage.measure.regionprops (area, centroid), run live.
      l.centroidMm.forEach((x, d) => expect(x).toBeCloseTo(r.skimageCentroidMm[d], 9));
      expect(l.voxelCount).toBe(r.skimageArea);
      expect(l.volumeMl).toBeCloseTo(r.skimageArea * voxelMl, 12);
      // Source: scipy.ndimage.mean over the scaled scan, run live.
      expect(l.meanValue).toBeCloseTo(r.meanValue, 9);
    });
  });

  it('measures the longest axial diameter, its short axis and the 3-D diameter exactly', () => {
    const a = ours.get(c.name) as VisitAnalysis;
    refOrdered().forEach((r, t) => {
      const l = a.lesions[t];
      // Source: scipy.spatial.distance.pdist over every voxel pair of each axial slice, run live.
      expect(l.longestAxialMm).toBeCloseTo(r.longestAxialMm, 9);
      const short = r.shortAxisOptionsMm.some((w) => Math.abs(w - l.shortAxisMm) < 1e-7);
      expect(short, `short axis ${l.shortAxisMm} not among ${r.shortAxisOptionsMm.join(', ')}`).toBe(true);
      // Source: scipy.spatial.ConvexHull + pdist over the lesion's voxel centres, run live.
      expect(l.max3dMm).toBeCloseTo(r.max3dMm, 9);
      const [p, q] = l.longestAxialEndpointsMm ?? [[0, 0, 0], [0, 0, 0]];
      expect(Math.hypot(p[0] - q[0], p[1] - q[1], p[2] - q[2])).toBeCloseTo(l.longestAxialMm, 9);
    });
  });

  it('places each lesion, with fractions and margins as scipy finds them', () => {
    const a = ours.get(c.name) as VisitAnalysis;
    let spanning = 0, measured = 0;
    refOrdered().forEach((r, t) => {
      const l = a.lesions[t];
      expect(l.segment).toBe(SCHEME.get(r.ownLabel) ?? null);
      if (r.fallbackMm !== null) {
        expect(l.segmentWarning).toMatch(new RegExp(`nearest segment \\(${r.fallbackMm.toFixed(1)} mm`));
      } else if (r.ownLabel !== 0) expect(l.segmentWarning).toBeNull();
      else expect(l.segmentWarning).toMatch(/no segment within 5 mm/);
      const fr: Record<string, number> = {};
      for (const [label, f] of Object.entries(r.fractions)) fr[SCHEME.get(Number(label)) as string] = f;
      expect(Object.keys(l.segmentFractions).sort()).toEqual(Object.keys(fr).sort());
      for (const [s, f] of Object.entries(fr)) expect(l.segmentFractions[s as keyof typeof l.segmentFractions]).toBeCloseTo(f, 12);
      if (r.spans) {
        spanning++;
        expect(l.marginMm).toBe(0);
        expect(l.marginAlert).toBe(true);
        return;
      }
      if (r.ownLabel === 0) return;
      // Source: the margin to the border surface (face to face, docs/formats.md) computed by
      // scipy.ndimage.distance_transform_edt on a grid of half the spacing, where faces are samples
      // (same grid), or by a scipy.spatial.cKDTree search measuring every candidate pair of boxes
      // (other grid), run live.
      if (r.marginMm !== null && r.marginMm <= CAP_MM) {
        measured++;
        expect(l.marginMm).toBeCloseTo(r.marginMm, 9);
        expect(r.nearestLabels.map((v) => SCHEME.get(v))).toContain(l.nearestOtherSegment);
        expect(l.marginAlert).toBe(r.marginMm <= MARGIN_MM);
      } else expect(l.marginMm).toBeNull();
    });
    expect(spanning).toBeGreaterThanOrEqual(1);
    expect(measured).toBeGreaterThanOrEqual(3);
    expect(a.warnings).toEqual(a.lesions.filter((l) => l.segmentWarning !== null).map((l) => l.segmentWarning));
  });
});

const sameGridCases = cases.map((c, n) => [c.name, n] as const).filter(([, n]) => cases[n].segments.dims.join() === cases[n].mask.dims.join());

describe.each(sameGridCases)('%s: both margin methods', (_name, n) => {
  it('gets the same margins from the box distance transform and the nearest-point search', () => {
    const c = cases[n];
    const found = lesionsFromMask(c.mask);
    const map = segmentMap(c.segments);
    const a = ours.get(c.name) as VisitAnalysis;
    let compared = 0;
    found.lesions.forEach((lv, t) => {
      const seg = a.lesions[t].segment;
      // A lesion across segments is 0 by definition, not measured; one touching a border is measured.
      if (seg === null || Object.keys(a.lesions[t].segmentFractions).length > 1) return;
      const own = segmentIndexOf(seg);
      const edt = maskLesionMargin(c.mask, lv, map, own, CAP_MM, 'edt');
      const search = maskLesionMargin(c.mask, lv, map, own, CAP_MM, 'search');
      expect(search.marginMm === null).toBe(edt.marginMm === null);
      if (edt.marginMm !== null) {
        compared++;
        expect(search.marginMm).toBeCloseTo(edt.marginMm, 9);
        expect(search.nearestOtherSegment).toBe(edt.nearestOtherSegment);
      }
    });
    expect(compared).toBeGreaterThanOrEqual(3);
  });
});

describe('longest axial diameter on square pixels', () => {
  it('agrees with scikit-image feret_diameter_max within one pixel', () => {
    // Source: skimage.measure.regionprops feret_diameter_max per axial slice (contour based, so
    // it measures to pixel edges: within one pixel diagonal of the centre-to-centre value), run live.
    const n = cases.findIndex((c) => c.name.startsWith('axis-aligned'));
    const a = ours.get(cases[n].name) as VisitAnalysis;
    const px = cases[n].mask.spacingMm[0];
    [...ref[n].lesions].sort((x, y) => x.firstVoxel - y.firstVoxel).forEach((r, t) => {
      expect(Math.abs(a.lesions[t].longestAxialMm - r.feretMaxPx * px)).toBeLessThanOrEqual(Math.SQRT2 * px + 1e-9);
    });
  });
});
