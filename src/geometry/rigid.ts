import type { Vec3 } from './mat4.js';
import { cross, dot, normalise } from './vec3.js';
import { det3, mul3, symmetricEigen3, transpose3, type Mat3 } from './eigen.js';

/**
 * Rigid motions (rotation + translation, no scale) and their least-squares fit to paired points.
 *
 * The fit is Kabsch's, with Umeyama's treatment of reflections: the rotation maximising
 * trace(R·H) over proper rotations (det +1), where H is the cross-covariance of the centred point
 * sets. Scale is not fitted: a liver does not change size between visits in a way a registration
 * should absorb, and lesion sizes must not be rescaled.
 */

/** y = R·x + t; `rotation` row-major 3×3. */
export interface RigidTransform {
  readonly rotation: Mat3;
  readonly translation: Vec3;
}

export interface RigidFit {
  transform: RigidTransform;
  /** Root mean square distance between the moved points and their partners, mm. */
  residualMm: number;
}

export const IDENTITY_RIGID: RigidTransform = { rotation: [1, 0, 0, 0, 1, 0, 0, 0, 1], translation: [0, 0, 0] };

export function applyRigid(t: RigidTransform, p: Vec3): [number, number, number] {
  const r = t.rotation;
  return [
    r[0] * p[0] + r[1] * p[1] + r[2] * p[2] + t.translation[0],
    r[3] * p[0] + r[4] * p[1] + r[5] * p[2] + t.translation[1],
    r[6] * p[0] + r[7] * p[1] + r[8] * p[2] + t.translation[2],
  ];
}

export function invertRigid(t: RigidTransform): RigidTransform {
  const rt = transpose3(t.rotation);
  const [x, y, z] = t.translation;
  return {
    rotation: rt,
    translation: [-(rt[0] * x + rt[1] * y + rt[2] * z), -(rt[3] * x + rt[4] * y + rt[5] * z), -(rt[6] * x + rt[7] * y + rt[8] * z)],
  };
}

/** a after b: x ↦ a(b(x)). */
export function composeRigid(a: RigidTransform, b: RigidTransform): RigidTransform {
  return { rotation: mul3(a.rotation, b.rotation), translation: applyRigid(a, b.translation) };
}

/** Angle of a rotation matrix in degrees (0–180). */
export function rotationAngleDeg(r: Mat3): number {
  const c = Math.min(1, Math.max(-1, (r[0] + r[4] + r[8] - 1) / 2));
  return (Math.acos(c) * 180) / Math.PI;
}

/**
 * Least-squares rigid transform taking `moving[i]` onto `fixed[i]`. Points are flat xyz triples
 * (Float64Array or number[]) so the surface fit can reuse buffers; `count` pairs are used.
 * Throws when the moving points are (nearly) collinear: a rotation about their line is then undefined.
 */
export function fitRigidFlat(moving: ArrayLike<number>, fixed: ArrayLike<number>, count: number): RigidFit {
  if (count < 3) throw new Error('a rigid fit needs at least three point pairs');
  let mx = 0, my = 0, mz = 0, fx = 0, fy = 0, fz = 0;
  for (let n = 0; n < count; n++) {
    mx += moving[3 * n]; my += moving[3 * n + 1]; mz += moving[3 * n + 2];
    fx += fixed[3 * n]; fy += fixed[3 * n + 1]; fz += fixed[3 * n + 2];
  }
  mx /= count; my /= count; mz /= count; fx /= count; fy /= count; fz /= count;
  // H = Σ (x − x̄)(y − ȳ)ᵀ, moving along rows, fixed along columns.
  const h = [0, 0, 0, 0, 0, 0, 0, 0, 0];
  for (let n = 0; n < count; n++) {
    const a0 = moving[3 * n] - mx, a1 = moving[3 * n + 1] - my, a2 = moving[3 * n + 2] - mz;
    const b0 = fixed[3 * n] - fx, b1 = fixed[3 * n + 1] - fy, b2 = fixed[3 * n + 2] - fz;
    h[0] += a0 * b0; h[1] += a0 * b1; h[2] += a0 * b2;
    h[3] += a1 * b0; h[4] += a1 * b1; h[5] += a1 * b2;
    h[6] += a2 * b0; h[7] += a2 * b1; h[8] += a2 * b2;
  }
  const rotation = properRotationFromCovariance(h);
  const c = applyRigid({ rotation, translation: [0, 0, 0] }, [mx, my, mz]);
  const transform: RigidTransform = { rotation, translation: [fx - c[0], fy - c[1], fz - c[2]] };
  let ss = 0;
  for (let n = 0; n < count; n++) {
    const p = applyRigid(transform, [moving[3 * n], moving[3 * n + 1], moving[3 * n + 2]]);
    ss += (p[0] - fixed[3 * n]) ** 2 + (p[1] - fixed[3 * n + 1]) ** 2 + (p[2] - fixed[3 * n + 2]) ** 2;
  }
  return { transform, residualMm: Math.sqrt(ss / count) };
}

/** The same fit for point lists. */
export function fitRigid(moving: readonly Vec3[], fixed: readonly Vec3[]): RigidFit {
  if (moving.length !== fixed.length) throw new Error('a rigid fit needs the same number of moving and fixed points');
  return fitRigidFlat(moving.flat(), fixed.flat(), moving.length);
}

/**
 * R maximising trace(R·H) with det R = +1. With H = U·S·Vᵀ this is R = V·Uᵀ when both bases are
 * right-handed and the smallest singular value carries its sign (Umeyama's reflection fix). V comes
 * from the eigenvectors of HᵀH; u1, u2 from H·v / σ; u3 = u1 × u2 so U is right-handed by
 * construction, which also covers coplanar points (σ3 = 0).
 */
function properRotationFromCovariance(h: number[]): number[] {
  const ht = transpose3(h);
  const { values, vectors: v } = symmetricEigen3(mul3(ht, h));
  const s1 = Math.sqrt(Math.max(0, values[0]));
  const s2 = Math.sqrt(Math.max(0, values[1]));
  if (s1 === 0 || s2 <= 1e-9 * s1) throw new Error('the points are collinear; a rotation cannot be fitted');
  const col = (m: number[], c: number): [number, number, number] => [m[c], m[3 + c], m[6 + c]];
  const hv = (x: Vec3): [number, number, number] => [
    h[0] * x[0] + h[1] * x[1] + h[2] * x[2],
    h[3] * x[0] + h[4] * x[1] + h[5] * x[2],
    h[6] * x[0] + h[7] * x[1] + h[8] * x[2],
  ];
  const v1 = col(v, 0), v2 = col(v, 1), v3 = col(v, 2);
  const u1 = normalise(hv(v1));
  // Gram–Schmidt against u1 keeps U orthonormal when σ1 ≈ σ2 and rounding mixes the two.
  const w = hv(v2);
  const d = dot(u1, w);
  const u2 = normalise([w[0] - d * u1[0], w[1] - d * u1[1], w[2] - d * u1[2]]);
  const u3 = cross(u1, u2);
  // symmetricEigen3 returns a right-handed V, so V·Uᵀ is a proper rotation.
  const U = [u1[0], u2[0], u3[0], u1[1], u2[1], u3[1], u1[2], u2[2], u3[2]];
  const V = [v1[0], v2[0], v3[0], v1[1], v2[1], v3[1], v1[2], v2[2], v3[2]];
  const r = mul3(V, transpose3(U));
  if (det3(r) < 0) throw new Error('rigid fit produced a reflection');
  return r;
}
