// The command line's inflater stops at its cap: a small .nii.gz whose gzip stream goes on for a
// gigabyte (a gzip bomb) costs the first volume its header declares and nothing more. The bomb is
// 64 gzip members of 16 MiB of zeros (RFC 1952 allows members one after another; gzip -dc reads them
// all), about 1 MB on disk.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { loadVolume, nodeInflate } from '../../src/cli/node-io.js';
import { int16Bytes, single1, tempDir } from './nifti-fixtures.js';

const MiB = 1024 ** 2;
const values24 = Array.from({ length: 24 }, (_, n) => n * 10 - 50);

function bomb(): Buffer {
  const zeros = gzipSync(Buffer.alloc(16 * MiB));
  return Buffer.concat([gzipSync(single1({}, int16Bytes(values24))), ...Array.from({ length: 64 }, () => zeros)]);
}

describe('the inflate cap and a gzip bomb', () => {
  it('loads the 4×3×2 volume from a file that inflates to 1 GiB, holding no more than its cap', async () => {
    const gz = bomb();
    expect(gz.length).toBeLessThan(2 * MiB);
    const path = join(tempDir('inflate-cap'), 'scan.nii.gz');
    writeFileSync(path, gz);
    const before = process.memoryUsage().arrayBuffers;
    const { volume } = await loadVolume(path);
    expect(Array.from(volume.data)).toEqual(values24);
    // The voxels' buffer is the first volume's bytes, not the stream's gigabyte.
    expect(volume.data.buffer.byteLength).toBeLessThanOrEqual(352 + 48);
    expect(process.memoryUsage().arrayBuffers - before).toBeLessThan(64 * MiB);
  });

  it('asked for 100 MiB of the bomb, gives exactly that many bytes in one buffer of that size', async () => {
    const out = await nodeInflate(bomb(), 100 * MiB);
    expect(out.length).toBe(100 * MiB);
    expect(out.buffer.byteLength).toBe(100 * MiB);
    expect(out[0]).toBe(0x5c); // sizeof_hdr 348, little-endian (nifti1.h)
    expect(out[100 * MiB - 1]).toBe(0);
  });

  it('a stream shorter than the cap gives what is there', async () => {
    const plain = single1({}, int16Bytes(values24));
    const out = await nodeInflate(gzipSync(plain), 10 * MiB);
    expect(Array.from(out)).toEqual(Array.from(plain));
  });
});
