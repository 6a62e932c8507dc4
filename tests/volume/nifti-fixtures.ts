// Hand-built NIfTI bytes for tests, laid out field by field from nifti1.h (NIfTI-1, 348 bytes) and
// nibabel's nifti2 header_dtype (NIfTI-2, 540 bytes), so tests do not depend on our own writer.
import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

export interface Header1 {
  littleEndian?: boolean;
  magic?: string;
  dim?: number[]; // dim[0..7]
  datatype?: number;
  bitpix?: number;
  pixdim?: number[]; // pixdim[0..7]
  voxOffset?: number;
  slope?: number;
  inter?: number;
  xyztUnits?: number;
  qformCode?: number;
  sformCode?: number;
  quatern?: [number, number, number];
  qoffset?: [number, number, number];
  srow?: [number[], number[], number[]];
}

export function header1(h: Header1 = {}): Uint8Array {
  const le = h.littleEndian ?? true;
  const out = new Uint8Array(348);
  const v = new DataView(out.buffer);
  v.setInt32(0, 348, le);
  (h.dim ?? [3, 4, 3, 2, 1, 1, 1, 1]).forEach((d, n) => v.setInt16(40 + 2 * n, d, le));
  const datatype = h.datatype ?? 4;
  v.setInt16(70, datatype, le);
  v.setInt16(72, h.bitpix ?? ({ 2: 8, 4: 16, 8: 32, 16: 32, 64: 64, 256: 8, 512: 16, 768: 32 } as Record<number, number>)[datatype] ?? 0, le);
  (h.pixdim ?? [1, 1, 1, 1, 1, 1, 1, 1]).forEach((p, n) => v.setFloat32(76 + 4 * n, p, le));
  v.setFloat32(108, h.voxOffset ?? 352, le);
  v.setFloat32(112, h.slope ?? 0, le);
  v.setFloat32(116, h.inter ?? 0, le);
  v.setUint8(123, h.xyztUnits ?? 2);
  v.setInt16(252, h.qformCode ?? 0, le);
  v.setInt16(254, h.sformCode ?? 0, le);
  (h.quatern ?? [0, 0, 0]).forEach((q, n) => v.setFloat32(256 + 4 * n, q, le));
  (h.qoffset ?? [0, 0, 0]).forEach((q, n) => v.setFloat32(268 + 4 * n, q, le));
  (h.srow ?? [[1, 0, 0, 0], [0, 1, 0, 0], [0, 0, 1, 0]]).forEach((row, r) => row.forEach((x, c) => v.setFloat32(280 + 16 * r + 4 * c, x, le)));
  const magic = h.magic ?? 'n+1';
  for (let n = 0; n < magic.length; n++) out[344 + n] = magic.charCodeAt(n);
  return out;
}

/** A single .nii: header, 4-byte extension flag, then `data` (raw bytes) at vox_offset 352. */
export function single1(h: Header1, data: Uint8Array): Uint8Array {
  const out = new Uint8Array(352 + data.length);
  out.set(header1(h));
  out.set(data, 352);
  return out;
}

export function int16Bytes(values: number[], littleEndian = true): Uint8Array {
  const out = new Uint8Array(values.length * 2);
  const v = new DataView(out.buffer);
  values.forEach((x, n) => v.setInt16(2 * n, x, littleEndian));
  return out;
}

export const referenceDir = fileURLToPath(new URL('../reference/', import.meta.url));
export const NIBABEL_DATA = '/usr/lib/python3/dist-packages/nibabel/tests/data';

/** Runs a script from tests/reference with Debian's python3 (the one that has nibabel). */
export function python<T>(script: string, args: string[]): T {
  const r = spawnSync('/usr/bin/python3', [join(referenceDir, script), ...args], { encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 });
  if (r.status !== 0) throw new Error(`${script} failed: ${r.stderr}`);
  return JSON.parse(r.stdout) as T;
}

export function tempDir(prefix: string): string {
  return mkdtempSync(join(tmpdir(), `falciform-${prefix}-`));
}

/** Facts of one file as tests/reference/nifti_facts.py reports them. */
export interface NibabelFacts {
  file: string;
  class: string;
  format: 'NIfTI-1' | 'NIfTI-2';
  dims: number[];
  dtype: string;
  datatypeCode: number;
  endianness: '<' | '>';
  bestAffine: number[][];
  sform: number[][];
  qform: number[][];
  sformCode: number;
  qformCode: number;
  pixdim: number[];
  slopeInter: [number | null, number | null];
  values: null | {
    count: number; nanCount: number; sum: number; wsum: number; min: number; max: number; samples: [number, number | null][];
  };
  valuesError?: string;
}
