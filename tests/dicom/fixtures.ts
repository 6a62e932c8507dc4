import { spawnSync } from 'node:child_process';
import { existsSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { expect } from 'vitest';
import type { Volume } from '../../src/volume/volume.js';
import { transformPoint } from '../../src/geometry/mat4.js';

export const root = fileURLToPath(new URL('../../', import.meta.url));

/** pydicom's shipped test files (Debian's python3-pydicom). */
export const PYDICOM_DATA = spawnSync('/usr/bin/python3', ['-c', 'import pydicom.data,os;print(os.path.dirname(pydicom.data.__file__))'], { encoding: 'utf8' }).stdout.trim() + '/test_files';

export interface SeriesFixture {
  folder: string;
  original: string;
  seriesUid: string;
  affine: number[][];
  dims: [number, number, number];
}

/** A pydicom-written series (tests/reference/dicom_series.py) in `dir`. */
export function writeSeries(dir: string, kase: string, syntax = 'explicit'): SeriesFixture {
  const r = spawnSync('/usr/bin/python3', [join(root, 'tests/reference/dicom_series.py'), dir, kase, syntax], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`dicom_series.py failed: ${r.stderr}`);
  return JSON.parse(r.stdout) as SeriesFixture;
}

export function falciform(...args: string[]) {
  const r = spawnSync('node', [join(root, 'bin/falciform.js'), ...args], { encoding: 'utf8' });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** Builds build/ when the DICOM command line is missing or older than its sources. */
export function ensureBuilt(): void {
  const built = join(root, 'build/src/cli/commands/convert.js');
  const sources = ['src/dicom/read.ts', 'src/dicom/series.ts', 'src/dicom/parse.ts', 'src/cli/commands/convert.ts', 'src/cli/commands/inspect-dicom.ts'];
  const newest = Math.max(...sources.map((s) => statSync(join(root, s)).mtimeMs));
  if (!existsSync(built) || statSync(built).mtimeMs < newest) spawnSync('npx', ['tsc', '-p', 'tsconfig.node.json'], { cwd: root, encoding: 'utf8' });
  expect(existsSync(built)).toBe(true);
}

/**
 * Compares two volumes through world coordinates: every voxel centre of `a` must land on a voxel centre
 * of `b` (within `tolMm` of it) and carry the same physical value. Returns how many voxels matched.
 */
export function expectSameInWorld(a: Volume, b: Volume, tolMm = 1e-3): number {
  const [nx, ny, nz] = a.dims;
  const [bx, by, bz] = b.dims;
  let matched = 0;
  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      for (let i = 0; i < nx; i++) {
        const w = transformPoint(a.affine, [i, j, k]);
        const q = transformPoint(b.inverse, w);
        const r = q.map(Math.round);
        const back = transformPoint(b.affine, [r[0], r[1], r[2]]);
        const off = Math.hypot(back[0] - w[0], back[1] - w[1], back[2] - w[2]);
        if (off > tolMm || r[0] < 0 || r[1] < 0 || r[2] < 0 || r[0] >= bx || r[1] >= by || r[2] >= bz) {
          throw new Error(`voxel (${i}, ${j}, ${k}) at world (${w.map((x) => x.toFixed(3)).join(', ')}) is ${off.toFixed(4)} mm from the other grid's voxel (${r.join(', ')})`);
        }
        const va = a.data[i + nx * (j + ny * k)] * a.slope + a.inter;
        const vb = b.data[r[0] + bx * (r[1] + by * r[2])] * b.slope + b.inter;
        if (Math.abs(va - vb) > 1e-6) throw new Error(`voxel (${i}, ${j}, ${k}): ${va} here, ${vb} in the other volume at (${r.join(', ')})`);
        matched++;
      }
    }
  }
  return matched;
}
