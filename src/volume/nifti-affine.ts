/**
 * The NIfTI-1 voxel-to-world rules (nifti1.h, "3D IMAGE (VOLUME) ORIENTATION AND LOCATION IN SPACE"):
 * method 3 (sform), method 2 (qform: quaternion, qfac, pixdim, qoffset) and method 1 (pixdim only),
 * plus the reverse, an affine to quaternion parameters, for writing a qform.
 * Affines are row-major 16 numbers, voxel (i, j, k) to world RAS mm.
 */

export interface QformParams {
  /** quatern_b, quatern_c, quatern_d */
  b: number; c: number; d: number;
  /** qoffset_x, qoffset_y, qoffset_z */
  x: number; y: number; z: number;
  /** Voxel steps pixdim[1..3], all positive. */
  dx: number; dy: number; dz: number;
  /** pixdim[0]: -1 flips the k axis so the rotation can stay proper. */
  qfac: 1 | -1;
}

/** Method 2: R(b, c, d) · diag(dx, dy, qfac·dz) + qoffset. */
export function qformToAffine(q: QformParams): number[] {
  let { b, c, d } = q;
  let a = 1 - (b * b + c * c + d * d);
  if (a < 1e-7) {
    // Rounding in stored float32 parameters can push b²+c²+d² past 1: treat it as a 180° turn
    // about the normalised axis, as the standard's sample library does.
    const n = Math.hypot(b, c, d);
    b /= n; c /= n; d /= n;
    a = 0;
  } else {
    a = Math.sqrt(a);
  }
  const zs = q.qfac * q.dz;
  return [
    (a * a + b * b - c * c - d * d) * q.dx, 2 * (b * c - a * d) * q.dy, 2 * (b * d + a * c) * zs, q.x,
    2 * (b * c + a * d) * q.dx, (a * a + c * c - b * b - d * d) * q.dy, 2 * (c * d - a * b) * zs, q.y,
    2 * (b * d - a * c) * q.dx, 2 * (c * d + a * b) * q.dy, (a * a + d * d - c * c - b * b) * zs, q.z,
    0, 0, 0, 1,
  ];
}

/** Method 1: plain scaling by pixdim, origin at voxel (0, 0, 0). */
export function pixdimToAffine(dx: number, dy: number, dz: number): number[] {
  return [dx, 0, 0, 0, 0, dy, 0, 0, 0, 0, dz, 0, 0, 0, 0, 1];
}

/** Method 3: the three srow vectors as the top rows. */
export function sformToAffine(srowX: readonly number[], srowY: readonly number[], srowZ: readonly number[]): number[] {
  return [...srowX.slice(0, 4), ...srowY.slice(0, 4), ...srowZ.slice(0, 4), 0, 0, 0, 1];
}

/**
 * Quaternion parameters for an affine. Column lengths give the voxel steps; a sheared 3×3 part is
 * replaced by its nearest rotation (polar factor), so the qform is the best rigid approximation
 * while the sform keeps the exact affine.
 */
export function affineToQform(m: readonly number[]): QformParams {
  const cols = [0, 1, 2].map((c) => [m[c], m[4 + c], m[8 + c]]);
  const steps = cols.map((v) => Math.hypot(v[0], v[1], v[2]));
  const unit = cols.map((v, c) => (steps[c] > 0 ? v.map((x) => x / steps[c]) : [c === 0 ? 1 : 0, c === 1 ? 1 : 0, c === 2 ? 1 : 0]));
  // r[row][col]
  let r = [0, 1, 2].map((row) => [unit[0][row], unit[1][row], unit[2][row]]);
  r = nearestOrthogonal(r);
  let qfac: 1 | -1 = 1;
  if (det3(r) < 0) {
    qfac = -1;
    for (let row = 0; row < 3; row++) r[row][2] = -r[row][2];
  }
  const [[r11, r12, r13], [r21, r22, r23], [r31, r32, r33]] = r;
  let a = r11 + r22 + r33 + 1;
  let b: number, c: number, d: number;
  if (a > 0.5) {
    a = 0.5 * Math.sqrt(a);
    b = (0.25 * (r32 - r23)) / a;
    c = (0.25 * (r13 - r31)) / a;
    d = (0.25 * (r21 - r12)) / a;
  } else {
    // Near a 180° turn the trace formula loses precision: solve from the largest diagonal term.
    const xd = 1 + r11 - (r22 + r33), yd = 1 + r22 - (r11 + r33), zd = 1 + r33 - (r11 + r22);
    if (xd > 1) {
      b = 0.5 * Math.sqrt(xd); c = (0.25 * (r12 + r21)) / b; d = (0.25 * (r13 + r31)) / b; a = (0.25 * (r32 - r23)) / b;
    } else if (yd > 1) {
      c = 0.5 * Math.sqrt(yd); b = (0.25 * (r12 + r21)) / c; d = (0.25 * (r23 + r32)) / c; a = (0.25 * (r13 - r31)) / c;
    } else {
      d = 0.5 * Math.sqrt(zd); b = (0.25 * (r13 + r31)) / d; c = (0.25 * (r23 + r32)) / d; a = (0.25 * (r21 - r12)) / d;
    }
    if (a < 0) { b = -b; c = -c; d = -d; }
  }
  return { b, c, d, x: m[3], y: m[7], z: m[11], dx: steps[0] || 1, dy: steps[1] || 1, dz: steps[2] || 1, qfac };
}

function det3(r: number[][]): number {
  return (
    r[0][0] * (r[1][1] * r[2][2] - r[1][2] * r[2][1]) -
    r[0][1] * (r[1][0] * r[2][2] - r[1][2] * r[2][0]) +
    r[0][2] * (r[1][0] * r[2][1] - r[1][1] * r[2][0])
  );
}

/** Orthogonal polar factor by Newton iteration X ← (X + X⁻ᵀ) / 2; identity when X is singular. */
function nearestOrthogonal(x0: number[][]): number[][] {
  let x = x0.map((row) => row.slice());
  for (let iter = 0; iter < 100; iter++) {
    const det = det3(x);
    if (!Number.isFinite(det) || Math.abs(det) < 1e-12) return [[1, 0, 0], [0, 1, 0], [0, 0, 1]];
    // Inverse-transpose is the cofactor matrix over the determinant.
    const cof = (i: number, j: number) => {
      const rows = [0, 1, 2].filter((n) => n !== i), cols = [0, 1, 2].filter((n) => n !== j);
      const m = x[rows[0]][cols[0]] * x[rows[1]][cols[1]] - x[rows[0]][cols[1]] * x[rows[1]][cols[0]];
      return ((i + j) % 2 === 0 ? m : -m) / det;
    };
    let change = 0;
    const next = x.map((row, i) => row.map((v, j) => {
      const u = 0.5 * (v + cof(i, j));
      change = Math.max(change, Math.abs(u - v));
      return u;
    }));
    x = next;
    if (change < 1e-14) break;
  }
  return x;
}
