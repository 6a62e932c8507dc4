// Bad input never crashes, hangs or allocates from a lying header: each case gives a typed error
// whose message names the file and the problem. Files are hand-built from nifti1.h's layout.
import { mkdirSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { loadVolume, nodeInflate, readTextFile } from '../../src/cli/node-io.js';
import { FalciformError, isFalciformError } from '../../src/errors.js';
import { readNifti, type Inflate } from '../../src/volume/nifti-read.js';
import { webInflate } from '../../src/volume/web-gzip.js';
import { header1, int16Bytes, single1, tempDir, type Header1 } from './nifti-fixtures.js';

const FILE = 'visit1/scan.nii';
const values24 = Array.from({ length: 24 }, (_, n) => n * 10 - 50);
const good = () => single1({}, int16Bytes(values24));

async function failure(bytes: Uint8Array, opts: { maxBytes?: number; inflate?: Inflate } = {}): Promise<FalciformError> {
  try {
    await readNifti(bytes, FILE, { inflate: opts.inflate ?? nodeInflate, maxBytes: opts.maxBytes });
  } catch (e) {
    if (!isFalciformError(e)) throw new Error(`untyped error: ${String(e)}`, { cause: e });
    return e;
  }
  throw new Error('no error');
}

const withHeader = (h: Header1) => single1(h, int16Bytes(values24));

describe('bad input gives a typed error naming the file and the problem', () => {
  it.each<[string, () => Uint8Array, RegExp]>([
    ['an empty file', () => new Uint8Array(0), /: is empty$/],
    ['a text file', () => new TextEncoder().encode('patient,visit,lesion\nDEMO-0001,v1,L1\n'), /: is a text file, not a NIfTI image$/],
    ['binary junk', () => new Uint8Array(400).fill(0xa5), /: is not a NIfTI image \(the first 4 bytes give a header size of/],
    ['a 3-byte file', () => new Uint8Array([0x5c, 1, 0]), /: is too short to be a NIfTI image \(3 bytes\)/],
    ['a wrong magic string', () => withHeader({ magic: 'n+9' }), /: has a wrong magic string "n\+9" \(expected "n\+1" or "ni1"\)/],
    ['an Analyze 7.5 header (no magic)', () => withHeader({ magic: '' }), /: is an Analyze 7\.5 header without the NIfTI magic/],
    ['a truncated header', () => good().subarray(0, 200), /: NIfTI-1 header is truncated \(200 of 348 bytes\)/],
    ['truncated data', () => good().subarray(0, 352 + 30), /: image data is truncated: 30 of 48 bytes of the first volume are present/],
    ['a negative dimension', () => withHeader({ dim: [3, 4, -3, 2, 1, 1, 1, 1] }), /: dimension 2 is negative \(-3\)/],
    ['a zero dimension', () => withHeader({ dim: [3, 4, 3, 0, 1, 1, 1, 1] }), /: dimension 3 is 0, so the image has no voxels/],
    ['dim[0] out of range', () => withHeader({ dim: [9, 4, 3, 2, 1, 1, 1, 1] }), /: has an invalid number of dimensions dim\[0\] = 9 \(must be 1 to 7\)/],
    ['vox_offset past the end', () => withHeader({ voxOffset: 1e6 }), /: vox_offset 1000000 is past the end of the file \(400 bytes\)/],
    ['a NaN vox_offset', () => withHeader({ voxOffset: NaN }), /: has an invalid vox_offset \(NaN\)/],
    ['zero spacing (qform)', () => withHeader({ qformCode: 1, pixdim: [1, 1, 0, 1, 1, 1, 1, 1] }), /: voxel spacing pixdim\[2\] along j is 0; it must be a positive number of mm/],
    ['NaN spacing (pixdim only)', () => withHeader({ pixdim: [1, NaN, 1, 1, 1, 1, 1, 1] }), /: voxel spacing pixdim\[1\] along i is NaN/],
    ['negative spacing (qform)', () => withHeader({ qformCode: 1, pixdim: [1, 1, 1, -2, 1, 1, 1, 1] }), /: voxel spacing pixdim\[3\] along k is negative \(-2\)/],
    ['a NaN in the sform', () => withHeader({ sformCode: 1, srow: [[1, 0, 0, 0], [0, NaN, 0, 0], [0, 0, 1, 0]] }), /: sform holds a value that is not a number/],
    ['a singular sform (zero spacing)', () => withHeader({ sformCode: 1, srow: [[1, 0, 0, 0], [0, 0, 0, 0], [0, 0, 1, 0]] }), /: sform is singular/],
    ['an unsupported datatype (int64)', () => withHeader({ datatype: 1024, bitpix: 64 }), /: datatype int64 \(code 1024\) is not supported/],
    ['an unknown datatype code', () => withHeader({ datatype: 9999 }), /: datatype unknown code 9999 is not supported/],
    ['an infinite scl_inter with a valid slope', () => withHeader({ slope: 2, inter: Infinity }), /: has a valid scl_slope but an invalid scl_inter \(Infinity\)/],
  ])('%s', async (_what, make, message) => {
    const e = await failure(make());
    expect(e.kind).toBe('bad-file');
    expect(e.message.startsWith(`${FILE}: `)).toBe(true);
    expect(e.message).toMatch(message);
  });

  it('gzip: corrupt, truncated and lying streams', async () => {
    const gz = gzipSync(good());
    const corrupt = gz.slice();
    corrupt.fill(0xff, 12, 40);
    for (const inflate of [nodeInflate, webInflate]) {
      expect((await failure(corrupt, { inflate })).message).toMatch(/^visit1\/scan\.nii: gzip data is corrupt or truncated/);
      expect((await failure(gz.subarray(0, 30), { inflate })).message).toMatch(/^visit1\/scan\.nii: (gzip data is corrupt or truncated|NIfTI-1 header is truncated)/);
      // Only the gzip magic: the header cannot be read.
      expect((await failure(gz.subarray(0, 2), { inflate })).kind).toBe('bad-file');
    }
    // Stream ends inside the voxel data.
    const short = gzipSync(good().subarray(0, 360));
    expect((await failure(short)).message).toMatch(/image data is truncated: 8 of 48 bytes/);
    const past = gzipSync(withHeader({ voxOffset: 5000 }));
    expect((await failure(past)).message).toMatch(/vox_offset 5000 is past the end of the decompressed data \(400 bytes\)/);
  });

  it('absurd dims are refused as too large before anything is allocated', async () => {
    // 32767³ int16 would be 64 TiB; the file is 400 bytes.
    const e = await failure(withHeader({ dim: [3, 32767, 32767, 32767, 1, 1, 1, 1] }));
    expect(e.kind).toBe('too-large');
    expect(e.message).toMatch(/^visit1\/scan\.nii: the volume \(32767 × 32767 × 32767 int16\) needs [\d,]+ MB, over the memory budget of 2,048 MB$/);
  });

  it('the memory budget is settable', async () => {
    expect((await failure(good(), { maxBytes: 47 })).kind).toBe('too-large');
    const ok = await readNifti(good(), FILE, { inflate: nodeInflate, maxBytes: 48 });
    expect(ok.volume.data.length).toBe(24);
  });

  it('a lying header inside a small gzip asks the inflater for no more than deflate can produce', async () => {
    // 1000 × 1000 × 500 int16 (1 GB, within budget) claimed by a file of a few hundred bytes.
    const gz = gzipSync(withHeader({ dim: [3, 1000, 1000, 500, 1, 1, 1, 1] }));
    const asked: number[] = [];
    const spy: Inflate = (bytes, max) => {
      asked.push(max);
      return nodeInflate(bytes, max);
    };
    expect((await failure(gz, { inflate: spy })).message).toMatch(/image data is truncated/);
    expect(Math.max(...asked)).toBeLessThanOrEqual(gz.length * 1032 + 1024);
  });

  it('a gzip bomb behind a small header is inflated only as far as the first volume', async () => {
    // 64 MB of zeros after a valid 4×3×2 int16 image compress to about 64 kB.
    const bomb = gzipSync(Buffer.concat([good(), Buffer.alloc(64 * 1024 * 1024)]));
    const asked: number[] = [];
    const returned: number[] = [];
    const spy: Inflate = async (bytes, max) => {
      asked.push(max);
      const out = await nodeInflate(bytes, max);
      returned.push(out.buffer.byteLength);
      return out;
    };
    const loaded = await readNifti(bomb, FILE, { inflate: spy });
    expect(Array.from(loaded.volume.data)).toEqual(values24);
    // First the 540 bytes that hold either header, then header + the first volume.
    expect(asked).toEqual([540, 352 + 48]);
    expect(Math.max(...returned)).toBeLessThanOrEqual(540);
    for (const inflate of [nodeInflate, webInflate]) {
      const out = await inflate(bomb, 1000);
      expect(out.length).toBe(1000);
      expect(out.buffer.byteLength).toBe(1000);
    }
  });

  it('every truncation and many corruptions of a valid file end in success or a typed error', async () => {
    const plain = good();
    const gz = gzipSync(plain);
    let typed = 0;
    const attempt = async (bytes: Uint8Array) => {
      try {
        await readNifti(bytes, FILE, { inflate: nodeInflate });
      } catch (e) {
        if (!isFalciformError(e)) throw e;
        expect(e.message.startsWith(`${FILE}: `)).toBe(true);
        typed++;
      }
    };
    for (let n = 0; n < plain.length; n++) await attempt(plain.slice(0, n));
    for (let n = 0; n < gz.length; n++) await attempt(gz.slice(0, n));
    // Deterministic pseudo-random byte damage in the header and the gzip stream.
    let seed = 12345;
    const rand = () => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31);
    for (let trial = 0; trial < 400; trial++) {
      const src = trial % 2 === 0 ? plain : gz;
      const bytes = src.slice();
      for (let k = 0; k < 3; k++) bytes[Math.floor(rand() * Math.min(bytes.length, 360))] = Math.floor(rand() * 256);
      await attempt(bytes);
    }
    expect(typed).toBeGreaterThan(plain.length + gz.length - 2);
  });
});

describe('file access errors', () => {
  const dir = tempDir('badio');

  it('a missing file, a folder, a missing .img', async () => {
    await expect(loadVolume(join(dir, 'nope.nii.gz'))).rejects.toThrow(`${join(dir, 'nope.nii.gz')}: cannot be read: no such file`);
    mkdirSync(join(dir, 'folder.nii'));
    await expect(loadVolume(join(dir, 'folder.nii'))).rejects.toThrow(/folder\.nii: is a folder, not a regular file/);
    writeFileSync(join(dir, 'lonely.hdr'), header1({ magic: 'ni1', voxOffset: 0 }));
    await expect(loadVolume(join(dir, 'lonely.hdr'))).rejects.toThrow(`${join(dir, 'lonely.img')}: cannot be read: the .img data file of this .hdr/.img pair is missing`);
    await expect(readTextFile(join(dir, 'landmarks.json'))).rejects.toThrow(`${join(dir, 'landmarks.json')}: cannot be read: no such file`);
  });

  it('a 4-D uncompressed file is read only up to the end of its first volume', async () => {
    // Declares 1000 volumes but holds only the first: loading must succeed without reading on.
    const path = join(dir, 'series.nii');
    writeFileSync(path, single1({ dim: [4, 4, 3, 2, 1000, 1, 1, 1] }, int16Bytes(values24)));
    const loaded = await loadVolume(path);
    expect(Array.from(loaded.volume.data)).toEqual(values24);
    expect(loaded.info.volumeCount).toBe(1000);
    expect(readdirSync(dir)).toContain('series.nii');
  });
});
