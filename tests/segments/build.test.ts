import { describe, expect, it } from 'vitest';
import { buildSegmentMap } from '../../src/segments/build.js';
import type { SegmentName } from '../../src/segments/segment-map.js';
import { makeVolume, voxelIndexAtWorld } from '../../src/volume/volume.js';
import { FalciformError } from '../../src/errors.js';
import { LANDMARK_NAMES } from '../../src/segments/landmarks.js';
import {
  gridAffine, inEllipsoid, liverVolume, nearTie, phantomLandmarks, planeRule, rotation, sphereMask, worldOf, LIVER,
  type V3,
} from './phantom.js';

const NAME_OF: Record<number, SegmentName> = { 1: 'I', 2: 'II', 3: 'III', 5: 'V', 6: 'VI', 7: 'VII', 8: 'VIII', 9: 'IVb' };

const GRIDS: { name: string; dims: V3; affine: number[] }[] = [
  // Oblique and anisotropic, as a thick-slice acquisition tilted on all three axes.
  { name: 'oblique 0.8×0.8×2.5 mm', dims: [260, 230, 90], affine: gridAffine(rotation(0.2, -0.15, 0.35), [0.8, 0.8, 2.5], [260, 230, 90], LIVER.centre) },
  // Stored with i and j flipped (the usual layout after a DICOM conversion), slices 3 mm.
  { name: 'flipped 1.1×1.1×3 mm', dims: [190, 150, 48], affine: gridAffine(rotation(0, 0, 0), [-1.1, -1.1, 3], [190, 150, 48], [28, 12, 19]) },
  // Coronal slices (k along A) with a small tilt.
  { name: 'coronal 1.3×1.3×1.9 mm', dims: [160, 110, 90], affine: gridAffine(rotation(Math.PI / 2 + 0.1, 0.05, 0), [1.3, 1.3, 1.9], [160, 110, 90], LIVER.centre) },
];

describe('segment map from a landmark set: every voxel against the plane rule (source: brief, plane method)', () => {
  for (const grid of GRIDS) {
    for (const splitIV of [false, true]) {
      it(`${grid.name}, IV ${splitIV ? 'split' : 'whole'}`, () => {
        const set = phantomLandmarks();
        const liver = liverVolume(grid.dims, grid.affine);
        const { map, warnings } = buildSegmentMap(liver, set, { splitIV });
        expect(map.labels.dims).toEqual(grid.dims);
        expect(map.labels.affine).toEqual(grid.affine);
        expect(warnings.some((w) => /segment I is left out/.test(w))).toBe(true);
        const data = map.labels.data;
        let n = 0, liverVoxels = 0, mismatches = 0, ties = 0;
        const [nx, ny, nz] = grid.dims;
        for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++, n++) {
          const p = worldOf(grid.affine, i, j, k);
          if (!inEllipsoid(p)) {
            if (data[n] !== 0) mismatches++;
            continue;
          }
          liverVoxels++;
          const expected = planeRule(set, p, splitIV);
          const got = data[n] === 4 ? (splitIV ? 'IVa' : 'IV') : NAME_OF[data[n]];
          if (got !== expected) {
            if (nearTie(set, p)) ties++;
            else mismatches++;
          }
        }
        expect(liverVoxels).toBeGreaterThan(100_000);
        expect(mismatches).toBe(0);
        // Voxel centres within 1e-6 mm of a plane may fall either side by rounding; they are rare.
        expect(ties).toBeLessThanOrEqual(liverVoxels * 1e-4);
      });
    }
  }
});

describe('caudate mask on another grid', () => {
  it('labels I exactly the liver voxels whose nearest caudate voxel is set (world lookup)', () => {
    const set = phantomLandmarks();
    const grid = GRIDS[0];
    const liver = liverVolume(grid.dims, grid.affine);
    const cDims: V3 = [48, 44, 40];
    const cAffine = gridAffine(rotation(-0.3, 0.1, 0.6), [1.0, 1.0, 1.2], cDims, [12, -18, 24]);
    const caudate = makeVolume(cDims, sphereMask(cDims, cAffine, [12, -18, 24], 16), cAffine, 'uint8');
    const { map, warnings } = buildSegmentMap(liver, set, { caudate });
    expect(warnings.some((w) => /segment I/.test(w))).toBe(false);
    let n = 0, caudateVoxels = 0, mismatches = 0;
    const [nx, ny, nz] = grid.dims;
    for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++, n++) {
      if (liver.data[n] === 0) continue;
      const c = voxelIndexAtWorld(caudate, worldOf(grid.affine, i, j, k));
      const isCaudate = c >= 0 && caudate.data[c] > 0;
      if (isCaudate) caudateVoxels++;
      if (isCaudate !== (map.labels.data[n] === 1)) mismatches++;
    }
    expect(caudateVoxels).toBeGreaterThan(1000);
    expect(mismatches).toBe(0);
  });

  it('warns when the caudate mask misses the liver', () => {
    const grid = GRIDS[1];
    const liver = liverVolume(grid.dims, grid.affine);
    const cDims: V3 = [10, 10, 10];
    const cAffine = gridAffine(rotation(0, 0, 0), [1, 1, 1], cDims, [300, 300, 300]);
    const caudate = makeVolume(cDims, new Uint8Array(1000).fill(1), cAffine, 'uint8');
    const { warnings } = buildSegmentMap(liver, phantomLandmarks(), { caudate, caudateFile: 'caudate.nii.gz' });
    expect(warnings.join('\n')).toMatch(/caudate\.nii\.gz: no caudate voxel lies inside the liver mask/);
  });
});

describe('Couinaud anatomy (source: Couinaud anatomy, common practice)', () => {
  const set = phantomLandmarks();
  const grid = GRIDS[0];
  const liver = liverVolume(grid.dims, grid.affine);
  const cDims: V3 = [48, 44, 40];
  const cAffine = gridAffine(rotation(0, 0, 0), [1, 1, 1], cDims, [12, -18, 24]);
  const caudate = makeVolume(cDims, sphereMask(cDims, cAffine, [12, -18, 24], 14), cAffine, 'uint8');
  const centroids = (splitIV: boolean) => {
    const { map } = buildSegmentMap(liver, set, { caudate, splitIV });
    const sums = new Map<number, number[]>();
    let n = 0;
    const [nx, ny, nz] = grid.dims;
    for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++, n++) {
      const l = map.labels.data[n];
      if (l === 0) continue;
      const p = worldOf(grid.affine, i, j, k);
      const s = sums.get(l) ?? [0, 0, 0, 0];
      s[0] += p[0]; s[1] += p[1]; s[2] += p[2]; s[3]++;
      sums.set(l, s);
    }
    const c = new Map<string, V3>();
    for (const [l, s] of sums) c.set(l === 4 ? (splitIV ? 'IVa' : 'IV') : NAME_OF[l], [s[0] / s[3], s[1] / s[3], s[2] / s[3]]);
    return c;
  };
  const whole = centroids(false);
  const split = centroids(true);
  const x = (s: string) => (whole.get(s) as V3)[0];
  const y = (s: string) => (whole.get(s) as V3)[1];
  const z = (s: string, m = whole) => (m.get(s) as V3)[2];

  it('has eight segments, or nine names with IV split', () => {
    expect([...whole.keys()].sort()).toEqual(['I', 'II', 'III', 'IV', 'V', 'VI', 'VII', 'VIII']);
    expect([...split.keys()].sort()).toEqual(['I', 'II', 'III', 'IVa', 'IVb', 'V', 'VI', 'VII', 'VIII']);
  });

  it('puts IVa above and IVb below the portal plane, and each superior segment above its partner', () => {
    expect(z('IVa', split)).toBeGreaterThan(z('IVb', split));
    expect(z('II')).toBeGreaterThan(z('III'));
    expect(z('VIII')).toBeGreaterThan(z('V'));
    expect(z('VII')).toBeGreaterThan(z('VI'));
    // Every IVa voxel above, every IVb voxel below the plane through the portal bifurcation.
    const { map } = buildSegmentMap(liver, set, { splitIV: true });
    const axis = [3, 5, 70].map((v) => v / Math.hypot(3, 5, 70));
    let n = 0, wrong = 0;
    const [nx, ny, nz] = grid.dims;
    for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++, n++) {
      const l = map.labels.data[n];
      if (l !== 4 && l !== 9) continue;
      const p = worldOf(grid.affine, i, j, k);
      const h = axis[0] * (p[0] - 10) + axis[1] * p[1] + axis[2] * (p[2] - 15);
      if ((l === 4) !== h > 0) wrong++;
    }
    expect(wrong).toBe(0);
  });

  it('right hepatic vein plane divides the right sections: posterior VI and VII behind anterior V and VIII', () => {
    for (const post of ['VI', 'VII']) for (const ant of ['V', 'VIII']) expect(y(post)).toBeLessThan(y(ant));
  });

  it('middle hepatic vein plane divides the hemilivers: V–VIII right of II–IV (RAS: right is +x)', () => {
    for (const r of ['V', 'VI', 'VII', 'VIII']) for (const l of ['II', 'III', 'IV']) expect(x(r)).toBeGreaterThan(x(l));
  });

  it('umbilical fissure divides IV from II/III: IV right of and anterior to II and III', () => {
    for (const l of ['II', 'III']) {
      expect(x('IV')).toBeGreaterThan(x(l));
    }
    expect(y('IV')).toBeGreaterThan(y('II'));
  });
});

describe('refusals', () => {
  it('refuses an empty liver mask', () => {
    const grid = GRIDS[1];
    const empty = makeVolume([10, 10, 10], new Uint8Array(1000), grid.affine, 'uint8');
    expect(() => buildSegmentMap(empty, phantomLandmarks(), { liverFile: 'liver.nii.gz' })).toThrow(
      /liver\.nii\.gz: the liver mask has no voxel above 0/,
    );
  });

  it('refuses bad landmarks before building, naming the landmark file', () => {
    const set = phantomLandmarks();
    set.points.umbilical_fissure = [100, 0, 30];
    try {
      buildSegmentMap(liverVolume([20, 20, 20], gridAffine(rotation(0, 0, 0), [10, 10, 10], [20, 20, 20], LIVER.centre)), set, {
        file: 'v1/landmarks.json',
      });
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(FalciformError);
      expect((e as FalciformError).kind).toBe('bad-landmarks');
      expect((e as Error).message).toMatch(/^v1\/landmarks\.json: .*umbilical_fissure/);
    }
  });

  it('warns when the landmarks fall outside the scan (another coordinate space)', () => {
    const set = phantomLandmarks();
    for (const name of LANDMARK_NAMES) {
      const [x, y, z] = set.points[name];
      set.points[name] = [x, y, z + 500];
    }
    const grid = GRIDS[1];
    const { warnings } = buildSegmentMap(liverVolume(grid.dims, grid.affine), set);
    expect(warnings.join('\n')).toMatch(/portal_bifurcation lies outside/);
  });

  it('reads liver voxels as value > 0 after scaling', () => {
    const grid = GRIDS[1];
    const mask = liverVolume(grid.dims, grid.affine);
    // Stored 0/1 with inter -1: physical values -1 and 0, so no voxel is liver.
    const shifted = makeVolume(grid.dims, mask.data, grid.affine, 'uint8', 1, -1);
    expect(() => buildSegmentMap(shifted, phantomLandmarks())).toThrow(/no voxel above 0/);
  });
});
