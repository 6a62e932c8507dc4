// A whole-body CT of 1024 × 1024 × 800 int16 voxels needs 1,600 MiB. Falciform either loads such a
// volume within its memory budget or refuses it with a typed error naming the file and the budget;
// it never crashes on it. Headers are hand-built from nifti1.h's layout; the bodies here are short or
// sparse, so no test allocates the 1.6 GB the header claims.
import { spawnSync } from 'node:child_process';
import { closeSync, existsSync, ftruncateSync, openSync, readdirSync, rmSync, statSync, writeFileSync, writeSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { gzipSync } from 'node:zlib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadVolume, nodeInflate } from '../../src/cli/node-io.js';
import { isFalciformError, type FalciformError } from '../../src/errors.js';
import { DEFAULT_MAX_BYTES, readNifti, type Inflate } from '../../src/volume/nifti-read.js';
import { webInflate } from '../../src/volume/web-gzip.js';
import { header1, tempDir } from './nifti-fixtures.js';

const MiB = 1024 ** 2;
const FILE = 'visit3/wholebody.nii';
/** 1024 × 1024 × 800 × 2 bytes. */
const VOLUME_BYTES = 1024 * 1024 * 800 * 2;
const BIG_HEADER = { dim: [3, 1024, 1024, 800, 1, 1, 1, 1], datatype: 4, pixdim: [1, 0.7, 0.7, 1.25, 1, 1, 1, 1] };

/** Header, the 4-byte extension flag, then `bodyBytes` of voxel data (far short of the 1.6 GB). */
function bigNifti(bodyBytes: number): Uint8Array {
  const out = new Uint8Array(352 + bodyBytes);
  out.set(header1(BIG_HEADER));
  return out;
}

async function refusal(run: () => Promise<unknown>): Promise<FalciformError> {
  try {
    await run();
  } catch (e) {
    if (!isFalciformError(e)) throw new Error(`untyped error: ${String(e)}`, { cause: e });
    return e;
  }
  throw new Error('no error');
}

/** Memory outside the JS heap (typed arrays) gained while `run` ran. */
async function externalGrowth(run: () => Promise<unknown>): Promise<number> {
  const before = process.memoryUsage().arrayBuffers;
  await run().catch(() => undefined);
  return process.memoryUsage().arrayBuffers - before;
}

describe('a 1024 × 1024 × 800 int16 volume and the memory budget', () => {
  it('is refused as too large, naming the file, the grid and the budget, when the budget is smaller', async () => {
    const e = await refusal(() => readNifti(bigNifti(1024), FILE, { inflate: nodeInflate, maxBytes: 1024 * MiB }));
    expect(e.kind).toBe('too-large');
    expect(e.message).toBe('visit3/wholebody.nii: the volume (1024 × 1024 × 800 int16) needs 1,600 MB, over the memory budget of 1,024 MB');
  });

  it('the budget is settable: one byte short refuses it, exactly enough lets it through to the data', async () => {
    const short = await refusal(() => readNifti(bigNifti(1024), FILE, { inflate: nodeInflate, maxBytes: VOLUME_BYTES - 1 }));
    expect(short.kind).toBe('too-large');
    const enough = await refusal(() => readNifti(bigNifti(1024), FILE, { inflate: nodeInflate, maxBytes: VOLUME_BYTES }));
    expect(enough.kind).toBe('bad-file');
    // The default budget (2 GiB) holds it: such a CT is loaded when its data is all there.
    expect(DEFAULT_MAX_BYTES).toBeGreaterThanOrEqual(VOLUME_BYTES);
  });

  it('within the budget but with the data cut short, the error is the truncation, not an allocation crash', async () => {
    const e = await refusal(() => readNifti(bigNifti(MiB), FILE, { inflate: nodeInflate }));
    expect(e.kind).toBe('bad-file');
    expect(e.message).toBe(`visit3/wholebody.nii: image data is truncated: ${MiB} of ${VOLUME_BYTES} bytes of the first volume are present`);
    // Nothing near the claimed size was allocated on the way.
    expect(await externalGrowth(() => readNifti(bigNifti(MiB), FILE, { inflate: nodeInflate }))).toBeLessThan(16 * MiB);
  });

  it('gzipped, the inflater is asked for no more than the compressed bytes can hold', async () => {
    const gz = gzipSync(bigNifti(MiB));
    for (const inner of [nodeInflate, webInflate]) {
      const asked: number[] = [];
      const inflate: Inflate = (bytes, max) => {
        asked.push(max);
        return inner(bytes, max);
      };
      const e = await refusal(() => readNifti(gz, FILE, { inflate }));
      expect(e.message).toMatch(/^visit3\/wholebody\.nii: image data is truncated: 1048576 of 1677721600 bytes/);
      expect(Math.max(...asked)).toBeLessThanOrEqual(gz.length * 1032 + 1024);
      expect(Math.max(...asked)).toBeLessThan(VOLUME_BYTES / 100);
      expect(await externalGrowth(() => readNifti(gzipSync(bigNifti(MiB)), FILE, { inflate: inner }))).toBeLessThan(64 * MiB);
    }
    // Refused by the budget before any voxel is inflated.
    const asked: number[] = [];
    const spy: Inflate = (bytes, max) => {
      asked.push(max);
      return nodeInflate(bytes, max);
    };
    expect((await refusal(() => readNifti(gz, FILE, { inflate: spy, maxBytes: 512 * MiB }))).kind).toBe('too-large');
    expect(asked).toEqual([540]);
  });

  it('a full-size sparse file on disk is refused by the budget after reading only its header', async () => {
    const dir = tempDir('size-limits');
    const path = join(dir, 'wholebody.nii');
    const fd = openSync(path, 'w');
    writeSync(fd, header1(BIG_HEADER));
    // Sparse: the file reports its full size but occupies almost no disk.
    ftruncateSync(fd, 352 + VOLUME_BYTES);
    closeSync(fd);
    expect(statSync(path).size).toBe(352 + VOLUME_BYTES);
    const e = await refusal(() => loadVolume(path, { maxBytes: 256 * MiB }));
    expect(e.kind).toBe('too-large');
    expect(e.message).toBe(`${path}: the volume (1024 × 1024 × 800 int16) needs 1,600 MB, over the memory budget of 256 MB`);
    expect(await externalGrowth(() => loadVolume(path, { maxBytes: 256 * MiB }))).toBeLessThan(16 * MiB);
    rmSync(dir, { recursive: true, force: true });
  });
});

describe('falciform inspect and the budget', () => {
  const root = fileURLToPath(new URL('../../', import.meta.url));
  const built = join(root, 'build/src/cli/commands/inspect.js');
  let dir: string;
  let shortFile: string;
  let sparseFile: string;

  const falciform = (...args: string[]) => {
    const r = spawnSync(process.execPath, [join(root, 'bin/falciform.js'), ...args], { encoding: 'utf8' });
    return { code: r.status, stdout: r.stdout, stderr: r.stderr };
  };

  beforeAll(() => {
    // npm test builds first; when this file runs alone, build when the output is missing or stale.
    const newest = ['src/volume', 'src/cli', 'src/cli/commands']
      .flatMap((d) => readdirSync(join(root, d)).filter((f) => f.endsWith('.ts')).map((f) => statSync(join(root, d, f)).mtimeMs))
      .reduce((a, b) => Math.max(a, b), 0);
    if (!existsSync(built) || statSync(built).mtimeMs < newest) {
      spawnSync('npx', ['tsc', '-p', 'tsconfig.node.json'], { cwd: root, encoding: 'utf8' });
    }
    expect(existsSync(built)).toBe(true);
    dir = tempDir('inspect-budget');
    shortFile = join(dir, 'short.nii');
    writeFileSync(shortFile, bigNifti(MiB));
    sparseFile = join(dir, 'sparse.nii');
    const fd = openSync(sparseFile, 'w');
    writeSync(fd, header1(BIG_HEADER));
    ftruncateSync(fd, 352 + VOLUME_BYTES);
    closeSync(fd);
  }, 240_000);

  afterAll(() => {
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('a cut-short file within the default budget: exit 3 and one line naming the file and the truncation', () => {
    const r = falciform('inspect', shortFile, '--json');
    expect(r.code).toBe(3);
    expect(r.stdout).toBe('');
    expect(r.stderr).toBe(`falciform inspect: ${shortFile}: image data is truncated: ${MiB} of ${VOLUME_BYTES} bytes of the first volume are present\n`);
  });

  it('--max-voxel-mib sets the budget; a refusal names it and says how to raise it', () => {
    for (const file of [shortFile, sparseFile]) {
      const r = falciform('inspect', file, '--max-voxel-mib', '1024');
      expect(r.code).toBe(3);
      expect(r.stdout).toBe('');
      expect(r.stderr).toBe(
        `falciform inspect: ${file}: the volume (1024 × 1024 × 800 int16) needs 1,600 MB, over the memory budget of 1,024 MB; raise it with --max-voxel-mib N\n`,
      );
    }
    // Raised past the volume's size, the same file gets as far as its data.
    expect(falciform('inspect', shortFile, '--max-voxel-mib', '1600').stderr).toMatch(/image data is truncated/);
  });

  it('a budget that is not a positive number is a usage error', () => {
    for (const value of ['0', '-5', 'lots']) {
      const r = falciform('inspect', shortFile, '--max-voxel-mib', value);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(/--max-voxel-mib must be a (non-negative|positive) number/);
    }
  });
});
