import { describe, expect, it } from 'vitest';
import { lesionsFromMask } from '../../src/lesions/components.js';
import { measureMaskLesion } from '../../src/lesions/measures.js';
import { ellipsoid, obliqueAffine, paint, volume, type Dims } from './fixtures.js';

function measureOne(dims: Dims, affine: number[], inside: (x: number, y: number, z: number) => boolean, scan = null as null | ReturnType<typeof volume>) {
  const data = new Uint8Array(dims[0] * dims[1] * dims[2]);
  paint(data, dims, affine, inside, 1);
  const mask = volume(dims, data, affine, 'uint8');
  const found = lesionsFromMask(mask);
  expect(found.lesions).toHaveLength(1);
  return measureMaskLesion('L1', mask, found.lesions[0], scan);
}

describe('analytic shapes', () => {
  it('a sphere of radius r: longest diameter 2r within one voxel, volume 4/3·π·r³', () => {
    // Source: analytic geometry. The sphere's centre is off the voxel centres on purpose.
    const s = 0.5, r = 10;
    const dims: Dims = [48, 48, 48];
    const affine = obliqueAffine([s, s, s], [0, 0, 0], [-12, -12, -12]);
    const l = measureOne(dims, affine, ellipsoid([0.13, -0.21, 0.07], [r, r, r]));
    expect(Math.abs(l.longestAxialMm - 2 * r)).toBeLessThanOrEqual(s);
    expect(l.longestAxialMm).toBeLessThanOrEqual(2 * r);
    expect(Math.abs(l.shortAxisMm - 2 * r)).toBeLessThanOrEqual(s);
    expect(Math.abs((l.max3dMm as number) - 2 * r)).toBeLessThanOrEqual(s * Math.sqrt(3));
    // Counting lattice points in a ball of 20 voxel radii errs by well under 1 % (the error grows
    // like the surface, r^2, against the volume's r^3).
    const exact = (4 / 3) * Math.PI * r ** 3 / 1000;
    expect(Math.abs((l.volumeMl as number) - exact) / exact).toBeLessThan(0.01);
    l.centroidMm.forEach((x, d) => expect(Math.abs(x - [0.13, -0.21, 0.07][d])).toBeLessThan(0.02));
  });

  it('an ellipsoid on an oblique, anisotropic grid: axes 2a, 2b in the slice, 3-D diameter 2a', () => {
    // Source: analytic geometry. The ellipsoid's axes follow the tilted grid's axes, so the slice
    // through the centre holds the full a–b ellipse; in-plane spacing 0.6 × 0.9 mm, 2 mm slices.
    const sp = [0.6, 0.9, 2];
    const angles = [0.2, -0.1, 0.5];
    const affine = obliqueAffine(sp, angles, [0, 0, 0]);
    const dims: Dims = [60, 40, 16];
    // Centre on the voxel centre (30, 20, 8).
    const c = [0, 1, 2].map((r) => affine[4 * r] * 30 + affine[4 * r + 1] * 20 + affine[4 * r + 2] * 8);
    const [a, b, cc] = [15, 11, 9];
    const l = measureOne(dims, affine, ellipsoid(c, [a, b, cc], angles));
    const pixelDiag = Math.hypot(sp[0], sp[1]);
    expect(Math.abs(l.longestAxialMm - 2 * a)).toBeLessThanOrEqual(pixelDiag);
    expect(Math.abs(l.shortAxisMm - 2 * b)).toBeLessThanOrEqual(pixelDiag);
    expect(Math.abs((l.max3dMm as number) - 2 * a)).toBeLessThanOrEqual(Math.hypot(...sp));
    const exact = (4 / 3) * Math.PI * a * b * cc / 1000;
    expect(Math.abs((l.volumeMl as number) - exact) / exact).toBeLessThan(0.03);
    // The diameter's ends lie on the central slice, about ±a along the ellipsoid's first axis.
    const [p, q] = l.longestAxialEndpointsMm as [readonly number[], readonly number[]];
    const axis = [affine[0] / sp[0], affine[4] / sp[0], affine[8] / sp[0]];
    const along = (x: readonly number[]) => (x[0] - c[0]) * axis[0] + (x[1] - c[1]) * axis[1] + (x[2] - c[2]) * axis[2];
    expect(Math.abs(Math.abs(along(p) - along(q)) - 2 * a)).toBeLessThanOrEqual(pixelDiag);
  });

  it('a rectangle in one slice: longest is the diagonal, short axis the width across it', () => {
    // Source: analytic geometry. Voxel centres of a 5 × 3 block of 1 × 2 mm pixels span 4 × 4 mm:
    // the diagonal is √32 and the square's width across its diagonal is also √32 (a square).
    const dims: Dims = [10, 10, 3];
    const affine = [1, 0, 0, 0, 0, 2, 0, 0, 0, 0, 3, 0, 0, 0, 0, 1];
    const data = new Uint8Array(300);
    for (let j = 2; j < 5; j++) for (let i = 1; i < 6; i++) data[i + 10 * (j + 10 * 1)] = 1;
    const mask = volume(dims, data, affine, 'uint8');
    const l = measureMaskLesion('L1', mask, lesionsFromMask(mask).lesions[0], null);
    expect(l.longestAxialMm).toBeCloseTo(Math.sqrt(32), 12);
    expect(l.shortAxisMm).toBeCloseTo(Math.sqrt(32), 12);
    expect(l.max3dMm).toBeCloseTo(Math.sqrt(32), 12);
    expect(l.volumeMl).toBeCloseTo((15 * 6) / 1000, 12);
    expect(l.centroidMm).toEqual([3, 6, 3]);
  });

  it('a thin line of voxels has zero short axis; a single voxel measures zero', () => {
    // Source: the definitions (brief, "Measures").
    const dims: Dims = [12, 12, 3];
    const affine = [0.8, 0, 0, 0, 0, 0.8, 0, 0, 0, 0, 2, 0, 0, 0, 0, 1];
    const data = new Uint8Array(12 * 12 * 3);
    for (let i = 2; i < 9; i++) data[i + 12 * (i + 12)] = 1;
    data[1 + 12 * (10 + 12 * 2)] = 1;
    const mask = volume(dims, data, affine, 'uint8');
    const [line, dot] = lesionsFromMask(mask).lesions.map((lv) => measureMaskLesion('L', mask, lv, null));
    expect(line.longestAxialMm).toBeCloseTo(6 * 0.8 * Math.SQRT2, 12);
    expect(line.shortAxisMm).toBeCloseTo(0, 12);
    expect(dot.longestAxialMm).toBe(0);
    expect(dot.shortAxisMm).toBe(0);
    expect(dot.max3dMm).toBe(0);
    expect(dot.voxelCount).toBe(1);
  });
});

describe('mean scan value', () => {
  it('reads a scan on another grid through world coordinates, after scaling', () => {
    // Source: the definition; a scan whose value encodes its own voxel's i index.
    const dims: Dims = [20, 20, 10];
    const affine = [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1];
    const scanDims: Dims = [40, 20, 10];
    const scanAffine = [0.5, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1];
    const scanData = new Int16Array(40 * 20 * 10);
    for (let n = 0; n < scanData.length; n++) scanData[n] = n % 40;
    const scan = volume(scanDims, scanData, scanAffine, 'int16', 2, 1);
    const l = measureOne(dims, affine, (x, y, z) => x >= 3 && x <= 5 && y >= 2 && y <= 3 && z >= 4 && z <= 5, scan);
    // Mask voxel at x lands on scan voxel i = 2x: mean of 6, 8, 10 → 8, scaled 8·2 + 1.
    expect(l.meanValue).toBeCloseTo(17, 12);
  });

  it('is null when the lesion lies outside the scan', () => {
    const scan = volume([4, 4, 4], new Int16Array(64), [1, 0, 0, 100, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1], 'int16');
    const l = measureOne([10, 10, 10], [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1], (x, y, z) => x === 2 && y === 2 && z === 2, scan);
    expect(l.meanValue).toBeNull();
  });
});
