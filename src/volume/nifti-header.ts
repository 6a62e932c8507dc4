import { badFile } from '../errors.js';
import { invertAffine } from '../geometry/mat4.js';
import type { Datatype } from './volume.js';
import { bytesPerVoxel, datatypeFromCode, describeDatatypeCode } from './nifti-datatype.js';
import { pixdimToAffine, qformToAffine, sformToAffine } from './nifti-affine.js';

/** Header facts of a NIfTI-1 or NIfTI-2 file, in the units Falciform uses. */
export interface NiftiInfo {
  format: 'NIfTI-1' | 'NIfTI-2';
  /** All dimensions, dim[1..dim[0]]. */
  dims: number[];
  datatype: Datatype;
  littleEndian: boolean;
  affineSource: 'sform' | 'qform' | 'pixdim';
  /** Effective scaling: 1 and 0 when the file sets none (scl_slope 0 or not finite). */
  slope: number;
  inter: number;
  /** Voxel (i, j, k) to world RAS mm, row-major 16 numbers. */
  affine: number[];
  qformCode: number;
  sformCode: number;
  /** True for a header whose voxels live in a separate .img file ("ni1" / "ni2"). */
  pair: boolean;
  /** Byte offset of the first voxel in the data file. */
  voxOffset: number;
  /** Bytes of the first 3-D volume, the part Falciform loads. */
  volumeBytes: number;
  /** Number of 3-D volumes (product of dims beyond the third). */
  volumeCount: number;
  description: string;
  /** The header's geometry fields as stored, whichever of them the affine came from. */
  stored: {
    pixdim: number[];
    /** quatern_b, quatern_c, quatern_d */
    quatern: [number, number, number];
    /** qoffset_x, qoffset_y, qoffset_z */
    qoffset: [number, number, number];
    /** srow_x, srow_y, srow_z */
    srow: [number[], number[], number[]];
  };
}

export interface ParsedHeader {
  info: NiftiInfo;
  warnings: string[];
}

/** Bytes of header that the larger format (NIfTI-2) needs; enough to parse either. */
export const HEADER_BYTES_NEEDED = 540;

const NIFTI1_SIZE = 348;
const NIFTI2_SIZE = 540;

/**
 * Parses the header at the start of `bytes` (uncompressed). Reads no voxel data and allocates
 * nothing that depends on the header's numbers. Throws badFile with a message naming the problem.
 */
export function parseNiftiHeader(bytes: Uint8Array, file: string): ParsedHeader {
  if (bytes.length === 0) throw badFile(file, 'is empty');
  if (bytes.length < 4) throw badFile(file, `is too short to be a NIfTI image (${bytes.length} bytes)`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const sizeLe = view.getInt32(0, true);
  const sizeBe = view.getInt32(0, false);
  let le: boolean;
  let size: number;
  if (sizeLe === NIFTI1_SIZE || sizeLe === NIFTI2_SIZE) { le = true; size = sizeLe; }
  else if (sizeBe === NIFTI1_SIZE || sizeBe === NIFTI2_SIZE) { le = false; size = sizeBe; }
  else if (looksLikeText(bytes)) throw badFile(file, 'is a text file, not a NIfTI image');
  else throw badFile(file, `is not a NIfTI image (the first 4 bytes give a header size of ${sizeLe}, expected 348 or 540)`);
  const format = size === NIFTI1_SIZE ? 'NIfTI-1' : 'NIfTI-2';
  if (bytes.length < size) throw badFile(file, `${format} header is truncated (${bytes.length} of ${size} bytes)`);
  return size === NIFTI1_SIZE ? parse1(view, le, file) : parse2(bytes, view, le, file);
}

function looksLikeText(bytes: Uint8Array): boolean {
  const n = Math.min(bytes.length, 64);
  for (let k = 0; k < n; k++) {
    const c = bytes[k];
    if (c !== 9 && c !== 10 && c !== 13 && (c < 32 || c > 126)) return false;
  }
  return true;
}

function ascii(view: DataView, at: number, len: number): string {
  let s = '';
  for (let k = 0; k < len; k++) {
    const c = view.getUint8(at + k);
    if (c === 0) break;
    s += c >= 32 && c < 127 ? String.fromCharCode(c) : '?';
  }
  return s;
}

/** Field values common to both formats, before checks. */
interface RawHeader {
  format: 'NIfTI-1' | 'NIfTI-2';
  le: boolean;
  pair: boolean;
  headerSize: number;
  dim: number[];
  datatypeCode: number;
  bitpix: number;
  pixdim: number[];
  voxOffset: number;
  slope: number;
  inter: number;
  qformCode: number;
  sformCode: number;
  quatern: [number, number, number];
  qoffset: [number, number, number];
  srow: [number[], number[], number[]];
  xyztUnits: number;
  description: string;
}

function parse1(view: DataView, le: boolean, file: string): ParsedHeader {
  // Offsets: nifti1.h struct nifti_1_header.
  const magic = ascii(view, 344, 4);
  if (magic !== 'n+1' && magic !== 'ni1') {
    if (view.getUint32(344, true) === 0) {
      throw badFile(file, 'is an Analyze 7.5 header without the NIfTI magic; Analyze does not record orientation, so it is not supported');
    }
    throw badFile(file, `has a wrong magic string "${magic}" (expected "n+1" or "ni1")`);
  }
  const f32 = (at: number) => view.getFloat32(at, le);
  const i16 = (at: number) => view.getInt16(at, le);
  const raw: RawHeader = {
    format: 'NIfTI-1', le, pair: magic === 'ni1', headerSize: NIFTI1_SIZE,
    dim: Array.from({ length: 8 }, (_, n) => i16(40 + 2 * n)),
    datatypeCode: i16(70), bitpix: i16(72),
    pixdim: Array.from({ length: 8 }, (_, n) => f32(76 + 4 * n)),
    voxOffset: f32(108), slope: f32(112), inter: f32(116),
    qformCode: i16(252), sformCode: i16(254),
    quatern: [f32(256), f32(260), f32(264)], qoffset: [f32(268), f32(272), f32(276)],
    srow: [0, 1, 2].map((r) => [0, 1, 2, 3].map((c) => f32(280 + 16 * r + 4 * c))) as [number[], number[], number[]],
    xyztUnits: view.getUint8(123),
    description: ascii(view, 148, 80),
  };
  return interpret(raw, file);
}

function parse2(bytes: Uint8Array, view: DataView, le: boolean, file: string): ParsedHeader {
  // Offsets: the NIfTI-2 header (540 bytes), as nibabel's nifti2 header_dtype lays it out.
  const magic = ascii(view, 4, 4);
  if (magic !== 'n+2' && magic !== 'ni2') throw badFile(file, `has a wrong magic string "${magic}" (expected "n+2" or "ni2")`);
  // Bytes 8..11 are \r \n \x1a \n; a text-mode transfer rewrites them and the rest of the file.
  if (bytes[8] !== 0x0d || bytes[9] !== 0x0a || bytes[10] !== 0x1a || bytes[11] !== 0x0a) {
    throw badFile(file, 'has a damaged NIfTI-2 signature (the file was probably altered by a text-mode transfer)');
  }
  const f64 = (at: number) => view.getFloat64(at, le);
  const i64 = (at: number) => {
    const v = view.getBigInt64(at, le);
    // Beyond 2^53 no real file fits in memory; keep it as a number that fails the later checks.
    return v > BigInt(Number.MAX_SAFE_INTEGER) ? Number.POSITIVE_INFINITY : v < -BigInt(Number.MAX_SAFE_INTEGER) ? Number.NEGATIVE_INFINITY : Number(v);
  };
  const raw: RawHeader = {
    format: 'NIfTI-2', le, pair: magic === 'ni2', headerSize: NIFTI2_SIZE,
    dim: Array.from({ length: 8 }, (_, n) => i64(16 + 8 * n)),
    datatypeCode: view.getInt16(12, le), bitpix: view.getInt16(14, le),
    pixdim: Array.from({ length: 8 }, (_, n) => f64(104 + 8 * n)),
    voxOffset: i64(168), slope: f64(176), inter: f64(184),
    qformCode: view.getInt32(344, le), sformCode: view.getInt32(348, le),
    quatern: [f64(352), f64(360), f64(368)], qoffset: [f64(376), f64(384), f64(392)],
    srow: [0, 1, 2].map((r) => [0, 1, 2, 3].map((c) => f64(400 + 32 * r + 8 * c))) as [number[], number[], number[]],
    xyztUnits: view.getInt32(500, le),
    description: ascii(view, 240, 80),
  };
  return interpret(raw, file);
}

const AXIS = ['i', 'j', 'k'];

function interpret(h: RawHeader, file: string): ParsedHeader {
  const warnings: string[] = [];
  // nifti1.h: dim[0] outside 1..7 means the header is byte-swapped; here the size field already
  // fixed the byte order, so such a value is damage.
  const ndim = h.dim[0];
  if (!(ndim >= 1 && ndim <= 7)) throw badFile(file, `has an invalid number of dimensions dim[0] = ${ndim} (must be 1 to 7)`);
  const dims = h.dim.slice(1, ndim + 1);
  dims.forEach((d, n) => {
    if (!Number.isFinite(d) || d > Number.MAX_SAFE_INTEGER) throw badFile(file, `dimension ${n + 1} is absurdly large (${d})`);
    if (d < 0) throw badFile(file, `dimension ${n + 1} is negative (${d})`);
    if (d === 0) throw badFile(file, `dimension ${n + 1} is 0, so the image has no voxels`);
  });

  const datatype = datatypeFromCode(h.datatypeCode);
  if (!datatype) {
    throw badFile(file, `datatype ${describeDatatypeCode(h.datatypeCode)} is not supported (Falciform reads uint8, int8, int16, uint16, int32, uint32, float32 and float64)`);
  }
  const bpv = bytesPerVoxel(datatype);
  if (h.bitpix !== bpv * 8) warnings.push(`${file}: bitpix is ${h.bitpix} but datatype ${datatype} has ${bpv * 8} bits; the datatype is used`);

  const grid = [dims[0], dims[1] ?? 1, dims[2] ?? 1];
  const volumeCount = dims.slice(3).reduce((p, d) => p * d, 1);
  const voxelCount = grid[0] * grid[1] * grid[2];
  if (volumeCount > 1) {
    warnings.push(`${file}: ${ndim}-D image (${dims.join(' × ')}) with ${volumeCount} volumes; Falciform uses the first`);
  }

  let voxOffset = h.voxOffset;
  if (!Number.isFinite(voxOffset) || voxOffset < 0) throw badFile(file, `has an invalid vox_offset (${voxOffset})`);
  voxOffset = Math.floor(voxOffset);
  if (!h.pair && voxOffset < h.headerSize) {
    // Some writers leave vox_offset 0 in single files; the data then follows the header and the
    // 4-byte extension flag, as nibabel also assumes.
    if (voxOffset !== 0) warnings.push(`${file}: vox_offset ${voxOffset} lies inside the header; data read from byte ${h.headerSize + 4}`);
    voxOffset = h.headerSize + 4;
  }

  // nifti1.h "DATA SCALING": scaling applies when scl_slope is nonzero.
  let slope = 1;
  let inter = 0;
  if (Number.isFinite(h.slope) && h.slope !== 0) {
    if (!Number.isFinite(h.inter)) throw badFile(file, `has a valid scl_slope but an invalid scl_inter (${h.inter})`);
    slope = h.slope;
    inter = h.inter;
  }

  const { affine, affineSource } = chooseAffine(h, ndim, file, warnings);

  const info: NiftiInfo = {
    format: h.format, dims, datatype, littleEndian: h.le, affineSource, slope, inter, affine,
    qformCode: h.qformCode, sformCode: h.sformCode, pair: h.pair, voxOffset,
    volumeBytes: voxelCount * bpv, volumeCount, description: h.description,
    stored: { pixdim: h.pixdim, quatern: h.quatern, qoffset: h.qoffset, srow: h.srow },
  };
  return { info, warnings };
}

function chooseAffine(h: RawHeader, ndim: number, file: string, warnings: string[]): { affine: number[]; affineSource: NiftiInfo['affineSource'] } {
  let affine: number[];
  let affineSource: NiftiInfo['affineSource'];
  if (h.sformCode > 0) {
    affineSource = 'sform';
    affine = sformToAffine(...h.srow);
  } else {
    // pixdim[1..3] are the voxel steps for methods 1 and 2; an axis beyond dim[0] may leave its
    // step unset, and then a unit step is harmless.
    const steps = [1, 2, 3].map((n) => {
      const p = h.pixdim[n];
      if (n > ndim && !(Number.isFinite(p) && p > 0)) return 1;
      if (!Number.isFinite(p) || p === 0) throw badFile(file, `voxel spacing pixdim[${n}] along ${AXIS[n - 1]} is ${p}; it must be a positive number of mm`);
      if (p < 0) throw badFile(file, `voxel spacing pixdim[${n}] along ${AXIS[n - 1]} is negative (${p})`);
      return p;
    });
    if (h.qformCode > 0) {
      affineSource = 'qform';
      // nifti1.h: qfac is pixdim[0]; 0 (which should not occur) is taken as 1.
      const qfac = h.pixdim[0] < 0 ? -1 : 1;
      const [b, c, d] = h.quatern;
      const [x, y, z] = h.qoffset;
      if (![b, c, d, x, y, z].every(Number.isFinite)) throw badFile(file, 'qform has a non-numeric quaternion or offset');
      affine = qformToAffine({ b, c, d, x, y, z, dx: steps[0], dy: steps[1], dz: steps[2], qfac });
    } else {
      affineSource = 'pixdim';
      affine = pixdimToAffine(steps[0], steps[1], steps[2]);
      warnings.push(`${file}: neither sform nor qform is set; positions come from voxel spacing alone (no orientation)`);
    }
  }
  if (!affine.every(Number.isFinite)) throw badFile(file, `${affineSource} holds a value that is not a number`);
  try {
    invertAffine(affine);
  } catch {
    throw badFile(file, `${affineSource} is singular (an axis has zero length or two axes coincide), so voxel positions are undefined`);
  }
  // nifti1.h xyzt_units bits 0..2: 1 metre, 2 mm, 3 micron; 0 (unknown) is taken as mm.
  const unit = h.xyztUnits & 7;
  const toMm = unit === 1 ? 1000 : unit === 3 ? 0.001 : 1;
  if (toMm !== 1) {
    for (let n = 0; n < 12; n++) affine[n] *= toMm;
    warnings.push(`${file}: spatial units are ${unit === 1 ? 'metres' : 'microns'}; converted to mm`);
  }
  return { affine, affineSource };
}
