import { columnNorms, invertAffine, type Mat4, type Vec3 } from '../geometry/mat4.js';
import { cross, norm } from '../geometry/vec3.js';

/** Voxel storage types the reader accepts (NIfTI datatype names). */
export type Datatype = 'uint8' | 'int8' | 'int16' | 'uint16' | 'int32' | 'uint32' | 'float32' | 'float64';

export type VoxelArray =
  | Uint8Array | Int8Array | Int16Array | Uint16Array | Int32Array | Uint32Array | Float32Array | Float64Array;

/**
 * One 3-D image on a voxel grid. `data` holds the stored values in NIfTI order (i fastest);
 * the physical value of a voxel is `data[n] * slope + inter`. `affine` maps voxel (i, j, k) to
 * world RAS mm; `inverse` maps back.
 */
export interface Volume {
  readonly dims: readonly [number, number, number];
  readonly datatype: Datatype;
  readonly data: VoxelArray;
  readonly slope: number;
  readonly inter: number;
  readonly affine: Mat4;
  readonly inverse: Mat4;
  /** Voxel step along each grid axis in mm. */
  readonly spacingMm: readonly [number, number, number];
}

/** A volume's grid without its voxels. */
export type VolumeGrid = Pick<Volume, 'dims' | 'affine' | 'spacingMm'>;

export function makeVolume(
  dims: readonly [number, number, number],
  data: VoxelArray,
  affine: Mat4,
  datatype: Datatype,
  slope = 1,
  inter = 0,
): Volume {
  return { dims, data, datatype, slope, inter, affine, inverse: invertAffine(affine), spacingMm: columnNorms(affine) };
}

/** Nearest voxel index (i, j, k) of a world point, or -1 when it falls outside the grid. */
export function voxelIndexAtWorld(v: Volume, p: Vec3): number {
  const m = v.inverse;
  const i = Math.round(m[0] * p[0] + m[1] * p[1] + m[2] * p[2] + m[3]);
  const j = Math.round(m[4] * p[0] + m[5] * p[1] + m[6] * p[2] + m[7]);
  const k = Math.round(m[8] * p[0] + m[9] * p[1] + m[10] * p[2] + m[11]);
  const [nx, ny, nz] = v.dims;
  if (i < 0 || j < 0 || k < 0 || i >= nx || j >= ny || k >= nz) return -1;
  return i + nx * (j + ny * k);
}

/** Physical value (after scaling) of the voxel at linear index n. */
export function valueAt(v: Volume, n: number): number {
  return v.data[n] * v.slope + v.inter;
}

/** Voxel volume in mL (the affine's |det| in mm³ / 1000). */
export function voxelVolumeMl(v: Volume): number {
  const m = v.affine;
  const det =
    m[0] * (m[5] * m[10] - m[6] * m[9]) - m[1] * (m[4] * m[10] - m[6] * m[8]) + m[2] * (m[4] * m[9] - m[5] * m[8]);
  return Math.abs(det) / 1000;
}

/**
 * The grid axis (0, 1 or 2) whose voxel planes are axial: the plane normal closest to world S.
 * The normal of the plane spanned by axes a and b is the cross product of their columns.
 */
export function axialAxis(affine: Mat4): 0 | 1 | 2 {
  const col = (c: number): Vec3 => [affine[c], affine[4 + c], affine[8 + c]];
  let best: 0 | 1 | 2 = 2;
  let bestCos = -1;
  for (const axis of [0, 1, 2] as const) {
    const [a, b] = [0, 1, 2].filter((c) => c !== axis).map(col);
    const n = cross(a, b);
    const cos = Math.abs(n[2]) / norm(n);
    if (cos > bestCos + 1e-12) { bestCos = cos; best = axis; }
  }
  return best;
}
