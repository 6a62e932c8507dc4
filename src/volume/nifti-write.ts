import { badInput } from '../errors.js';
import type { Volume } from './volume.js';
import { DATATYPE_CODES, bytesPerVoxel, PLATFORM_LITTLE_ENDIAN, swapBytesInPlace, viewVoxels } from './nifti-datatype.js';
import { affineToQform } from './nifti-affine.js';

export type WriteDatatype = 'uint8' | 'int16' | 'float32';

export interface EncodeOptions {
  /** NIFTI_XFORM_* code for both sform and qform; default 2, "aligned to another file's coordinates". */
  xformCode?: number;
  /** Up to 79 ASCII characters for the descrip field. */
  description?: string;
}

/** Header plus the 4-byte extension flag; the data starts right after (nifti1.h: vox_offset ≥ 352). */
const VOX_OFFSET = 352;

const RANGE: Record<WriteDatatype, [number, number]> = {
  uint8: [0, 255], int16: [-32768, 32767], float32: [-Infinity, Infinity],
};

/**
 * Encodes a volume as an uncompressed little-endian NIfTI-1 single file (.nii) with both sform
 * (the exact affine) and qform (its nearest rigid form) set. When the volume is already stored in
 * `datatype`, the stored values and their scl_slope/scl_inter are kept bit for bit; otherwise the
 * physical values are written (rounded for integer types), and one that does not fit is refused.
 */
export function encodeNifti(volume: Volume, datatype: WriteDatatype, opts: EncodeOptions = {}): Uint8Array {
  const [nx, ny, nz] = volume.dims;
  const count = nx * ny * nz;
  if (volume.data.length !== count) throw badInput('volume', `holds ${volume.data.length} voxels but its dims give ${count}`);
  const bpv = bytesPerVoxel(datatype);
  const out = new Uint8Array(VOX_OFFSET + count * bpv);
  const keepStored = volume.datatype === datatype;
  const slope = keepStored ? volume.slope : 1;
  const inter = keepStored ? volume.inter : 0;
  writeHeader(new DataView(out.buffer), volume, datatype, slope, inter, opts);

  const target = viewVoxels(datatype, out.buffer, VOX_OFFSET, count);
  if (keepStored) {
    target.set(volume.data);
  } else {
    const src = volume.data, s = volume.slope, b = volume.inter;
    const [lo, hi] = RANGE[datatype];
    const round = datatype !== 'float32';
    for (let n = 0; n < count; n++) {
      let v = src[n] * s + b;
      if (round) {
        v = Math.round(v);
        if (!(v >= lo && v <= hi)) throw badInput('volume', `value ${src[n] * s + b} at voxel ${n} does not fit in ${datatype}`);
      }
      target[n] = v;
    }
  }
  if (!PLATFORM_LITTLE_ENDIAN) swapBytesInPlace(out.subarray(VOX_OFFSET), bpv);
  return out;
}

function writeHeader(v: DataView, vol: Volume, datatype: WriteDatatype, slope: number, inter: number, opts: EncodeOptions): void {
  // Offsets: nifti1.h struct nifti_1_header; all little-endian.
  const code = opts.xformCode ?? 2;
  const q = affineToQform(vol.affine);
  const f32 = (at: number, x: number) => v.setFloat32(at, x, true);
  const i16 = (at: number, x: number) => v.setInt16(at, x, true);
  v.setInt32(0, 348, true);
  [3, vol.dims[0], vol.dims[1], vol.dims[2], 1, 1, 1, 1].forEach((d, n) => i16(40 + 2 * n, d));
  i16(70, DATATYPE_CODES[datatype]);
  i16(72, bytesPerVoxel(datatype) * 8);
  [q.qfac, q.dx, q.dy, q.dz, 1, 1, 1, 1].forEach((p, n) => f32(76 + 4 * n, p));
  f32(108, VOX_OFFSET);
  // scl_slope 0 means "no scaling" (nifti1.h DATA SCALING), so readers keep integer labels as integers.
  const identity = slope === 1 && inter === 0;
  f32(112, identity ? 0 : slope);
  f32(116, identity ? 0 : inter);
  v.setUint8(123, 2); // xyzt_units: NIFTI_UNITS_MM
  const text = (opts.description ?? 'Falciform').replace(/[^\x20-\x7e]/g, '?').slice(0, 79);
  for (let n = 0; n < text.length; n++) v.setUint8(148 + n, text.charCodeAt(n));
  i16(252, code);
  i16(254, code);
  [q.b, q.c, q.d, q.x, q.y, q.z].forEach((x, n) => f32(256 + 4 * n, x));
  for (let n = 0; n < 12; n++) f32(280 + 4 * n, vol.affine[n]);
  'n+1'.split('').forEach((ch, n) => v.setUint8(344 + n, ch.charCodeAt(0)));
}
