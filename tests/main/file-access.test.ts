import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { MAX_OPEN_BYTES } from '../../main/bridge-api.js';
import { readChosenFiles } from '../../main/file-access.js';

// The desktop bridge's file reading: only regular files, sized by the opened file itself.
const dir = mkdtempSync(join(tmpdir(), 'falciform-bridge-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('files chosen through the desktop bridge', () => {
  it('reads regular files and a link by its target', async () => {
    writeFileSync(join(dir, 'a.json'), '{"a":1}');
    symlinkSync(join(dir, 'a.json'), join(dir, 'link.json'));
    const got = await readChosenFiles([join(dir, 'a.json'), join(dir, 'link.json')], false, 100);
    expect(got.map((f) => [f.relativePath, Buffer.from(f.bytes).toString()])).toEqual([['a.json', '{"a":1}'], ['link.json', '{"a":1}']]);
  });

  it('counts a link\'s target size, not the link\'s, against the cap', async () => {
    writeFileSync(join(dir, 'big.bin'), new Uint8Array(5000));
    symlinkSync(join(dir, 'big.bin'), join(dir, 'small-link'));
    await expect(readChosenFiles([join(dir, 'small-link')], false, 1000)).rejects.toThrow(/exceed/);
  });

  it('refuses a device and a FIFO at once instead of reading for ever', async () => {
    const fifo = join(dir, 'pipe');
    execFileSync('mkfifo', [fifo]);
    const t0 = Date.now();
    await expect(readChosenFiles(['/dev/zero'], false, MAX_OPEN_BYTES)).rejects.toThrow(/not a regular file/);
    await expect(readChosenFiles([fifo], false, MAX_OPEN_BYTES)).rejects.toThrow(/not a regular file/);
    // Generous for a loaded machine; a hang would last for ever.
    expect(Date.now() - t0).toBeLessThan(5000);
  });

  it('keeps the cap under the 2 GiB one file read can return (Node fs.readFile limit, from memory)', () => {
    expect(MAX_OPEN_BYTES).toBeLessThan(2 * 1024 ** 3);
  });
});
