import { describe, expect, it } from 'vitest';
import { invertAffine, multiply, transformPoint } from '../../src/geometry/mat4.js';
import { axialAxis } from '../../src/volume/volume.js';

describe('affine inverse', () => {
  it('undoes an oblique, anisotropic affine', () => {
    const c = Math.cos(0.3), s = Math.sin(0.3);
    const a = [0.7 * c, -0.7 * s, 0, -120, 0.7 * s, 0.7 * c, 0, 40, 0, 0, 2.5, 11, 0, 0, 0, 1];
    const prod = multiply(invertAffine(a), a);
    prod.forEach((v, n) => expect(v).toBeCloseTo(n % 5 === 0 ? 1 : 0, 12));
    const p = transformPoint(a, [10, 20, 30]);
    const back = transformPoint(invertAffine(a), p);
    expect(back[0]).toBeCloseTo(10, 10);
    expect(back[2]).toBeCloseTo(30, 10);
  });

  it('refuses a singular affine', () => {
    expect(() => invertAffine([1, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1])).toThrow(/singular/);
  });
});

describe('axial axis', () => {
  it('is the grid axis along world S, also for a coronal acquisition', () => {
    expect(axialAxis([1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1])).toBe(2);
    // Coronal slices: k runs along A, j along S (a common scanner layout).
    expect(axialAxis([1, 0, 0, 0, 0, 0, 1, 0, 0, 1, 0, 0, 0, 0, 0, 1])).toBe(1);
  });
});
