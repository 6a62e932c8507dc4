import { describe, expect, it } from 'vitest';
import { paintBall } from '../../src/image/brush.js';
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
});
