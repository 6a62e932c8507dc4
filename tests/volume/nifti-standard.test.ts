// The NIfTI-1 standard's own statements (nifti1.h, the header documentation of the NIfTI Data Format
// Working Group, 2003), checked on hand-built files. Each check quotes or paraphrases the statement.
import { describe, expect, it } from 'vitest';
import { nodeInflate } from '../../src/cli/node-io.js';
import { readNifti } from '../../src/volume/nifti-read.js';
import { encodeNifti } from '../../src/volume/nifti-write.js';
import { makeVolume } from '../../src/volume/volume.js';
import { gzipSync } from 'node:zlib';
import { header1, int16Bytes, single1, type Header1 } from './nifti-fixtures.js';

const read = (bytes: Uint8Array, imageBytes?: Uint8Array) => readNifti(bytes, 'test.nii', { inflate: nodeInflate, imageBytes });
const values24 = Array.from({ length: 24 }, (_, n) => n * 10 - 50);
const affineOf = async (h: Header1) => (await read(single1(h, int16Bytes(values24)))).volume.affine;

function expectClose(actual: readonly number[], expected: readonly number[], tol = 1e-6) {
  expected.forEach((e, n) => expect(Math.abs(actual[n] - e), `element ${n}: ${actual[n]} vs ${e}`).toBeLessThanOrEqual(tol));
}

/** Rodrigues' rotation formula, independent of the quaternion algebra under test. */
function rotate(axis: [number, number, number], angle: number, v: [number, number, number]): number[] {
  const [kx, ky, kz] = axis;
  const c = Math.cos(angle), s = Math.sin(angle), dot = kx * v[0] + ky * v[1] + kz * v[2];
  const cross = [ky * v[2] - kz * v[1], kz * v[0] - kx * v[2], kx * v[1] - ky * v[0]];
  return [0, 1, 2].map((n) => v[n] * c + cross[n] * s + axis[n] * dot * (1 - c));
}

describe('NIfTI-1 standard (nifti1.h)', () => {
  it('"int sizeof_hdr; MUST be 348": 348 is read, anything else is not NIfTI-1', async () => {
    const ok = await read(single1({}, int16Bytes(values24)));
    expect(ok.info.format).toBe('NIfTI-1');
    const bad = single1({}, int16Bytes(values24));
    new DataView(bad.buffer).setInt32(0, 347, true);
    await expect(read(bad)).rejects.toThrow('test.nii: is not a NIfTI image (the first 4 bytes give a header size of 347, expected 348 or 540)');
  });

  it('magic "n+1" (6E 2B 31 00): data in the same file at (int)vox_offset', async () => {
    const bytes = single1({ dim: [3, 4, 3, 2, 1, 1, 1, 1] }, int16Bytes(values24));
    expect(Array.from(bytes.subarray(344, 348))).toEqual([0x6e, 0x2b, 0x31, 0x00]);
    const { volume } = await read(bytes);
    expect(Array.from(volume.data)).toEqual(values24);
  });

  it('"vox_offset=348.0 means that the data starts immediately after the NIFTI-1 header"', async () => {
    const bytes = new Uint8Array(348 + 48);
    bytes.set(header1({ voxOffset: 348 }));
    bytes.set(int16Bytes(values24), 348);
    expect(Array.from((await read(bytes)).volume.data)).toEqual(values24);
  });

  it('magic "ni1" (6E 69 31 00): data in the .img file, starting at offset 0', async () => {
    const hdr = header1({ magic: 'ni1', voxOffset: 0 });
    expect(Array.from(hdr.subarray(344, 348))).toEqual([0x6e, 0x69, 0x31, 0x00]);
    const { volume, info } = await read(hdr, int16Bytes(values24));
    expect(info.pair).toBe(true);
    expect(Array.from(volume.data)).toEqual(values24);
    await expect(read(hdr)).rejects.toThrow(/\.img data file is needed/);
  });

  it('"voxel (i,j,k) is stored starting at location (i + j*dim[1] + k*dim[1]*dim[2]) * (bitpix/8)"', async () => {
    const { volume } = await read(single1({ dim: [3, 4, 3, 2, 1, 1, 1, 1] }, int16Bytes(values24)));
    const at = (i: number, j: number, k: number) => volume.data[i + j * volume.dims[0] + k * volume.dims[0] * volume.dims[1]];
    expect(at(3, 2, 1)).toBe(values24[3 + 2 * 4 + 1 * 12]);
    expect(at(1, 0, 1)).toBe(values24[13]);
  });

  it('"if dim[0] is outside range 1..7, then the header information needs to be byte swapped"', async () => {
    const be = single1({ littleEndian: false }, int16Bytes(values24, false));
    expect(new DataView(be.buffer).getInt16(40, true)).toBe(768); // dim[0] = 3 read in the wrong byte order
    const { volume, info } = await read(be);
    expect(info.littleEndian).toBe(false);
    expect(Array.from(volume.data)).toEqual(values24);
  });

  it('"If the scl_slope field is nonzero, then each voxel value ... y = scl_slope * x + scl_inter"', async () => {
    const scaled = await read(single1({ slope: 0.5, inter: -1024 }, int16Bytes(values24)));
    expect(scaled.volume.data[7] * scaled.volume.slope + scaled.volume.inter).toBe(values24[7] * 0.5 - 1024);
    // Slope zero: no scaling, and scl_inter is not applied either.
    const unscaled = await read(single1({ slope: 0, inter: 99 }, int16Bytes(values24)));
    expect([unscaled.volume.slope, unscaled.volume.inter]).toEqual([1, 0]);
  });

  it('method 1 (qform_code = 0, sform_code = 0): "x = pixdim[1] * i, y = pixdim[2] * j, z = pixdim[3] * k"', async () => {
    expectClose(await affineOf({ pixdim: [1, 0.7, 0.8, 2.5, 1, 1, 1, 1] }), [0.7, 0, 0, 0, 0, 0.8, 0, 0, 0, 0, 2.5, 0, 0, 0, 0, 1]);
  });

  it('method 2 example: "qfac=-1 ... R = diag(1,-1,-1) ... represented by quaternion [a,b,c,d] = [0,1,0,0]"', async () => {
    // i left to right, j anterior to posterior, k inferior to superior.
    const a = await affineOf({ qformCode: 1, quatern: [1, 0, 0], qoffset: [-10, 20, -30], pixdim: [-1, 2, 3, 4, 1, 1, 1, 1] });
    expectClose(a, [2, 0, 0, -10, 0, -3, 0, 20, 0, 0, 4, -30, 0, 0, 0, 1]);
  });

  it('method 2: "[a,b,c,d] = [cos(h/2), p*sin(h/2), q*sin(h/2), r*sin(h/2)]" is a rotation by h about (p,q,r)', async () => {
    const axis: [number, number, number] = [2 / 7, -3 / 7, 6 / 7];
    const h = 1.1;
    const s = Math.sin(h / 2);
    const a = await affineOf({ qformCode: 1, quatern: [axis[0] * s, axis[1] * s, axis[2] * s], pixdim: [1, 1, 1, 1, 1, 1, 1, 1] });
    for (const [c, unit] of [[0, [1, 0, 0]], [1, [0, 1, 0]], [2, [0, 0, 1]]] as const) {
      // float32 storage of b, c, d limits agreement to about 1e-7.
      expectClose([a[c], a[4 + c], a[8 + c]], rotate(axis, h, [...unit]), 1e-6);
    }
  });

  it('method 2: "the center of the (i,j,k)=(0,0,0) voxel ... is just (qoffset_x,qoffset_y,qoffset_z)", steps scale by pixdim', async () => {
    const a = await affineOf({ qformCode: 2, quatern: [0, 0, Math.SQRT1_2], qoffset: [5, -6, 7], pixdim: [1, 0.5, 2, 3, 1, 1, 1, 1] });
    // 90° about z: i runs along +y, j along -x.
    expectClose(a, [0, -2, 0, 5, 0.5, 0, 0, -6, 0, 0, 3, 7, 0, 0, 0, 1], 1e-6);
  });

  it('"If pixdim[0]=0.0 (which should not occur), we take qfac=1"', async () => {
    const a = await affineOf({ qformCode: 1, pixdim: [0, 1, 1, 2, 1, 1, 1, 1] });
    expect(a[10]).toBe(2);
  });

  it('method 3 (sform_code > 0): x = srow_x[0]*i + ... + srow_x[3]; "no use is made of pixdim[]"', async () => {
    const srow: [number[], number[], number[]] = [[0.5, 0.1, 0, -100], [0, 0.75, 0.2, 50], [0.05, 0, 2.5, 7]];
    // pixdim is zero here: it must not matter, and a qform present as well must lose.
    const a = await affineOf({ sformCode: 1, qformCode: 1, srow, quatern: [1, 0, 0], pixdim: [1, 0, 0, 0, 0, 0, 0, 0] });
    expectClose(a, [...srow.flat(), 0, 0, 0, 1]);
  });

  it('xyzt_units: NIFTI_UNITS_METER (1) and NIFTI_UNITS_MICRON (3) are converted to mm', async () => {
    const metres = await read(single1({ pixdim: [1, 0.001, 0.001, 0.002, 1, 1, 1, 1], xyztUnits: 1 }, int16Bytes(values24)));
    expectClose(metres.volume.spacingMm, [1, 1, 2], 1e-4);
    expect(metres.warnings.join(' ')).toMatch(/metres; converted to mm/);
    const microns = await read(single1({ pixdim: [1, 700, 700, 2500, 1, 1, 1, 1], xyztUnits: 3 }, int16Bytes(values24)));
    expectClose(microns.volume.spacingMm, [0.7, 0.7, 2.5], 1e-6);
  });

  it('our writer follows the same statements: 348, "n+1", vox_offset 352, sform rows, qform codes', () => {
    const affine = [0, -2, 0, 5, 0.5, 0, 0, -6, 0, 0, 3, 7, 0, 0, 0, 1];
    const bytes = encodeNifti(makeVolume([4, 3, 2], new Int16Array(values24), affine, 'int16'), 'int16');
    const v = new DataView(bytes.buffer);
    expect(v.getInt32(0, true)).toBe(348);
    expect(Array.from(bytes.subarray(344, 348))).toEqual([0x6e, 0x2b, 0x31, 0x00]);
    expect(v.getFloat32(108, true)).toBe(352);
    expect([v.getInt16(252, true), v.getInt16(254, true)]).toEqual([2, 2]);
    expect([0, 1, 2, 3].map((c) => v.getFloat32(280 + 4 * c, true))).toEqual([0, -2, 0, 5]);
    // A 90° turn about z: (b, c, d) = (0, 0, sin 45°), qfac 1, pixdim (0.5, 2, 3).
    expectClose([256, 260, 264].map((o) => v.getFloat32(o, true)), [0, 0, Math.SQRT1_2]);
    expectClose([76, 80, 84, 88].map((o) => v.getFloat32(o, true)), [1, 0.5, 2, 3]);
    expect(bytes.length).toBe(352 + 48);
  });

  it('NIfTI-2: 540-byte header, magic "n+2\\0\\r\\n\\032\\n", 64-bit dims (from memory of the NIfTI-2 layout; offsets as nibabel\'s nifti2 header_dtype)', async () => {
    const h = new Uint8Array(544 + 48);
    const v = new DataView(h.buffer);
    v.setInt32(0, 540, true);
    [0x6e, 0x2b, 0x32, 0, 0x0d, 0x0a, 0x1a, 0x0a].forEach((b, n) => (h[4 + n] = b));
    v.setInt16(12, 4, true);
    v.setInt16(14, 16, true);
    [3, 4, 3, 2, 1, 1, 1, 1].forEach((d, n) => v.setBigInt64(16 + 8 * n, BigInt(d), true));
    [1, 0.7, 0.8, 2.5, 1, 1, 1, 1].forEach((p, n) => v.setFloat64(104 + 8 * n, p, true));
    v.setBigInt64(168, 544n, true);
    v.setInt32(348, 1, true); // sform_code
    [[0.7, 0, 0, -1], [0, 0.8, 0, -2], [0, 0, 2.5, -3]].forEach((row, r) => row.forEach((x, c) => v.setFloat64(400 + 32 * r + 8 * c, x, true)));
    v.setInt32(500, 2, true);
    h.set(int16Bytes(values24), 544);
    const { info, volume } = await read(h);
    expect(info.format).toBe('NIfTI-2');
    expect(info.dims).toEqual([4, 3, 2]);
    expectClose(volume.affine, [0.7, 0, 0, -1, 0, 0.8, 0, -2, 0, 0, 2.5, -3, 0, 0, 0, 1], 1e-12);
    expect(Array.from(volume.data)).toEqual(values24);
    // The same bytes gzipped, recognised by content alone.
    const gz = await readNifti(gzipSync(h), 'no-extension', { inflate: nodeInflate });
    expect(Array.from(gz.volume.data)).toEqual(values24);
  });
});
