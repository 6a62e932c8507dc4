// Property-based fuzzing of the file readers: fast-check arbitraries that damage valid files, and one
// runner that holds every case to the same rule. Shared by bench/fuzz.ts (the long run that prints
// counts) and tests/fuzz/parsers.test.ts (a short run with a fixed seed).
//
// The rule: a reader given any bytes or text returns a result or throws a FalciformError whose message
// starts with the file name; any other exception (TypeError, RangeError from a stack overflow, an
// allocation failure) is a defect. Each case must end within a second, and the NIfTI reader must
// not ask for more memory than its budget allows.
import fc from 'fast-check';
import { gzipSync } from 'node:zlib';
import { nodeInflate } from '../src/cli/node-io.js';
import { isFalciformError, type ErrorKind } from '../src/errors.js';
import { parseMarks } from '../src/lesions/marks.js';
import { parseManifest } from '../src/manifest/manifest.js';
import { checkLandmarks, parseLandmarks } from '../src/segments/landmarks.js';
import { parseScheme } from '../src/segments/scheme.js';
import { HEADER_BYTES_NEEDED } from '../src/volume/nifti-header.js';
import { readNifti, type Inflate } from '../src/volume/nifti-read.js';
import { DATATYPE_CODES, bytesPerVoxel } from '../src/volume/nifti-datatype.js';
import { encodeNifti } from '../src/volume/nifti-write.js';
import { webInflate } from '../src/volume/web-gzip.js';
import { makeVolume, type Datatype } from '../src/volume/volume.js';

/** Budget given to the reader while fuzzing: small, so a header that fooled the check would show. */
export const FUZZ_MAX_BYTES = 64 * 1024 ** 2;
/** A case slower than this fails. */
export const CASE_LIMIT_MS = 1000;
/** A case still pending after this is reported as a hang instead of stalling the run. */
const HANG_MS = 5000;

// ---------------------------------------------------------------------------------------------
// Valid NIfTI files to start from.

interface NiftiSeed {
  label: string;
  format: 1 | 2;
  littleEndian: boolean;
  /** The .nii, or the .hdr of a pair. */
  bytes: Uint8Array;
  /** The .img of a pair. */
  image?: Uint8Array;
}

/** A deterministic byte pattern (not random: seeds must be the same in every run). */
function pattern(n: number, salt: number): Uint8Array {
  const out = new Uint8Array(n);
  let s = 2166136261 ^ salt;
  for (let k = 0; k < n; k++) {
    s = Math.imul(s ^ k, 16777619) >>> 0;
    out[k] = s >>> 24;
  }
  return out;
}

// An oblique affine with unequal spacing, so the sform, the qform and pixdim all carry information.
const AFFINE = [0.78, -0.05, 0, -120.5, 0.05, 0.78, 0.1, -98.2, 0, -0.02, 2.5, -340, 0, 0, 0, 1];

/**
 * A little-endian NIfTI-1 single file of datatype `t` on a 5×4×3 grid. encodeNifti writes uint8,
 * int16 and float32 only, so the other types are written as a uint8 image `bpv` times wider whose
 * dim[1], datatype and bitpix are then set: the bytes are the same.
 */
function nifti1(t: Datatype, dims: number[] = [5, 4, 3], salt = 1): Uint8Array {
  const bpv = bytesPerVoxel(t);
  const [nx, ny, nz] = dims;
  const raw = pattern(nx * ny * nz * bpv, salt);
  const bytes = encodeNifti(makeVolume([nx * bpv, ny, nz], raw, AFFINE, 'uint8'), 'uint8');
  const v = new DataView(bytes.buffer);
  v.setInt16(42, nx, true);
  v.setInt16(70, DATATYPE_CODES[t], true);
  v.setInt16(72, bpv * 8, true);
  // float data from a byte pattern holds NaNs and huge values: good for the value range code too.
  return bytes;
}

/** Byte-reversed copy of each NIfTI-1 header field that is wider than a byte, and of the voxels. */
const NIFTI1_WIDE_FIELDS: [offset: number, width: 2 | 4, count: number][] = [
  [0, 4, 1], [32, 4, 1], [36, 2, 1], [40, 2, 8], [56, 4, 3], [68, 2, 1], [70, 2, 1], [72, 2, 1], [74, 2, 1],
  [76, 4, 8], [108, 4, 1], [112, 4, 1], [116, 4, 1], [120, 2, 1], [124, 4, 1], [128, 4, 1], [132, 4, 1],
  [136, 4, 1], [140, 4, 1], [144, 4, 1], [252, 2, 1], [254, 2, 1], [256, 4, 6], [280, 4, 12],
];

function reverseEach(bytes: Uint8Array, at: number, width: number, count: number): void {
  for (let n = 0; n < count; n++) bytes.subarray(at + n * width, at + (n + 1) * width).reverse();
}

function bigEndian1(le: Uint8Array, t: Datatype): Uint8Array {
  const be = le.slice();
  for (const [at, width, count] of NIFTI1_WIDE_FIELDS) reverseEach(be, at, width, count);
  const bpv = bytesPerVoxel(t);
  if (bpv > 1) reverseEach(be, 352, bpv, (be.length - 352) / bpv);
  return be;
}

/** The same image as a NIfTI-2 single file (540-byte header, data at 544). */
function nifti2From(n1: Uint8Array): Uint8Array {
  const a = new DataView(n1.buffer, n1.byteOffset, n1.byteLength);
  const data = n1.subarray(352);
  const out = new Uint8Array(544 + data.length);
  const b = new DataView(out.buffer);
  b.setInt32(0, 540, true);
  out.set([0x6e, 0x2b, 0x32, 0, 0x0d, 0x0a, 0x1a, 0x0a], 4); // "n+2\0\r\n\x1a\n"
  b.setInt16(12, a.getInt16(70, true), true);
  b.setInt16(14, a.getInt16(72, true), true);
  for (let n = 0; n < 8; n++) b.setBigInt64(16 + 8 * n, BigInt(a.getInt16(40 + 2 * n, true)), true);
  for (let n = 0; n < 8; n++) b.setFloat64(104 + 8 * n, a.getFloat32(76 + 4 * n, true), true);
  b.setBigInt64(168, 544n, true);
  b.setFloat64(176, a.getFloat32(112, true), true);
  b.setFloat64(184, a.getFloat32(116, true), true);
  b.setInt32(344, a.getInt16(252, true), true);
  b.setInt32(348, a.getInt16(254, true), true);
  for (let n = 0; n < 6; n++) b.setFloat64(352 + 8 * n, a.getFloat32(256 + 4 * n, true), true);
  for (let n = 0; n < 12; n++) b.setFloat64(400 + 8 * n, a.getFloat32(280 + 4 * n, true), true);
  b.setInt32(500, a.getUint8(123), true);
  out.set(data, 544);
  return out;
}

function withFields1(bytes: Uint8Array, set: (v: DataView) => void): Uint8Array {
  const out = bytes.slice();
  set(new DataView(out.buffer));
  return out;
}

function makeNiftiSeeds(): NiftiSeed[] {
  const seeds: NiftiSeed[] = [];
  const types = Object.keys(DATATYPE_CODES) as Datatype[];
  types.forEach((t, n) => seeds.push({ label: `nifti1 ${t}`, format: 1, littleEndian: true, bytes: nifti1(t, [5, 4, 3], n) }));
  for (const t of ['int16', 'float32', 'float64'] as const) {
    seeds.push({ label: `nifti1 ${t} big-endian`, format: 1, littleEndian: false, bytes: bigEndian1(nifti1(t), t) });
  }
  for (const t of ['int16', 'float32'] as const) {
    seeds.push({ label: `nifti2 ${t}`, format: 2, littleEndian: true, bytes: nifti2From(nifti1(t)) });
  }
  // 4-D, qform only, pixdim only, scaled.
  const fourD = nifti1('int16', [5, 4, 3], 9);
  const fourDBytes = new Uint8Array(fourD.length + (fourD.length - 352));
  fourDBytes.set(fourD);
  fourDBytes.set(fourD.subarray(352), fourD.length);
  seeds.push({
    label: 'nifti1 int16 4-D', format: 1, littleEndian: true,
    bytes: withFields1(fourDBytes, (v) => { v.setInt16(40, 4, true); v.setInt16(48, 2, true); }),
  });
  seeds.push({ label: 'nifti1 qform only', format: 1, littleEndian: true, bytes: withFields1(nifti1('int16'), (v) => v.setInt16(254, 0, true)) });
  seeds.push({
    label: 'nifti1 pixdim only', format: 1, littleEndian: true,
    bytes: withFields1(nifti1('uint8'), (v) => { v.setInt16(252, 0, true); v.setInt16(254, 0, true); }),
  });
  seeds.push({
    label: 'nifti1 scaled', format: 1, littleEndian: true,
    bytes: withFields1(nifti1('int16'), (v) => { v.setFloat32(112, 2.5, true); v.setFloat32(116, -10, true); }),
  });
  // A .hdr/.img pair: magic "ni1", vox_offset 0, the voxels in their own file.
  const single = nifti1('int16');
  const hdr = withFields1(single.subarray(0, 348), (v) => { v.setFloat32(108, 0, true); v.setUint8(345, 0x69); });
  seeds.push({ label: 'nifti1 pair', format: 1, littleEndian: true, bytes: hdr, image: single.slice(352) });
  return seeds;
}

export const NIFTI_SEEDS: readonly NiftiSeed[] = makeNiftiSeeds();

// ---------------------------------------------------------------------------------------------
// NIfTI mutations.

type FieldType = 'i16' | 'i32' | 'i64' | 'f32' | 'f64' | 'u8' | 'magic';
interface Field { name: string; at: number; type: FieldType }

// Offsets: nifti1.h struct nifti_1_header.
const FIELDS1: Field[] = [
  { name: 'sizeof_hdr', at: 0, type: 'i32' },
  ...Array.from({ length: 8 }, (_, n): Field => ({ name: `dim[${n}]`, at: 40 + 2 * n, type: 'i16' })),
  { name: 'datatype', at: 70, type: 'i16' },
  { name: 'bitpix', at: 72, type: 'i16' },
  ...Array.from({ length: 8 }, (_, n): Field => ({ name: `pixdim[${n}]`, at: 76 + 4 * n, type: 'f32' })),
  { name: 'vox_offset', at: 108, type: 'f32' },
  { name: 'scl_slope', at: 112, type: 'f32' },
  { name: 'scl_inter', at: 116, type: 'f32' },
  { name: 'xyzt_units', at: 123, type: 'u8' },
  { name: 'qform_code', at: 252, type: 'i16' },
  { name: 'sform_code', at: 254, type: 'i16' },
  ...Array.from({ length: 6 }, (_, n): Field => ({ name: `quatern/qoffset[${n}]`, at: 256 + 4 * n, type: 'f32' })),
  ...Array.from({ length: 12 }, (_, n): Field => ({ name: `srow[${n}]`, at: 280 + 4 * n, type: 'f32' })),
  { name: 'magic', at: 344, type: 'magic' },
];

// Offsets: the NIfTI-2 header as nibabel's nifti2 header_dtype lays it out.
const FIELDS2: Field[] = [
  { name: 'sizeof_hdr', at: 0, type: 'i32' },
  { name: 'magic', at: 4, type: 'magic' },
  { name: 'datatype', at: 12, type: 'i16' },
  { name: 'bitpix', at: 14, type: 'i16' },
  ...Array.from({ length: 8 }, (_, n): Field => ({ name: `dim[${n}]`, at: 16 + 8 * n, type: 'i64' })),
  ...Array.from({ length: 8 }, (_, n): Field => ({ name: `pixdim[${n}]`, at: 104 + 8 * n, type: 'f64' })),
  { name: 'vox_offset', at: 168, type: 'i64' },
  { name: 'scl_slope', at: 176, type: 'f64' },
  { name: 'scl_inter', at: 184, type: 'f64' },
  { name: 'qform_code', at: 344, type: 'i32' },
  { name: 'sform_code', at: 348, type: 'i32' },
  ...Array.from({ length: 6 }, (_, n): Field => ({ name: `quatern/qoffset[${n}]`, at: 352 + 8 * n, type: 'f64' })),
  ...Array.from({ length: 12 }, (_, n): Field => ({ name: `srow[${n}]`, at: 400 + 8 * n, type: 'f64' })),
  { name: 'xyzt_units', at: 500, type: 'i32' },
];

/** Values that sit on the edges the reader has to check. */
const EDGE_NUMBERS = [
  0, -0, 1, -1, 2, 3, 4, 7, 8, 16, 64, 255, 256, 348, 351, 352, 353, 540, 544, 1024, 32767, -32768, 65535,
  2 ** 31 - 1, -(2 ** 31), 2 ** 53 + 2, -(2 ** 53), 2 ** 62, 1e-45, 1e-38, 0.5, 1e9, 1e38, 3.4e38, 1e300,
  Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY,
];
const MAGICS = ['n+1\0', 'ni1\0', 'n+2\0', 'ni2\0', '\0\0\0\0', 'n+1x', 'N+1\0'];

/** Large grids a lying header may claim, among them the 1024×1024×800 of a whole-body CT. */
const BIG_DIMS = [
  [3, 1024, 1024, 800], [3, 32767, 32767, 32767], [3, 4096, 4096, 1], [3, 2048, 2048, 7], [4, 64, 64, 64, 32767], [7, 8, 8, 8, 8, 8, 8, 8],
];

type NiftiOp =
  | { t: 'byte'; at: number; inHeader: boolean; value: number }
  | { t: 'bit'; at: number; inHeader: boolean; bit: number }
  | { t: 'field'; field: number; edge: number; random: number; useRandom: boolean; swapped: boolean }
  | { t: 'big-dims'; which: number }
  | { t: 'truncate'; at: number }
  | { t: 'extend'; bytes: Uint8Array; zeros: number }
  | { t: 'insert'; at: number; bytes: Uint8Array };

type GzOp =
  | { t: 'byte'; at: number; value: number }
  | { t: 'truncate'; at: number }
  | { t: 'append'; bytes: Uint8Array; member: boolean }
  | { t: 'trailer'; value: number };

export interface NiftiCase {
  seed: number;
  ops: NiftiOp[];
  gzip: boolean;
  gzOps: GzOp[];
  /** Damage to the .img of a pair. */
  imageCut: number | null;
  inflater: 'node' | 'web';
}

const niftiOp: fc.Arbitrary<NiftiOp> = fc.oneof(
  { arbitrary: fc.record({ t: fc.constant('byte' as const), at: fc.nat(), inHeader: fc.boolean(), value: fc.integer({ min: 0, max: 255 }) }), weight: 3 },
  { arbitrary: fc.record({ t: fc.constant('bit' as const), at: fc.nat(), inHeader: fc.boolean(), bit: fc.integer({ min: 0, max: 7 }) }), weight: 2 },
  {
    arbitrary: fc.record({
      t: fc.constant('field' as const), field: fc.nat(), edge: fc.nat(), random: fc.double(), useRandom: fc.boolean(), swapped: fc.boolean(),
    }),
    weight: 6,
  },
  { arbitrary: fc.record({ t: fc.constant('big-dims' as const), which: fc.nat() }), weight: 1 },
  { arbitrary: fc.record({ t: fc.constant('truncate' as const), at: fc.nat() }), weight: 2 },
  {
    arbitrary: fc.record({ t: fc.constant('extend' as const), bytes: fc.uint8Array({ maxLength: 64 }), zeros: fc.oneof(fc.constant(0), fc.integer({ min: 0, max: 1 << 20 })) }),
    weight: 1,
  },
  { arbitrary: fc.record({ t: fc.constant('insert' as const), at: fc.nat(), bytes: fc.uint8Array({ minLength: 1, maxLength: 16 }) }), weight: 1 },
);

const gzOp: fc.Arbitrary<GzOp> = fc.oneof(
  fc.record({ t: fc.constant('byte' as const), at: fc.nat(), value: fc.integer({ min: 0, max: 255 }) }),
  fc.record({ t: fc.constant('truncate' as const), at: fc.nat() }),
  fc.record({ t: fc.constant('append' as const), bytes: fc.uint8Array({ maxLength: 64 }), member: fc.boolean() }),
  fc.record({ t: fc.constant('trailer' as const), value: fc.nat() }),
);

export const niftiCase: fc.Arbitrary<NiftiCase> = fc.record({
  seed: fc.nat({ max: NIFTI_SEEDS.length - 1 }),
  ops: fc.array(niftiOp, { minLength: 0, maxLength: 4 }),
  gzip: fc.boolean(),
  gzOps: fc.oneof({ arbitrary: fc.constant([] as GzOp[]), weight: 3 }, { arbitrary: fc.array(gzOp, { minLength: 1, maxLength: 3 }), weight: 1 }),
  imageCut: fc.option(fc.nat(), { freq: 3 }),
  inflater: fc.constantFrom('node' as const, 'web' as const),
});

function writeField(bytes: Uint8Array, f: Field, value: number, le: boolean): void {
  const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const size = { i16: 2, i32: 4, i64: 8, f32: 4, f64: 8, u8: 1, magic: 4 }[f.type];
  if (f.at + size > bytes.length) return;
  const int = (lo: number, hi: number) => (Number.isFinite(value) ? Math.max(lo, Math.min(hi, Math.trunc(value))) : 0);
  switch (f.type) {
    case 'i16': v.setInt16(f.at, int(-32768, 32767), le); break;
    case 'i32': v.setInt32(f.at, int(-(2 ** 31), 2 ** 31 - 1), le); break;
    case 'i64': {
      const big = Number.isFinite(value) ? BigInt(Math.trunc(Math.max(-(2 ** 63), Math.min(2 ** 63 - 1024, value)))) : 2n ** 63n - 1n;
      v.setBigInt64(f.at, big, le);
      break;
    }
    case 'f32': v.setFloat32(f.at, value, le); break;
    case 'f64': v.setFloat64(f.at, value, le); break;
    case 'u8': v.setUint8(f.at, int(0, 255)); break;
    case 'magic': {
      const m = MAGICS[Math.abs(Math.trunc(value)) % MAGICS.length] ?? MAGICS[0];
      for (let n = 0; n < 4; n++) bytes[f.at + n] = m.charCodeAt(n);
      break;
    }
  }
}

function applyNiftiOp(bytes: Uint8Array, op: NiftiOp, seed: NiftiSeed): Uint8Array {
  const headerEnd = seed.format === 1 ? 352 : 544;
  const pos = (at: number, inHeader: boolean) => at % Math.max(1, inHeader ? Math.min(bytes.length, headerEnd) : bytes.length);
  switch (op.t) {
    case 'byte':
      if (bytes.length > 0) bytes[pos(op.at, op.inHeader)] = op.value;
      return bytes;
    case 'bit':
      if (bytes.length > 0) bytes[pos(op.at, op.inHeader)] ^= 1 << op.bit;
      return bytes;
    case 'field': {
      const fields = seed.format === 1 ? FIELDS1 : FIELDS2;
      const f = fields[op.field % fields.length];
      // A random double spread over many magnitudes, or an edge value.
      const value = op.useRandom ? (op.random - 0.5) * 10 ** Math.floor(op.random * 12) : EDGE_NUMBERS[op.edge % EDGE_NUMBERS.length];
      writeField(bytes, f, value, op.swapped ? !seed.littleEndian : seed.littleEndian);
      return bytes;
    }
    case 'big-dims': {
      const dims = BIG_DIMS[op.which % BIG_DIMS.length];
      const fields = (seed.format === 1 ? FIELDS1 : FIELDS2).filter((f) => f.name.startsWith('dim['));
      dims.forEach((d, n) => writeField(bytes, fields[n], d, seed.littleEndian));
      return bytes;
    }
    case 'truncate':
      return bytes.slice(0, op.at % (bytes.length + 1));
    case 'extend': {
      const out = new Uint8Array(bytes.length + op.bytes.length + op.zeros);
      out.set(bytes);
      out.set(op.bytes, bytes.length);
      return out;
    }
    case 'insert': {
      const at = op.at % (bytes.length + 1);
      const out = new Uint8Array(bytes.length + op.bytes.length);
      out.set(bytes.subarray(0, at));
      out.set(op.bytes, at);
      out.set(bytes.subarray(at), at + op.bytes.length);
      return out;
    }
  }
}

function applyGzOp(gz: Uint8Array, op: GzOp): Uint8Array {
  switch (op.t) {
    case 'byte':
      if (gz.length > 0) gz[op.at % gz.length] = op.value;
      return gz;
    case 'truncate':
      return gz.slice(0, op.at % (gz.length + 1));
    case 'append': {
      // A second gzip member (concatenated streams are valid gzip) or plain trailing garbage.
      const extra = op.member ? gzipSync(op.bytes) : op.bytes;
      const out = new Uint8Array(gz.length + extra.length);
      out.set(gz);
      out.set(extra, gz.length);
      return out;
    }
    case 'trailer':
      // The last 8 bytes are CRC-32 and the uncompressed length (mod 2^32).
      if (gz.length >= 8) new DataView(gz.buffer, gz.byteOffset, gz.byteLength).setUint32(gz.length - 4 - 4 * (op.value % 2), op.value >>> 0, true);
      return gz;
  }
}

/** The bytes a case hands to the reader. */
export function buildNifti(c: NiftiCase): { bytes: Uint8Array; image?: Uint8Array; label: string } {
  const seed = NIFTI_SEEDS[c.seed];
  let bytes: Uint8Array = seed.bytes.slice();
  for (const op of c.ops) bytes = applyNiftiOp(bytes, op, seed);
  if (c.gzip) {
    bytes = gzipSync(bytes);
    for (const op of c.gzOps) bytes = applyGzOp(bytes, op);
  }
  let image = seed.image?.slice();
  if (image && c.imageCut !== null) image = image.slice(0, c.imageCut % (image.length + 1));
  return { bytes, image, label: seed.label };
}

// ---------------------------------------------------------------------------------------------
// Valid JSON documents (docs/contracts.md) to start from.

const MANIFEST_SEEDS: unknown[] = [
  {
    patient: { id: 'DEMO-0001', birthYear: 1961, heightCm: 172, weightKg: 80 },
    marginMm: 10,
    visits: [
      { id: 'v1', date: '2026-01-12', scan: 'v1/scan.nii.gz', segments: 'v1/segments.nii.gz', scheme: 'default', lesions: 'v1/lesions.nii.gz' },
      { id: 'v2', date: '2026-03-02', scan: 'v2/scan.nii.gz', liver: 'v2/liver.nii.gz', landmarks: 'v2/landmarks.json', marks: 'v2/marks.json' },
    ],
    targets: ['A', 'C'],
  },
  {
    patient: { id: 'DEMO-0002', birthYear: 1953, heightCm: 164, weightKg: 71, sex: 'female', demo: true },
    marginMm: 7.5,
    criteria: 'mRECIST',
    visits: [
      { id: 'v1', date: '2026-02-02', scan: 'v1/scan.nii.gz', liver: 'v1/liver.nii.gz', landmarks: 'v1/landmarks.json', caudate: 'v1/caudate.nii.gz', splitIV: true, lesions: 'v1/lesions.nii.gz', viable: 'v1/viable.nii.gz' },
      { id: 'v2', date: '2026-04-13', scan: 'v2/scan.nii.gz', segments: 'v2/segments.nii.gz', scheme: 'v2/scheme.json', marks: 'v2/marks.json', note: 'arterial phase only' },
    ],
    treatments: [{ date: '2026-02-16', kind: 'ablation', label: 'Microwave ablation, segment VIII' }],
  },
];

const LANDMARK_SEEDS: unknown[] = [
  {
    space: 'RAS', units: 'mm',
    points: {
      ivc_superior: [10, -35, 55], ivc_inferior: [10, -35, -40], right_hepatic_vein: [80, 5, 45],
      middle_hepatic_vein: [5, 45, 42], umbilical_fissure: [-35, 50, 22], portal_bifurcation: [20, -5, 0],
    },
  },
  {
    points: {
      ivc_superior: [12.5, -30.25, 60.75], ivc_inferior: [11, -33.5, -35], right_hepatic_vein: [85.5, 2, 40],
      middle_hepatic_vein: [2.25, 40, 45.5], umbilical_fissure: [-40, 55, 20], portal_bifurcation: [18, -2, 3],
    },
  },
];

const MARKS_SEEDS: unknown[] = [
  {
    space: 'RAS', units: 'mm',
    marks: [
      { id: 'M1', centreMm: [34, 19.2, 48.3], longestAxialMm: 31, shortAxisMm: 24.8, endpointsMm: [[18.5, 20, 48.3], [49.5, 18.4, 48.3]], viableAxialMm: 0 },
      { id: 'M2', centreMm: [-20, 40, 10], longestAxialMm: 12, shortAxisMm: 9.5 },
    ],
  },
  { marks: [{ id: 'L7', centreMm: [1, 2, 3], shortAxisMm: 4, endpointsMm: [[0, 0, 0], [6, 8, 0]] }] },
];

const SCHEME_SEEDS: unknown[] = [
  { labels: { 1: 'I', 2: 'II', 3: 'III', 4: 'IVa', 9: 'IVb', 5: 'V', 6: 'VI', 7: 'VII', 8: 'VIII' } },
  { labels: { 10: 'II', 20: 'III', 30: 'IV', '-1': 'V' } },
  { labels: { 1: 'I', 2: 'II', 4: 'IVa', 9: 'IVb' } },
];

export type JsonParser = 'manifest' | 'landmarks' | 'marks' | 'scheme';

export const JSON_SEEDS: Readonly<Record<JsonParser, unknown[]>> = {
  manifest: MANIFEST_SEEDS, landmarks: LANDMARK_SEEDS, marks: MARKS_SEEDS, scheme: SCHEME_SEEDS,
};

// ---------------------------------------------------------------------------------------------
// JSON mutations: on the parsed tree (delete, replace, retype, duplicate keys, raw number text,
// deep nesting) and on the text (truncation, random unicode, a byte-order mark).

/** Text written as is into the document where a value was. */
class Raw {
  constructor(readonly text: string) {}
}

type Odd = { t: 'value'; value: unknown } | { t: 'raw'; text: string };

const RAW_TEXTS = [
  '1e999', '-1e999', '-0', '1e-400', '123456789012345678901234567890', '9007199254740993', '0.1e1', '1E+2',
  'NaN', 'Infinity', '-Infinity', 'undefined', "'single'", '0x10', '01', '.5', '+1', '"NaN"', '"Infinity"', '"-Infinity"',
  '"1e999"', '"\\ud800"', '"\\u0000"', '"\\uFEFF"', '"..\\/..\\/etc\\/passwd"', '""', '" "', 'true', 'null', '[]', '{}',
];

/** Nesting deep enough to overflow a recursive walk (JSON.parse itself copes). */
function deep(depth: number, object: boolean): string {
  return object ? '{"a":'.repeat(depth) + '1' + '}'.repeat(depth) : '['.repeat(depth) + ']'.repeat(depth);
}

const oddValue: fc.Arbitrary<Odd> = fc.oneof(
  fc.record({ t: fc.constant('raw' as const), text: fc.constantFrom(...RAW_TEXTS) }),
  fc.record({
    t: fc.constant('raw' as const),
    text: fc.tuple(fc.integer({ min: 1, max: 30000 }), fc.boolean()).map(([d, o]) => deep(d, o)),
  }),
  fc.record({ t: fc.constant('raw' as const), text: fc.integer({ min: 1, max: 200_000 }).map((n) => JSON.stringify('x'.repeat(n))) }),
  fc.record({ t: fc.constant('value' as const), value: fc.string({ unit: 'binary', maxLength: 40 }) }),
  fc.record({ t: fc.constant('value' as const), value: fc.oneof(fc.integer(), fc.double({ noNaN: true, noDefaultInfinity: true }), fc.boolean(), fc.constant(null)) }),
  fc.record({ t: fc.constant('value' as const), value: fc.jsonValue({ maxDepth: 3 }) }),
);

type JsonOp =
  | { t: 'delete'; at: number }
  | { t: 'replace'; at: number; with: Odd }
  | { t: 'retype'; at: number }
  | { t: 'duplicate-key'; at: number; with: Odd; before: boolean }
  | { t: 'rename-key'; at: number; suffix: string }
  | { t: 'repeat-element'; at: number };

type TextOp =
  | { t: 'truncate'; at: number }
  | { t: 'insert'; at: number; text: string }
  | { t: 'replace-char'; at: number; text: string }
  | { t: 'bom' }
  | { t: 'wrap'; depth: number };

export interface JsonCase {
  seed: number;
  ops: JsonOp[];
  textOps: TextOp[];
}

const jsonOp: fc.Arbitrary<JsonOp> = fc.oneof(
  fc.record({ t: fc.constant('delete' as const), at: fc.nat() }),
  { arbitrary: fc.record({ t: fc.constant('replace' as const), at: fc.nat(), with: oddValue }), weight: 4 },
  fc.record({ t: fc.constant('retype' as const), at: fc.nat() }),
  fc.record({ t: fc.constant('duplicate-key' as const), at: fc.nat(), with: oddValue, before: fc.boolean() }),
  fc.record({ t: fc.constant('rename-key' as const), at: fc.nat(), suffix: fc.string({ unit: 'binary', minLength: 1, maxLength: 3 }) }),
  fc.record({ t: fc.constant('repeat-element' as const), at: fc.nat() }),
);

const textOp: fc.Arbitrary<TextOp> = fc.oneof(
  fc.record({ t: fc.constant('truncate' as const), at: fc.nat() }),
  fc.record({ t: fc.constant('insert' as const), at: fc.nat(), text: fc.string({ unit: 'binary', minLength: 1, maxLength: 8 }) }),
  fc.record({ t: fc.constant('replace-char' as const), at: fc.nat(), text: fc.string({ unit: 'binary', minLength: 1, maxLength: 1 }) }),
  fc.record({ t: fc.constant('bom' as const) }),
  fc.record({ t: fc.constant('wrap' as const), depth: fc.integer({ min: 1, max: 30000 }) }),
);

export function jsonCase(parser: JsonParser): fc.Arbitrary<JsonCase> {
  return fc.record({
    seed: fc.nat({ max: JSON_SEEDS[parser].length - 1 }),
    ops: fc.array(jsonOp, { minLength: 0, maxLength: 4 }),
    textOps: fc.oneof({ arbitrary: fc.constant([] as TextOp[]), weight: 3 }, { arbitrary: fc.array(textOp, { minLength: 1, maxLength: 2 }), weight: 1 }),
  });
}

/** Extra (repeated) keys written after or before an object's own entries. */
const extraKeys = new WeakMap<object, { key: string; value: unknown; before: boolean }[]>();

type Slot = { parent: Record<string, unknown> | unknown[]; key: string | number };

/** Every place in the tree that holds a value (the root has none). */
function slots(tree: unknown): Slot[] {
  const out: Slot[] = [];
  const walk = (v: unknown) => {
    if (Array.isArray(v)) v.forEach((x, n) => { out.push({ parent: v, key: n }); walk(x); });
    else if (v && typeof v === 'object' && !(v instanceof Raw)) {
      for (const [k, x] of Object.entries(v)) { out.push({ parent: v as Record<string, unknown>, key: k }); walk(x); }
    }
  };
  walk(tree);
  return out;
}

function oddToValue(o: Odd): unknown {
  return o.t === 'raw' ? new Raw(o.text) : o.value;
}

function retyped(v: unknown): unknown {
  if (typeof v === 'number') return String(v);
  if (typeof v === 'string') return Number.isNaN(Number(v)) ? v.length : Number(v);
  if (typeof v === 'boolean') return v ? 1 : 'false';
  if (Array.isArray(v)) return Object.fromEntries(v.map((x, n) => [String(n), x]));
  if (v && typeof v === 'object') return Object.values(v);
  return {};
}

function applyJsonOp(root: { doc: unknown }, op: JsonOp): void {
  const all = slots(root.doc);
  if (all.length === 0) return;
  const { parent, key } = all[op.at % all.length];
  const get = () => (parent as Record<string | number, unknown>)[key];
  const set = (v: unknown) => { (parent as Record<string | number, unknown>)[key] = v; };
  switch (op.t) {
    case 'delete':
      if (Array.isArray(parent)) parent.splice(key as number, 1);
      else delete parent[key as string];
      return;
    case 'replace':
      set(oddToValue(op.with));
      return;
    case 'retype':
      set(retyped(get()));
      return;
    case 'duplicate-key': {
      if (Array.isArray(parent)) return;
      const list = extraKeys.get(parent) ?? [];
      list.push({ key: key as string, value: oddToValue(op.with), before: op.before });
      extraKeys.set(parent, list);
      return;
    }
    case 'rename-key': {
      if (Array.isArray(parent)) return;
      const v = parent[key as string];
      delete parent[key as string];
      parent[`${String(key)}${op.suffix}`] = v;
      return;
    }
    case 'repeat-element':
      if (Array.isArray(parent)) parent.splice(key as number, 0, structuredClone(get()));
      return;
  }
}

/** JSON text of a tree that may hold Raw pieces and repeated keys. */
function serialize(v: unknown): string {
  if (v instanceof Raw) return v.text;
  if (Array.isArray(v)) return `[${v.map(serialize).join(',')}]`;
  if (v && typeof v === 'object') {
    const extra = extraKeys.get(v) ?? [];
    const entries: [string, unknown][] = [
      ...extra.filter((e) => e.before).map((e): [string, unknown] => [e.key, e.value]),
      ...Object.entries(v),
      ...extra.filter((e) => !e.before).map((e): [string, unknown] => [e.key, e.value]),
    ];
    return `{${entries.map(([k, x]) => `${JSON.stringify(k)}:${serialize(x)}`).join(',')}}`;
  }
  return JSON.stringify(v) ?? 'null';
}

function applyTextOp(text: string, op: TextOp): string {
  switch (op.t) {
    case 'truncate': return text.slice(0, op.at % (text.length + 1));
    case 'insert': {
      const at = op.at % (text.length + 1);
      return text.slice(0, at) + op.text + text.slice(at);
    }
    case 'replace-char': {
      if (text.length === 0) return op.text;
      const at = op.at % text.length;
      return text.slice(0, at) + op.text + text.slice(at + 1);
    }
    case 'bom': return `\uFEFF${text}`;
    case 'wrap': return '['.repeat(op.depth) + text + ']'.repeat(op.depth);
  }
}

/** The text a case hands to the parser. */
export function buildJson(parser: JsonParser, c: JsonCase): string {
  const root = { doc: structuredClone(JSON_SEEDS[parser][c.seed]) };
  for (const op of c.ops) applyJsonOp(root, op);
  let text = serialize(root.doc);
  for (const op of c.textOps) text = applyTextOp(text, op);
  return text;
}

// ---------------------------------------------------------------------------------------------
// The property every case must hold.

export type Outcome = 'result' | ErrorKind;

/** A case that broke the rule; fast-check reports it with the (shrunk) input. */
export class FuzzFailure extends Error {
  override name = 'FuzzFailure';
}

export interface CaseReport {
  outcome: Outcome;
  ms: number;
}

/**
 * Runs one parser call and checks the rule: a result, or a FalciformError naming one of `files` first
 * (a .hdr/.img pair has two).
 * Throws FuzzFailure otherwise, or when the call took longer than CASE_LIMIT_MS or never settled.
 */
export async function runCase(files: string | readonly string[], call: () => unknown): Promise<CaseReport> {
  const names = typeof files === 'string' ? [files] : files;
  const t0 = performance.now();
  let timer: ReturnType<typeof setTimeout> | undefined;
  const hang = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new FuzzFailure(`no result after ${HANG_MS} ms (hang)`)), HANG_MS);
  });
  let outcome: Outcome;
  try {
    await Promise.race([Promise.resolve().then(call), hang]);
    outcome = 'result';
  } catch (e) {
    if (e instanceof FuzzFailure) throw e;
    if (!isFalciformError(e)) {
      const what = e instanceof Error ? `${e.name}: ${e.message.slice(0, 300)}` : String(e);
      throw new FuzzFailure(`untyped exception ${what}`);
    }
    if (!names.some((f) => e.message.startsWith(`${f}: `))) {
      throw new FuzzFailure(`typed error does not start with the file name: ${e.message.slice(0, 300)}`);
    }
    outcome = e.kind;
  } finally {
    clearTimeout(timer);
  }
  const ms = performance.now() - t0;
  if (ms > CASE_LIMIT_MS) throw new FuzzFailure(`took ${ms.toFixed(0)} ms (limit ${CASE_LIMIT_MS} ms)`);
  return { outcome, ms };
}

const NIFTI_FILE = 'visit1/scan.nii';
const IMAGE_FILE = 'visit1/scan.img';

/**
 * Reads one NIfTI case under the fuzz budget. The inflater is watched: the reader may ask it for
 * the header, or for at most the budget plus what the compressed bytes could hold, never more.
 */
export async function runNiftiCase(c: NiftiCase): Promise<CaseReport> {
  const { bytes, image } = buildNifti(c);
  const inner: Inflate = c.inflater === 'node' ? nodeInflate : webInflate;
  const inflate: Inflate = async (gz, max) => {
    const deflateLimit = gz.length * 1032 + 1024;
    if (max > HEADER_BYTES_NEEDED && max > FUZZ_MAX_BYTES + deflateLimit) {
      throw new FuzzFailure(`the reader asked the inflater for ${max} bytes, over the budget of ${FUZZ_MAX_BYTES}`);
    }
    const out = await inner(gz, max);
    if (out.buffer.byteLength > Math.max(max, HEADER_BYTES_NEEDED) && out.buffer.byteLength > deflateLimit) {
      throw new FuzzFailure(`the inflater held ${out.buffer.byteLength} bytes when asked for ${max}`);
    }
    return out;
  };
  const before = process.memoryUsage().arrayBuffers;
  const report = await runCase([NIFTI_FILE, IMAGE_FILE], () =>
    readNifti(bytes, NIFTI_FILE, { inflate, maxBytes: FUZZ_MAX_BYTES, imageBytes: image, imageFile: IMAGE_FILE }),
  );
  // Memory held outside the JS heap right after the call: the input, the voxels and the inflate
  // buffers, which are all bounded by the budget; a lying header that got past the check would not be.
  const grown = process.memoryUsage().arrayBuffers - before;
  const allowed = FUZZ_MAX_BYTES + 4 * (bytes.length + (image?.length ?? 0)) + 4 * 1024 ** 2;
  if (grown > allowed) throw new FuzzFailure(`external memory grew by ${grown} bytes during one read (allowed ${allowed})`);
  return report;
}

const JSON_FILES: Record<JsonParser, string> = {
  manifest: 'DEMO-0001/manifest.json',
  landmarks: 'v2/landmarks.json',
  marks: 'v2/marks.json',
  scheme: 'v1/scheme.json',
};

/** Parses one JSON case with its parser (a landmark set is also checked for the plane rule). */
export function runJsonCase(parser: JsonParser, c: JsonCase): Promise<CaseReport> {
  const text = buildJson(parser, c);
  const file = JSON_FILES[parser];
  const call = {
    manifest: () => parseManifest(text, file),
    landmarks: () => checkLandmarks(parseLandmarks(text, file), file),
    marks: () => parseMarks(text, file),
    scheme: () => parseScheme(text, file),
  }[parser];
  return runCase(file, call);
}

// ---------------------------------------------------------------------------------------------
// Running many cases and counting what happened.

export type ParserName = 'nifti' | JsonParser;
export const PARSERS: readonly ParserName[] = ['nifti', 'manifest', 'landmarks', 'marks', 'scheme'];

export interface Tally {
  parser: ParserName;
  cases: number;
  results: number;
  errors: Partial<Record<ErrorKind, number>>;
  slowestMs: number;
  peakRssMiB: number;
  /** fast-check's report of the first failing case (shrunk), or null. */
  failure: string | null;
}

/**
 * Runs `cases` generated cases of one parser with a fixed seed. Counts only the first run of each
 * case: shrinking after a failure re-runs smaller cases, which are not counted again.
 */
export async function fuzzParser(parser: ParserName, cases: number, seed: number): Promise<Tally> {
  const tally: Tally = { parser, cases: 0, results: 0, errors: {}, slowestMs: 0, peakRssMiB: 0, failure: null };
  let failed = false;
  const count = (r: CaseReport) => {
    if (failed) return;
    tally.cases++;
    if (r.outcome === 'result') tally.results++;
    else tally.errors[r.outcome] = (tally.errors[r.outcome] ?? 0) + 1;
    tally.slowestMs = Math.max(tally.slowestMs, r.ms);
    if (tally.cases % 16 === 0) tally.peakRssMiB = Math.max(tally.peakRssMiB, process.memoryUsage.rss() / 1024 ** 2);
  };
  const guard = async (run: () => Promise<CaseReport>) => {
    try {
      count(await run());
    } catch (e) {
      failed = true;
      throw e;
    }
  };
  const params = { numRuns: cases, seed };
  const details = parser === 'nifti'
    ? await fc.check(fc.asyncProperty(niftiCase, (c) => guard(() => runNiftiCase(c))), params)
    : await fc.check(fc.asyncProperty(jsonCase(parser), (c) => guard(() => runJsonCase(parser, c))), params);
  tally.peakRssMiB = Math.max(tally.peakRssMiB, process.memoryUsage.rss() / 1024 ** 2);
  if (details.failed) {
    const err = details.errorInstance instanceof Error ? details.errorInstance.message : String(details.errorInstance);
    // Deep nesting and long strings repeat one short piece thousands of times: write it once with a count.
    const example = fc.stringify(details.counterexample)
      .replace(/(.{1,8}?)\1{9,}/g, (run, unit: string) => `${unit}…(×${run.length / unit.length})`)
      .slice(0, 2000);
    tally.failure = `${parser}: ${err}\n  seed ${details.seed}, path "${details.counterexamplePath}"\n  counterexample: ${example}`;
  }
  return tally;
}

/** One line of counts, e.g. "nifti  10000 cases: 2310 results, bad-file 7012, too-large 678; slowest 12 ms; peak RSS 180 MiB". */
export function describeTally(t: Tally): string {
  const kinds = Object.entries(t.errors).sort(([a], [b]) => a.localeCompare(b)).map(([k, n]) => `${k} ${n}`).join(', ');
  return `${t.parser.padEnd(10)} ${String(t.cases).padStart(6)} cases: ${t.results} results, typed errors ${kinds || 'none'}; ` +
    `slowest ${t.slowestMs.toFixed(1)} ms; peak RSS ${t.peakRssMiB.toFixed(0)} MiB`;
}
