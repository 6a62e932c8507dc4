import { describe, expect, it } from 'vitest';
import { lesionsFromMask } from '../../src/lesions/components.js';
import { longestInsideAxial, MAX_PAIR_TESTS } from '../../src/lesions/inside-diameter.js';
import { isFalciformError } from '../../src/errors.js';
import { measureMaskLesion } from '../../src/lesions/measures.js';
import { ellipsoid, obliqueAffine, paint, volume, type Dims } from './fixtures.js';

// The viable diameter of mRECIST (Lencioni and Llovet, Semin Liver Dis 2010;30:52-60, from memory:
// "the longest viable tumor diameter", not crossing necrotic areas) is the longest straight in-slice
// segment that stays inside the enhancing region. Expected values below are analytic geometry.
//
// Ring of radii r < R: a chord of the outer circle that misses the inner disc lies in the half-plane
// beyond some line that separates it from the inner disc, so its distance from the centre is at least
// r, and its length at most 2·√(R² − r²), reached by the chord tangent to the inner circle.
// Crescent (outer disc of radius R minus a disc of radius r whose centre lies d < r from the outer
// centre): by the same separating-line argument, 2·√(R² − (r − d)²), the chord tangent to the removed
// disc at its point nearest the outer centre.
//
// Tolerance: ends are voxel centres and the line may clip a quarter voxel (see the module); one voxel
// diagonal of the slice grid.

function region(dims: Dims, affine: number[], inside: (x: number, y: number, z: number) => boolean) {
  const data = new Uint8Array(dims[0] * dims[1] * dims[2]);
  paint(data, dims, affine, inside, 1);
  const mask = volume(dims, data, affine, 'uint8');
  const found = lesionsFromMask(mask);
  expect(found.lesions).toHaveLength(1);
  return { mask, voxels: found.lesions[0], feret: measureMaskLesion('V1', mask, found.lesions[0], null).longestAxialMm };
}

const ring = (c: readonly number[], R: number, r: number) => (x: number, y: number) => {
  const d2 = (x - c[0]) ** 2 + (y - c[1]) ** 2;
  return d2 <= R * R && d2 >= r * r;
};

describe('longest axial diameter inside a region', () => {
  it('a solid disc: the longest axial diameter itself, 2R within one voxel', () => {
    const s = 0.5, R = 10;
    const dims: Dims = [48, 48, 1];
    const affine = obliqueAffine([s, s, 2.5], [0, 0, 0], [-12, -12, 0]);
    const { mask, voxels, feret } = region(dims, affine, (x, y) => (x - 0.13) ** 2 + (y + 0.21) ** 2 <= R * R);
    const d = longestInsideAxial(mask, voxels);
    expect(d.lengthMm).toBeCloseTo(feret, 9);
    expect(Math.abs(d.lengthMm - 2 * R)).toBeLessThanOrEqual(s);
    const [a, b] = d.endpointsMm!;
    expect(Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2])).toBeCloseTo(d.lengthMm, 9);
  });

  it('a solid sphere: the longest axial diameter itself', () => {
    const s = 0.5, R = 10;
    const dims: Dims = [48, 48, 48];
    const affine = obliqueAffine([s, s, s], [0, 0, 0], [-12, -12, -12]);
    const { mask, voxels, feret } = region(dims, affine, ellipsoid([0.13, -0.21, 0.07], [R, R, R]));
    expect(longestInsideAxial(mask, voxels).lengthMm).toBeCloseTo(feret, 9);
  });

  it('a ring of radii 12 and 20 mm: the tangent chord 2·√(R² − r²) = 32 mm, not the 40 mm width', () => {
    const s = 0.5, R = 20, r = 12;
    const dims: Dims = [88, 88, 1];
    const affine = obliqueAffine([s, s, 2.5], [0, 0, 0], [-22, -22, 0]);
    const { mask, voxels, feret } = region(dims, affine, ring([0.1, -0.2], R, r));
    const d = longestInsideAxial(mask, voxels);
    const expected = 2 * Math.sqrt(R * R - r * r);
    expect(Math.abs(d.lengthMm - expected)).toBeLessThanOrEqual(s * Math.SQRT2);
    expect(Math.abs(feret - 2 * R)).toBeLessThanOrEqual(s);
    // The segment found misses the necrotic centre: its distance from the centre is at least r less a voxel.
    const [a, b] = d.endpointsMm!;
    const cx = 0.1, cy = -0.2;
    const cross = Math.abs((b[0] - a[0]) * (cy - a[1]) - (b[1] - a[1]) * (cx - a[0])) / d.lengthMm;
    expect(cross).toBeGreaterThan(r - s * Math.SQRT2);
  });

  it('a crescent (R 20, removed disc r 18 at d 10 mm): 2·√(R² − (r − d)²) = 36.7 mm', () => {
    const s = 0.5, R = 20, r = 18, dd = 10;
    const dims: Dims = [88, 88, 1];
    const affine = obliqueAffine([s, s, 2.5], [0, 0, 0], [-22, -22, 0]);
    const { mask, voxels, feret } = region(dims, affine, (x, y) => x * x + y * y <= R * R && (x - dd) ** 2 + y ** 2 > r * r);
    const expected = 2 * Math.sqrt(R * R - (r - dd) ** 2);
    const d = longestInsideAxial(mask, voxels);
    expect(Math.abs(d.lengthMm - expected)).toBeLessThanOrEqual(s * Math.SQRT2);
    // The crescent's outer width is still the full 40 mm diameter (its horns are opposite each other).
    expect(feret).toBeGreaterThan(2 * R - 2 * s);
  });

  it('a spherical shell on anisotropic voxels (0.6 × 0.9 mm, 3 mm slices): 2·√(R² − r²) in every slice that cuts the core', () => {
    // Source: analytic geometry; at height z the slice is a ring of radii √(R² − z²) and √(r² − z²),
    // whose tangent chord is 2·√(R² − r²) whatever z.
    const sp = [0.6, 0.9, 3];
    const R = 18, r = 10;
    const dims: Dims = [72, 48, 15];
    const affine = obliqueAffine(sp, [0, 0, 0], [-21.3, -21.15, -21]);
    const { mask, voxels, feret } = region(dims, affine, (x, y, z) => {
      const d2 = x * x + y * y + z * z;
      return d2 <= R * R && d2 >= r * r;
    });
    const d = longestInsideAxial(mask, voxels);
    const expected = 2 * Math.sqrt(R * R - r * r);
    expect(Math.abs(d.lengthMm - expected)).toBeLessThanOrEqual(Math.hypot(0.6, 0.9));
    expect(Math.abs(feret - 2 * R)).toBeLessThanOrEqual(0.9);
  });

  it('a ring on an oblique grid: the same chord, measured in the tilted slice plane', () => {
    const sp = [0.5, 0.7, 2];
    const angles = [0.2, -0.15, 0.6];
    const affine = obliqueAffine(sp, angles, [0, 0, 0]);
    const dims: Dims = [96, 70, 3];
    const R = 20, r = 14;
    // The ring lies in the grid's middle slice plane, centred on grid point (48, 35, 1).
    const inv = obliqueAffine([1, 1, 1], angles, [0, 0, 0]);
    const centre = [0, 1, 2].map((row) => affine[4 * row] * 48 + affine[4 * row + 1] * 35 + affine[4 * row + 2] * 1 + affine[4 * row + 3]);
    const { mask, voxels } = region(dims, affine, (x, y, z) => {
      const d = [x - centre[0], y - centre[1], z - centre[2]];
      const u = inv[0] * d[0] + inv[4] * d[1] + inv[8] * d[2];
      const v = inv[1] * d[0] + inv[5] * d[1] + inv[9] * d[2];
      const w = inv[2] * d[0] + inv[6] * d[1] + inv[10] * d[2];
      const q = u * u + v * v;
      return Math.abs(w) < 0.5 && q <= R * R && q >= r * r;
    });
    const d = longestInsideAxial(mask, voxels);
    expect(Math.abs(d.lengthMm - 2 * Math.sqrt(R * R - r * r))).toBeLessThanOrEqual(Math.hypot(0.5, 0.7));
  });

  it('a single voxel measures 0 mm', () => {
    const dims: Dims = [4, 4, 4];
    const data = new Uint8Array(64);
    data[21] = 1;
    const mask = volume(dims, data, obliqueAffine([1, 1, 1], [0, 0, 0], [0, 0, 0]), 'uint8');
    const d = longestInsideAxial(mask, lesionsFromMask(mask).lesions[0]);
    expect(d.lengthMm).toBe(0);
    expect(d.endpointsMm![0]).toEqual([1, 1, 1]);
  });
});

describe('bounded cost on large thin rims', () => {
  const ringSlices = (dims: Dims, radii: (k: number) => [number, number]) => {
    const [nx, ny, nz] = dims;
    const data = new Uint8Array(nx * ny * nz);
    for (let k = 0; k < nz; k++) {
      const [R, r] = radii(k);
      for (let j = 0; j < ny; j++)
        for (let i = 0; i < nx; i++) {
          const d = Math.hypot(i - (nx - 1) / 2, j - (ny - 1) / 2);
          if (d <= R && d > r) data[i + nx * (j + ny * k)] = 1;
        }
    }
    const mask = volume(dims, data, obliqueAffine([1, 1, 1], [0, 0, 0], [0, 0, 0]), 'uint8');
    return { mask, voxels: lesionsFromMask(mask).lesions[0] };
  };

  it('a 200-slice cylinder of one ring (200 times the pairs of one slice, were each measured): 2·√(R² − r²)', () => {
    // Source: analytic geometry (the tangent chord, as above); R = 60, r = 50 voxel units of 1 mm.
    const { mask, voxels } = ringSlices([124, 124, 200], () => [60, 50]);
    const d = longestInsideAxial(mask, voxels);
    expect(Math.abs(d.lengthMm - 2 * Math.sqrt(60 * 60 - 50 * 50))).toBeLessThanOrEqual(Math.SQRT2);
  });

  it('a rim whose slices need more than the cap of voxel-pair tests is refused as too large, naming the file', () => {
    // One slice of a thin ring 2000 voxels across: some 12,500 boundary voxels, 7.8·10⁷ pairs.
    const { mask, voxels } = ringSlices([2004, 2004, 1], () => [1000, 998]);
    let caught: unknown;
    try {
      longestInsideAxial(mask, voxels, 'v2/viable.nii.gz');
    } catch (e) {
      caught = e;
    }
    expect(isFalciformError(caught) && caught.kind).toBe('too-large');
    expect((caught as Error).message).toMatch(/^v2\/viable\.nii\.gz: a component of \d+ voxels would need more than 5e\+7 voxel-pair tests/);
    expect(MAX_PAIR_TESTS).toBe(5e7);
  });
});
