/**
 * Eigen-decomposition of a symmetric 3×3 matrix by cyclic Jacobi rotations. Small, exact to machine
 * precision in a handful of sweeps, and always returns an orthonormal basis even when eigenvalues
 * repeat — which a closed-form cubic solution does not. Used for principal axes of a liver mask and
 * for the singular vectors of the cross-covariance in the rigid fit.
 */

/** Row-major 3×3 matrix, 9 numbers. */
export type Mat3 = readonly number[];

export interface SymmetricEigen {
  /** Eigenvalues, largest first. */
  values: [number, number, number];
  /** Row-major 3×3 whose columns are the unit eigenvectors in the order of `values`; det = +1. */
  vectors: number[];
}

const MAX_SWEEPS = 50;

/** Eigenvalues (largest first) and a right-handed orthonormal eigenvector basis of a symmetric 3×3. */
export function symmetricEigen3(m: Mat3): SymmetricEigen {
  // Symmetrise so a slightly asymmetric input (rounding) cannot stall the rotations.
  const a = [
    m[0], (m[1] + m[3]) / 2, (m[2] + m[6]) / 2,
    (m[1] + m[3]) / 2, m[4], (m[5] + m[7]) / 2,
    (m[2] + m[6]) / 2, (m[5] + m[7]) / 2, m[8],
  ];
  const v = [1, 0, 0, 0, 1, 0, 0, 0, 1];
  const scale = Math.abs(a[0]) + Math.abs(a[4]) + Math.abs(a[8]) + 2 * (Math.abs(a[1]) + Math.abs(a[2]) + Math.abs(a[5]));
  for (let sweep = 0; sweep < MAX_SWEEPS; sweep++) {
    const off = Math.abs(a[1]) + Math.abs(a[2]) + Math.abs(a[5]);
    if (off <= 1e-15 * scale || off === 0) break;
    rotate(a, v, 0, 1);
    rotate(a, v, 0, 2);
    rotate(a, v, 1, 2);
  }
  const order = [0, 1, 2].sort((x, y) => a[y * 4] - a[x * 4]);
  const vectors = new Array<number>(9);
  order.forEach((src, dst) => {
    for (let r = 0; r < 3; r++) vectors[r * 3 + dst] = v[r * 3 + src];
  });
  // A right-handed basis lets callers use it as a rotation without a reflection check.
  if (det3(vectors) < 0) for (let r = 0; r < 3; r++) vectors[r * 3 + 2] = -vectors[r * 3 + 2];
  return { values: [a[order[0] * 4], a[order[1] * 4], a[order[2] * 4]], vectors };
}

/** One Jacobi rotation zeroing a[p][q]; accumulates the rotation into the columns of v. */
function rotate(a: number[], v: number[], p: number, q: number): void {
  const apq = a[p * 3 + q];
  if (apq === 0) return;
  const app = a[p * 3 + p], aqq = a[q * 3 + q];
  const theta = (aqq - app) / (2 * apq);
  // The smaller root keeps the rotation under 45°, which is what makes the sweep converge.
  const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
  const c = 1 / Math.sqrt(t * t + 1);
  const s = t * c;
  for (let k = 0; k < 3; k++) {
    const akp = a[k * 3 + p], akq = a[k * 3 + q];
    a[k * 3 + p] = c * akp - s * akq;
    a[k * 3 + q] = s * akp + c * akq;
  }
  for (let k = 0; k < 3; k++) {
    const apk = a[p * 3 + k], aqk = a[q * 3 + k];
    a[p * 3 + k] = c * apk - s * aqk;
    a[q * 3 + k] = s * apk + c * aqk;
  }
  for (let k = 0; k < 3; k++) {
    const vkp = v[k * 3 + p], vkq = v[k * 3 + q];
    v[k * 3 + p] = c * vkp - s * vkq;
    v[k * 3 + q] = s * vkp + c * vkq;
  }
}

export function det3(m: Mat3): number {
  return m[0] * (m[4] * m[8] - m[5] * m[7]) - m[1] * (m[3] * m[8] - m[5] * m[6]) + m[2] * (m[3] * m[7] - m[4] * m[6]);
}

/** Product of two row-major 3×3 matrices. */
export function mul3(a: Mat3, b: Mat3): number[] {
  const out = new Array<number>(9);
  for (let r = 0; r < 3; r++) {
    for (let c = 0; c < 3; c++) out[r * 3 + c] = a[r * 3] * b[c] + a[r * 3 + 1] * b[3 + c] + a[r * 3 + 2] * b[6 + c];
  }
  return out;
}

export function transpose3(a: Mat3): number[] {
  return [a[0], a[3], a[6], a[1], a[4], a[7], a[2], a[5], a[8]];
}
