import { describe, expect, it } from 'vitest';
import { det3, mul3, symmetricEigen3, transpose3 } from '../../src/geometry/eigen.js';
import { applyRigid, composeRigid, fitRigid, invertRigid, rotationAngleDeg } from '../../src/geometry/rigid.js';
import type { Vec3 } from '../../src/geometry/mat4.js';
import { LANDMARK_NAMES } from '../../src/segments/landmarks.js';
import { angleBetween, axisAngle, LANDMARKS, move, randomMotion, seeded, unmove, type V3 } from '../followup/phantom.js';

describe('symmetric 3×3 eigen-decomposition (Jacobi)', () => {
  it('reconstructs the matrix from a right-handed orthonormal basis, largest eigenvalue first', () => {
    const rand = seeded(7);
    for (let trial = 0; trial < 50; trial++) {
      const R = randomMotion(rand, 180, 0).R;
      const d = [rand() * 100, rand() * 10, rand()];
      const A = mul3(mul3(R, [d[0], 0, 0, 0, d[1], 0, 0, 0, d[2]]), transpose3(R));
      const { values, vectors } = symmetricEigen3(A);
      expect(values[0]).toBeGreaterThanOrEqual(values[1]);
      expect(values[1]).toBeGreaterThanOrEqual(values[2]);
      const sorted = [...d].sort((a, b) => b - a);
      values.forEach((v, n) => expect(v).toBeCloseTo(sorted[n], 9));
      expect(det3(vectors)).toBeCloseTo(1, 12);
      const back = mul3(mul3(vectors, [values[0], 0, 0, 0, values[1], 0, 0, 0, values[2]]), transpose3(vectors));
      back.forEach((v, n) => expect(v).toBeCloseTo(A[n], 9));
    }
  });

  it('handles repeated eigenvalues and a diagonal matrix', () => {
    const { values, vectors } = symmetricEigen3([2, 0, 0, 0, 5, 0, 0, 0, 2]);
    expect(values).toEqual([5, 2, 2]);
    expect(Math.abs(vectors[1])).toBeCloseTo(1, 12);
    expect(det3(vectors)).toBeCloseTo(1, 12);
  });
});

describe('rigid least-squares fit (Kabsch, with the reflection fix)', () => {
  const landmarks = LANDMARK_NAMES.map((n) => LANDMARKS.points[n] as V3);

  it('recovers random rigid motions of a landmark set within 1 mm and 0.5°', () => {
    // Source: the product's acceptance bound (1 mm, 0.5°); the fit itself is exact for noiseless points.
    const rand = seeded(2026);
    for (let trial = 0; trial < 25; trial++) {
      const m = randomMotion(rand, 40, 50);
      const moved = landmarks.map((p) => move(m, p));
      // Fit the later visit (moved) back onto the reference: the inverse motion.
      const { transform, residualMm } = fitRigid(moved, landmarks);
      expect(residualMm).toBeLessThan(1e-6);
      expect(angleBetween(transform.rotation, transpose3(m.R))).toBeLessThan(0.5);
      for (const p of landmarks) {
        const q = applyRigid(transform, move(m, p));
        expect(Math.hypot(q[0] - p[0], q[1] - p[1], q[2] - p[2])).toBeLessThan(1);
      }
    }
  });

  it('stays within bounds with 0.5 mm placement noise, and reports that noise as the residual', () => {
    const rand = seeded(99);
    const m = randomMotion(rand, 25, 30);
    const noisy = landmarks.map((p) => {
      const q = move(m, p);
      return [q[0] + (rand() - 0.5), q[1] + (rand() - 0.5), q[2] + (rand() - 0.5)] as Vec3;
    });
    const { transform, residualMm } = fitRigid(noisy, landmarks);
    expect(residualMm).toBeGreaterThan(0.05);
    expect(residualMm).toBeLessThan(0.9);
    const centre = landmarks[5];
    const q = applyRigid(transform, move(m, centre));
    expect(Math.hypot(q[0] - centre[0], q[1] - centre[1], q[2] - centre[2])).toBeLessThan(1);
    expect(angleBetween(transform.rotation, transpose3(m.R))).toBeLessThan(2);
  });

  it('returns a proper rotation, never a reflection, for mirrored points', () => {
    // A mirror image has no rigid fit; the best proper rotation must still have det +1 (Umeyama's fix).
    const mirrored = landmarks.map((p) => [-p[0], p[1], p[2]] as Vec3);
    const { transform, residualMm } = fitRigid(mirrored, landmarks);
    expect(det3(transform.rotation)).toBeCloseTo(1, 10);
    expect(residualMm).toBeGreaterThan(1);
  });

  it('fits three points (coplanar, smallest singular value zero)', () => {
    const three: Vec3[] = [[0, 0, 0], [40, 0, 0], [0, 25, 0]];
    const m = { R: axisAngle([1, 2, 3], 33), t: [5, -7, 9] as V3 };
    const { transform } = fitRigid(three.map((p) => move(m, p)), three);
    expect(angleBetween(transform.rotation, transpose3(m.R))).toBeLessThan(1e-4);
  });

  it('refuses collinear points', () => {
    expect(() => fitRigid([[0, 0, 0], [1, 1, 1], [2, 2, 2]], [[0, 0, 0], [1, 1, 1], [2, 2, 2]])).toThrow(/collinear/);
  });

  it('inverts and composes', () => {
    const m = { R: axisAngle([0, 0, 1], 30), t: [10, 0, 0] as V3 };
    const t = { rotation: m.R, translation: m.t };
    const p: V3 = [3, 4, 5];
    const back = applyRigid(invertRigid(t), applyRigid(t, p));
    back.forEach((v, n) => expect(v).toBeCloseTo(p[n], 10));
    const u = unmove(m, move(m, p));
    u.forEach((v, n) => expect(v).toBeCloseTo(p[n], 10));
    expect(rotationAngleDeg(composeRigid(t, t).rotation)).toBeCloseTo(60, 9);
  });
});
