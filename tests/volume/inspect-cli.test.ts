// `falciform inspect` as a user runs it: node bin/falciform.js on the build from tsconfig.node.json.
// Expected values: nibabel 5.x on nibabel's own test image, run live (tests/reference/nifti_facts.py);
// exit codes and output shape: the project's contracts (docs/contracts.md).
import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { NIBABEL_DATA, python, tempDir, type NibabelFacts } from './nifti-fixtures.js';

const root = fileURLToPath(new URL('../../', import.meta.url));
const built = join(root, 'build/src/cli/commands/inspect.js');

function newestSource(): number {
  let newest = 0;
  for (const dir of ['src/volume', 'src/cli', 'src/cli/commands', 'src/geometry']) {
    for (const f of readdirSync(join(root, dir))) if (f.endsWith('.ts')) newest = Math.max(newest, statSync(join(root, dir, f)).mtimeMs);
  }
  return newest;
}

function falciform(...args: string[]) {
  const r = spawnSync('node', [join(root, 'bin/falciform.js'), ...args], { encoding: 'utf8' });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

beforeAll(() => {
  // npm test builds first; when this file runs alone, build when the output is missing or stale.
  if (!existsSync(built) || statSync(built).mtimeMs < newestSource()) {
    spawnSync('npx', ['tsc', '-p', 'tsconfig.node.json'], { cwd: root, encoding: 'utf8' });
  }
  expect(existsSync(built)).toBe(true);
}, 240_000);

describe('falciform inspect', () => {
  it('--json prints the contract fields, equal to nibabel for anatomical.nii', () => {
    const file = join(NIBABEL_DATA, 'anatomical.nii');
    const [ref] = python<NibabelFacts[]>('nifti_facts.py', [file]);
    const r = falciform('inspect', file, '--json');
    expect(r.code).toBe(0);
    expect(r.stderr).toBe('');
    const out = JSON.parse(r.stdout);
    expect(Object.keys(out).slice(0, 9)).toEqual(['file', 'format', 'dims', 'spacingMm', 'datatype', 'affine', 'affineSource', 'min', 'max']);
    expect(out.file).toBe(file);
    expect(out.format).toBe('NIfTI-1');
    expect(out.dims).toEqual(ref.dims);
    expect(out.datatype).toBe(ref.dtype);
    expect(out.affineSource).toBe('sform');
    expect(out.affine).toHaveLength(4);
    out.affine.flat().forEach((x: number, n: number) => expect(Math.abs(x - ref.bestAffine.flat()[n])).toBeLessThan(1e-4));
    expect(out.spacingMm).toEqual([2, 2, 2]);
    expect(out.min).toBe(ref.values!.min);
    expect(out.max).toBe(ref.values!.max);
  });

  it('a 4-D file lists all dims; min and max come after scaling', () => {
    const file = join(NIBABEL_DATA, 'functional.nii');
    const [ref] = python<NibabelFacts[]>('nifti_facts.py', [file]);
    const out = JSON.parse(falciform('inspect', file, '--json').stdout);
    expect(out.dims).toEqual([17, 21, 3, 20]);
    expect(ref.slopeInter[0]).not.toBe(1);
    // Seven significant digits are printed.
    expect(out.min).toBeCloseTo(ref.values!.min, 3);
    expect(out.max).toBeCloseTo(ref.values!.max, 2);
  });

  it('without --json prints a short summary', () => {
    const r = falciform('inspect', join(NIBABEL_DATA, 'example4d.nii.gz'));
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/NIfTI-1, 128 × 96 × 24 × 2 voxels, int16 little-endian/);
    expect(r.stdout).toMatch(/from the sform/);
    expect(r.stdout).toMatch(/values 0 to 1162 \(first volume\)/);
  });

  it('bad input exits 3 with one stderr line naming the file', () => {
    const dir = tempDir('cli');
    const text = join(dir, 'notes.nii.gz');
    writeFileSync(text, 'not an image\n');
    const cases: [string, RegExp][] = [
      [text, /is a text file, not a NIfTI image/],
      [join(dir, 'missing.nii'), /cannot be read: no such file/],
      [join(NIBABEL_DATA, 'analyze.hdr'), /Analyze 7\.5 header/],
    ];
    for (const [file, problem] of cases) {
      const r = falciform('inspect', file, '--json');
      expect(r.code).toBe(3);
      expect(r.stdout).toBe('');
      const lines = r.stderr.split('\n').filter((l) => l !== '');
      expect(lines).toHaveLength(1);
      expect(lines[0].startsWith(`falciform inspect: ${file}: `)).toBe(true);
      expect(lines[0]).toMatch(problem);
    }
  });

  it('a usage mistake exits 2', () => {
    expect(falciform('inspect').code).toBe(2);
    expect(falciform('inspect', 'a.nii', '--bogus').code).toBe(2);
  });
});
