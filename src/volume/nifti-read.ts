import { badFile, tooLarge } from '../errors.js';
import { columnNorms } from '../geometry/mat4.js';
import { makeVolume, type Volume, type VolumeGrid } from './volume.js';
import { bytesPerVoxel, PLATFORM_LITTLE_ENDIAN, swapBytesInPlace, viewVoxels } from './nifti-datatype.js';
import { HEADER_BYTES_NEEDED, parseNiftiHeader, type NiftiInfo } from './nifti-header.js';

export { parseNiftiHeader, type NiftiInfo, type ParsedHeader } from './nifti-header.js';

/**
 * Gzip inflater supplied by the platform (node:zlib, or DecompressionStream in a worker). Returns the
 * first min(decompressed length, maxOutputBytes) bytes and never holds more than maxOutputBytes, so a
 * small file that inflates to gigabytes costs no more than what was asked for.
 */
export type Inflate = (gz: Uint8Array, maxOutputBytes: number) => Promise<Uint8Array>;

export interface LoadedNifti {
  info: NiftiInfo;
  /** The first 3-D volume. */
  volume: Volume;
  warnings: string[];
}

export interface ReadNiftiOptions {
  inflate: Inflate;
  /** Memory budget for the voxel data of the first volume, in bytes. */
  maxBytes?: number;
  /** The .img file of a .hdr/.img pair (may itself be gzipped). */
  imageBytes?: Uint8Array;
  /** Name of that .img file, for messages. */
  imageFile?: string;
  /**
   * The size of the gzip file when `bytes` hold only its first bytes (not for a .hdr/.img pair): the
   * platform's `inflate`, handed those, reads the rest of the file itself. The command line reads a
   * large compressed scan from disk this way as it inflates, so it never holds the file whole.
   */
  gzipSize?: number;
  /** Told the header's facts once they are read and checked, before the voxels are inflated. */
  onHeader?: (info: NiftiInfo) => void;
}

/** 2 GiB of voxel data: a 512×512×2000 int16 CT fits, a lying header does not get far. */
export const DEFAULT_MAX_BYTES = 2 * 1024 ** 3;

/** Deflate cannot expand beyond about 1032:1 (zlib's documented limit); room for the gzip framing. */
const MAX_DEFLATE_RATIO = 1032;

/**
 * The most bytes `gzipBytes` of gzip data can inflate to, capped at `maxOutputBytes`: what an
 * inflater reserves up front, so a tiny file cannot make it reserve a huge buffer.
 */
export function inflateCapacity(gzipBytes: number, maxOutputBytes: number): number {
  return Math.max(0, Math.min(maxOutputBytes, gzipBytes * MAX_DEFLATE_RATIO + 1024));
}

export function isGzip(bytes: Uint8Array): boolean {
  return bytes.length >= 2 && bytes[0] === 0x1f && bytes[1] === 0x8b;
}

/**
 * Reads a NIfTI-1 or NIfTI-2 image (.nii, .nii.gz, or a .hdr with its .img) and returns its first
 * 3-D volume. Gzip is recognised by its magic bytes. Voxels are viewed in place where alignment
 * allows, so the returned volume may share memory with `bytes` (or `imageBytes`), and big-endian
 * data is byte-swapped in that memory: pass a copy if the caller still needs the original bytes.
 */
export async function readNifti(bytes: Uint8Array, file: string, opts: ReadNiftiOptions): Promise<LoadedNifti> {
  const maxBytes = opts.maxBytes ?? DEFAULT_MAX_BYTES;
  const header = isGzip(bytes) ? await inflateOrFail(opts.inflate, bytes, HEADER_BYTES_NEEDED, file) : bytes;
  const { info, warnings } = parseNiftiHeader(header, file);
  checkBudget(info, file, maxBytes);
  opts.onHeader?.(info);

  let source = bytes;
  let sourceSize = opts.gzipSize ?? bytes.length;
  let dataFile = file;
  if (info.pair) {
    if (opts.gzipSize !== undefined) throw new Error('readNifti: gzipSize is for single-file images; give a pair\'s header whole');
    if (!opts.imageBytes) throw badFile(file, 'is the header of a .hdr/.img pair; its .img data file is needed too');
    source = opts.imageBytes;
    sourceSize = source.length;
    dataFile = opts.imageFile ?? `${file} (image data)`;
  }
  const need = info.voxOffset + info.volumeBytes;
  let data = source;
  let where = 'file';
  if (isGzip(source)) {
    const reachable = inflateCapacity(sourceSize, Infinity);
    if (info.voxOffset >= reachable) throw badFile(dataFile, `vox_offset ${info.voxOffset} is past the end of the compressed data`);
    data = await inflateOrFail(opts.inflate, source, Math.min(need, reachable), dataFile);
    where = 'decompressed data';
  }
  if (info.voxOffset >= data.length) {
    throw badFile(dataFile, `vox_offset ${info.voxOffset} is past the end of the ${where} (${data.length} bytes)`);
  }
  if (data.length < need) {
    throw badFile(dataFile, `image data is truncated: ${data.length - info.voxOffset} of ${info.volumeBytes} bytes of the first volume are present`);
  }

  const voxels = voxelsOf(data, info);
  const volume = makeVolume(gridOfHeader(info).dims, voxels, info.affine, info.datatype, info.slope, info.inter);
  return { info, volume, warnings };
}

/** The grid of the first volume a header describes (that of readNifti's volume). */
export function gridOfHeader(info: NiftiInfo): VolumeGrid {
  const [nx, ny = 1, nz = 1] = info.dims;
  return { dims: [nx, ny, nz], affine: info.affine, spacingMm: columnNorms(info.affine) };
}

/** Refuses, before anything is allocated, a first volume larger than the memory budget. */
export function checkBudget(info: NiftiInfo, file: string, maxBytes: number): void {
  if (info.volumeBytes > maxBytes) {
    const mb = (n: number) => `${Math.round(n / 1024 ** 2).toLocaleString('en-US')} MB`;
    const grid = info.dims.slice(0, 3).join(' × ');
    throw tooLarge(file, `the volume (${grid} ${info.datatype}) needs ${mb(info.volumeBytes)}, over the memory budget of ${mb(maxBytes)}`);
  }
}

async function inflateOrFail(inflate: Inflate, gz: Uint8Array, max: number, file: string): Promise<Uint8Array> {
  let out: Uint8Array;
  try {
    out = await inflate(gz, max);
  } catch (e) {
    const why = e instanceof Error ? e.message : String(e);
    throw badFile(file, `gzip data is corrupt or truncated (${why})`);
  }
  return out.length > max ? out.subarray(0, max) : out;
}

function voxelsOf(data: Uint8Array, info: NiftiInfo) {
  const bpv = bytesPerVoxel(info.datatype);
  let region = data.subarray(info.voxOffset, info.voxOffset + info.volumeBytes);
  // View in place when aligned; copy when misaligned, or when the volume is a small part of a large
  // buffer (the first volume of a 4-D file) so the rest can be freed.
  if (region.byteOffset % bpv !== 0 || region.byteLength * 2 < region.buffer.byteLength) region = region.slice();
  if (info.littleEndian !== PLATFORM_LITTLE_ENDIAN) swapBytesInPlace(region, bpv);
  return viewVoxels(info.datatype, region.buffer, region.byteOffset, info.volumeBytes / bpv);
}
