import { describe, expect, it } from 'vitest';
import { DAB_SPACING, paintBall, paintBalls, strokeDabs } from '../../src/image/brush.js';
import { makeVolume } from '../../src/volume/volume.js';
import { obliqueAffine } from '../lesions/fixtures.js';

describe('spherical brush', () => {
  it('sets the voxels within the radius, in world mm, on an oblique anisotropic grid', () => {
    const dims = [40, 36, 20] as const;
    const affine = obliqueAffine([0.8, 1.1, 2.5], [0.2, -0.1, 0.3], [-15, -18, -20]);
    const mask = makeVolume(dims, new Uint8Array(40 * 36 * 20), affine, 'uint8');
    const centre: [number, number, number] = [1.3, -0.7, 2.1];
    const { data, changed } = paintBall(mask, centre, 6, 1);
    // Count by brute force over every voxel centre.
    let expected = 0;
    for (let k = 0; k < 20; k++) for (let j = 0; j < 36; j++) for (let i = 0; i < 40; i++) {
      const w = [0, 1, 2].map((r) => affine[4 * r] * i + affine[4 * r + 1] * j + affine[4 * r + 2] * k + affine[4 * r + 3] - centre[r]);
      const inside = Math.hypot(...w) <= 6;
      if (inside) expected++;
      expect(data[i + 40 * (j + 36 * k)]).toBe(inside ? 1 : 0);
    }
    expect(changed).toBe(expected);
    // About the ball's volume, 4/3·π·6³ mm³, in voxels of 0.8·1.1·2.5 mm³.
    expect(changed).toBeGreaterThan(0.8 * (4 / 3) * Math.PI * 216 / 2.2);
    expect(changed).toBeLessThan(1.2 * (4 / 3) * Math.PI * 216 / 2.2);
    expect(mask.data.every((v) => v === 0)).toBe(true);
    // Erasing the same ball takes back exactly what was set.
    const erased = paintBall(makeVolume(dims, data as Uint8Array, affine, 'uint8'), centre, 6, 0);
    expect(erased.changed).toBe(expected);
  });

  it('interpolates a fast drag into dabs at most half a radius apart, ends included', () => {
    // Three pointer events far apart, as a quick drag gives: 30 mm then 8 mm.
    const path: [number, number, number][] = [[0, 0, 0], [30, 0, 0], [30, 8, 0]];
    const dabs = strokeDabs(path, 4);
    expect(dabs[0]).toEqual([0, 0, 0]);
    expect(dabs[dabs.length - 1]).toEqual([30, 8, 0]);
    for (let n = 1; n < dabs.length; n++) {
      const d = Math.hypot(...[0, 1, 2].map((c) => dabs[n][c] - dabs[n - 1][c]));
      expect(d).toBeLessThanOrEqual(DAB_SPACING * 4 + 1e-9);
    }
    // ceil(30 / 2) + ceil(8 / 2) steps after the first point.
    expect(dabs.length).toBe(1 + 15 + 4);
    expect(strokeDabs([[1, 2, 3]], 4)).toEqual([[1, 2, 3]]);
  });

  it('paints a stroke as a capsule with no gaps: every voxel within 0.968 r of the path set, none beyond r', () => {
    const dims = [60, 40, 16] as const;
    const affine = obliqueAffine([0.8, 1.1, 2.5], [0.2, -0.1, 0.3], [-24, -22, -20]);
    const mask = makeVolume(dims, new Uint8Array(60 * 40 * 16), affine, 'uint8');
    const a: [number, number, number] = [-12, -5, 0], b: [number, number, number] = [14, 6, 1];
    const r = 5;
    const { data, changed } = paintBalls(mask, strokeDabs([a, b], r), r, 1);
    // Analytic: balls of radius r spaced s = r/2 along a line cover the capsule of radius √(r² − s²/4) = 0.968 r.
    const inner = Math.sqrt(r * r - (DAB_SPACING * r) ** 2 / 4);
    const ab = [0, 1, 2].map((c) => b[c] - a[c]);
    const ab2 = ab[0] ** 2 + ab[1] ** 2 + ab[2] ** 2;
    let set = 0, innerCount = 0;
    for (let k = 0; k < 16; k++) for (let j = 0; j < 40; j++) for (let i = 0; i < 60; i++) {
      const w = [0, 1, 2].map((q) => affine[4 * q] * i + affine[4 * q + 1] * j + affine[4 * q + 2] * k + affine[4 * q + 3]);
      const t = Math.max(0, Math.min(1, ((w[0] - a[0]) * ab[0] + (w[1] - a[1]) * ab[1] + (w[2] - a[2]) * ab[2]) / ab2));
      const dist = Math.hypot(...[0, 1, 2].map((q) => w[q] - (a[q] + t * ab[q])));
      const v = data[i + 60 * (j + 40 * k)];
      if (dist <= inner) { expect(v).toBe(1); innerCount++; }
      if (dist > r) expect(v).toBe(0);
      if (v) set++;
    }
    expect(innerCount).toBeGreaterThan(100);
    // Each voxel counts once however many dabs cover it.
    expect(changed).toBe(set);
  });
});
