// A .nii.gz larger than one read piece (4 MiB) is inflated as it is read from disk: its compressed
// bytes are never held whole. Such a file must give the same voxels, and the same errors when cut
// short or damaged, as the same bytes inflated from memory. The voxels are random, so the file
// compresses about 1:1 like the noisiest scan; the expected voxels are the bytes written (no
// compression library involved beyond node:zlib's gzipSync, which wrote the file).
import { randomFillSync } from 'node:crypto';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { beforeAll, describe, expect, it } from 'vitest';
import { loadVolume, nodeInflate } from '../../src/cli/node-io.js';
import { isFalciformError } from '../../src/errors.js';
import { readNifti } from '../../src/volume/nifti-read.js';
import { single1, tempDir } from './nifti-fixtures.js';

const MiB = 1024 ** 2;
/** 256 × 256 × 320 int16: 40 MiB of voxels, about 40 MiB gzipped. */
const DIM = [3, 256, 256, 320, 1, 1, 1, 1];
const VOXEL_BYTES = 256 * 256 * 320 * 2;

let raw: Uint8Array;
let gz: Buffer;
let dir: string;

beforeAll(() => {
  const voxels = randomFillSync(new Uint8Array(VOXEL_BYTES));
  raw = single1({ dim: DIM }, voxels);
  gz = gzipSync(raw, { level: 1 });
  dir = tempDir('inflate-from-disk');
});

function write(name: string, bytes: Uint8Array): string {
  const path = join(dir, name);
  writeFileSync(path, bytes);
  return path;
}

/** The message of the error `run` fails with (it must fail with a typed error). */
async function message(run: () => Promise<unknown>): Promise<string> {
  const e = await run().then(() => undefined, (x: unknown) => x);
  if (!isFalciformError(e)) throw new Error(`expected a typed error, got ${String(e)}`);
  return e.message;
}

describe('a large .nii.gz inflated as it is read from disk', () => {
  it('is larger than one read piece and loads the very voxels written', async () => {
    expect(gz.length).toBeGreaterThan(32 * MiB);
    const { volume } = await loadVolume(write('scan.nii.gz', gz));
    expect(volume.dims).toEqual([256, 256, 320]);
    const bytes = new Uint8Array(volume.data.buffer, volume.data.byteOffset, volume.data.byteLength);
    expect(Buffer.compare(bytes, raw.subarray(352))).toBe(0);
  });

  it('holds no more than the voxels and a few read pieces while inflating, not the whole compressed file', async () => {
    const path = write('scan-memory.nii.gz', gz);
    // Resident memory, as the analyze benchmark measures it (zlib may reserve untouched buffers).
    const before = process.memoryUsage().rss;
    let peak = before;
    // Inflating runs on the thread pool, so the main thread is free to sample.
    const sampler = setInterval(() => { peak = Math.max(peak, process.memoryUsage().rss); }, 1);
    const { volume } = await loadVolume(path);
    clearInterval(sampler);
    peak = Math.max(peak, process.memoryUsage().rss);
    expect(volume.data.byteLength).toBe(VOXEL_BYTES);
    // Two 4 MiB pieces and slack; the whole 40 MiB file beside the voxels would pass this by far.
    expect(peak - before).toBeLessThan(VOXEL_BYTES + 24 * MiB);
  });

  it('cut short inside the voxels: the same error as the same bytes inflated from memory', async () => {
    const cut = gz.subarray(0, 12 * MiB);
    const fromDisk = await message(() => loadVolume(write('cut.nii.gz', cut)));
    const fromMemory = await message(() => readNifti(cut, 'cut.nii.gz', { inflate: nodeInflate }));
    expect(fromDisk).toBe(join(dir, fromMemory));
    expect(fromDisk).toMatch(/cut\.nii\.gz: gzip data is corrupt or truncated \(unexpected end of file\)$/);
  });

  it('damaged past the first read piece: the same error as from memory', async () => {
    const bad = Buffer.from(gz);
    bad.fill(0xff, 10 * MiB, 10 * MiB + 4096);
    const fromDisk = await message(() => loadVolume(write('bad.nii.gz', bad)));
    const fromMemory = await message(() => readNifti(bad, 'bad.nii.gz', { inflate: nodeInflate }));
    expect(fromDisk).toBe(join(dir, fromMemory));
    expect(fromDisk).toMatch(/bad\.nii\.gz: gzip data is corrupt or truncated \(.+\)$/);
  });

  it('with a gzip bomb behind its first volume: stops at the first volume', async () => {
    // 64 more members of 16 MiB of zeros each (RFC 1952 allows members one after another).
    const zeros = gzipSync(Buffer.alloc(16 * MiB));
    const bomb = Buffer.concat([gz, ...Array.from({ length: 64 }, () => zeros)]);
    const before = process.memoryUsage().arrayBuffers;
    const { volume } = await loadVolume(write('bomb.nii.gz', bomb));
    expect(volume.data.byteLength).toBe(VOXEL_BYTES);
    expect(volume.data.buffer.byteLength).toBe(VOXEL_BYTES + 352);
    expect(process.memoryUsage().arrayBuffers - before).toBeLessThan(VOXEL_BYTES + 64 * MiB);
  });
});
