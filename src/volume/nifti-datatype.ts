import type { Datatype, VoxelArray } from './volume.js';

/** NIfTI-1 datatype codes (nifti1.h, DT_*) for the storage types we read. */
export const DATATYPE_CODES: Readonly<Record<Datatype, number>> = {
  uint8: 2, int16: 4, int32: 8, float32: 16, float64: 64, int8: 256, uint16: 512, uint32: 768,
};

/** Codes nifti1.h defines that we refuse, named so the error says what the file holds. */
const UNSUPPORTED_NAMES: Readonly<Record<number, string>> = {
  1: 'binary (1 bit)', 32: 'complex64', 128: 'rgb24', 1024: 'int64', 1280: 'uint64',
  1536: 'float128', 1792: 'complex128', 2048: 'complex256', 2304: 'rgba32',
};

const BY_CODE = new Map<number, Datatype>(
  (Object.entries(DATATYPE_CODES) as [Datatype, number][]).map(([name, code]) => [code, name]),
);

export function datatypeFromCode(code: number): Datatype | undefined {
  return BY_CODE.get(code);
}

/** Words for an unsupported code, e.g. "complex64 (code 32)". */
export function describeDatatypeCode(code: number): string {
  const name = UNSUPPORTED_NAMES[code];
  return name ? `${name} (code ${code})` : `unknown code ${code}`;
}

export function bytesPerVoxel(t: Datatype): 1 | 2 | 4 | 8 {
  switch (t) {
    case 'uint8': case 'int8': return 1;
    case 'int16': case 'uint16': return 2;
    case 'int32': case 'uint32': case 'float32': return 4;
    case 'float64': return 8;
  }
}

/** A typed array of the datatype over `length` voxels at `byteOffset`, which must be aligned. */
export function viewVoxels(t: Datatype, buffer: ArrayBufferLike, byteOffset: number, length: number): VoxelArray {
  switch (t) {
    case 'uint8': return new Uint8Array(buffer, byteOffset, length);
    case 'int8': return new Int8Array(buffer, byteOffset, length);
    case 'int16': return new Int16Array(buffer, byteOffset, length);
    case 'uint16': return new Uint16Array(buffer, byteOffset, length);
    case 'int32': return new Int32Array(buffer, byteOffset, length);
    case 'uint32': return new Uint32Array(buffer, byteOffset, length);
    case 'float32': return new Float32Array(buffer, byteOffset, length);
    case 'float64': return new Float64Array(buffer, byteOffset, length);
  }
}

export const PLATFORM_LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/**
 * Reverses the byte order of each `width`-byte word of `bytes` in place. The region must start on a
 * 4-byte boundary of its buffer for widths 4 and 8 (2 for width 2), as viewVoxels needs anyway.
 */
export function swapBytesInPlace(bytes: Uint8Array, width: 1 | 2 | 4 | 8): void {
  if (width === 1) return;
  if (width === 2) {
    const w = new Uint16Array(bytes.buffer, bytes.byteOffset, bytes.length >> 1);
    for (let n = 0; n < w.length; n++) {
      const x = w[n];
      w[n] = ((x & 0xff) << 8) | (x >>> 8);
    }
    return;
  }
  const w = new Uint32Array(bytes.buffer, bytes.byteOffset, bytes.length >> 2);
  for (let n = 0; n < w.length; n++) {
    const x = w[n];
    w[n] = ((x & 0xff) << 24) | ((x & 0xff00) << 8) | ((x >>> 8) & 0xff00) | (x >>> 24);
  }
  if (width === 8) {
    // Each 8-byte word is now two swapped halves in the original order; exchange them.
    for (let n = 0; n + 1 < w.length; n += 2) {
      const x = w[n];
      w[n] = w[n + 1];
      w[n + 1] = x;
    }
  }
}
