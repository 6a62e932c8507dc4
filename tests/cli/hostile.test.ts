import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { saveVolume } from '../../src/cli/node-io.js';
import { makeVolume } from '../../src/volume/volume.js';

// Hostile inputs to the command line, as a user would give them: each ends in exit 3 and one short
// stderr line naming the file (docs/formats.md: exit codes), never in a hang or a wrong result.

const dir = mkdtempSync(join(tmpdir(), 'falciform-hostile-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function falciform(...args: string[]) {
  return spawnSync(process.execPath, ['bin/falciform.js', ...args], { encoding: 'utf8', timeout: 20_000 });
}

const dims = [16, 16, 8] as const;
const size = dims[0] * dims[1] * dims[2];
const affine = [2, 0, 0, 0, 0, 2, 0, 0, 0, 0, 2, 0, 0, 0, 0, 1];

/** A small scan (CT-like values), a segment map of segments I–VIII in slabs, and lesion masks. */
async function fixtures() {
  const scan = join(dir, 'scan.nii.gz');
  const segments = join(dir, 'segments.nii.gz');
  const dots = join(dir, 'dots.nii.gz');
  const ct = Int16Array.from({ length: size }, (_, n) => (n % 7) * 30 - 100);
  await saveVolume(scan, makeVolume(dims, ct, affine, 'int16'), 'int16');
  const seg = Uint8Array.from({ length: size }, (_, n) => 1 + (n % 16 >> 1));
  await saveVolume(segments, makeVolume(dims, seg, affine, 'uint8'), 'uint8');
  // 12 one-voxel lesions, two voxels apart (six in a row, two rows).
  const mask = new Uint8Array(size);
  for (let t = 0; t < 12; t++) mask[2 * (t % 6) + 16 * 2 * Math.floor(t / 6) + 16 * 16 * 2] = 1;
  await saveVolume(dots, makeVolume(dims, mask, affine, 'uint8'), 'uint8');
  return { scan, segments, dots };
}
const files = fixtures();

function oneLine(r: ReturnType<typeof falciform>) {
  expect(r.status, r.stderr).toBe(3);
  const lines = r.stderr.trim().split('\n');
  expect(lines).toHaveLength(1);
  return lines[0];
}

describe('lesion masks the command line refuses', () => {
  it('refuses a scan given as --lesions as an image, not a label mask', async () => {
    const { scan, segments } = await files;
    const line = oneLine(falciform('analyze', '--scan', scan, '--segments', segments, '--lesions', scan, '--json'));
    expect(line).toContain(scan);
    expect(line).toMatch(/an image, not a label mask/);
  });

  it('refuses a mask above the lesion cap, naming the count; the cap is settable', async () => {
    const { scan, segments, dots } = await files;
    const line = oneLine(falciform('analyze', '--scan', scan, '--segments', segments, '--lesions', dots, '--max-lesions', '10', '--json'));
    expect(line).toMatch(new RegExp(`${dots.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}: holds 12 lesions .*cap of 10`));
    const ok = falciform('analyze', '--scan', scan, '--segments', segments, '--lesions', dots, '--json');
    expect(ok.status, ok.stderr).toBe(0);
    expect(JSON.parse(ok.stdout).lesions).toHaveLength(12);
  });
});

describe('files the command line refuses to read or write', () => {
  it('refuses a device and a FIFO within a second, naming them', () => {
    const fifo = join(dir, 'pipe.nii');
    spawnSync('mkfifo', [fifo]);
    for (const [path, what] of [['/dev/zero', 'a device'], ['/dev/urandom', 'a device'], [fifo, 'a pipe']]) {
      const line = oneLine(falciform('inspect', path, '--json'));
      expect(line).toContain(`${path}: is ${what}, not a regular file`);
    }
    expect(oneLine(falciform('followup', '/dev/zero'))).toContain('/dev/zero: is a device');
  });

  it('refuses an output that is one of the inputs, and one that is not a regular file', async () => {
    const { segments } = await files;
    const landmarks = join(dir, 'landmarks.json');
    const { writeFileSync } = await import('node:fs');
    writeFileSync(landmarks, '{}');
    const same = oneLine(falciform('segments', '--liver', segments, '--landmarks', landmarks, '--out', segments));
    expect(same).toContain(`${segments}: is also an input`);
    expect(oneLine(falciform('segments', '--liver', segments, '--landmarks', landmarks, '--out', '/dev/null'))).toMatch(/^falciform segments: \/dev\/null: cannot be written: it is not a regular file/);
    expect(oneLine(falciform('report', 'demo-data/DEMO-0001/manifest.json', '--out', '/proc/falciform', '--no-pdf'))).toContain('system folder');
  });
});

describe('the import checks on the command line', () => {
  it('refuses a segment map placed 10 m away from its scan, as the app\'s import does', async () => {
    const { scan, dots } = await files;
    const far = join(dir, 'far-segments.nii.gz');
    const seg = Uint8Array.from({ length: size }, (_, n) => 1 + (n % 16 >> 1));
    await saveVolume(far, makeVolume(dims, seg, [2, 0, 0, 10_000, 0, 2, 0, 0, 0, 0, 2, 0, 0, 0, 0, 1], 'uint8'), 'uint8');
    const line = oneLine(falciform('analyze', '--scan', scan, '--segments', far, '--lesions', dots, '--json'));
    expect(line).toContain(`${far}: does not overlap the scan ${scan}`);
  });
});
