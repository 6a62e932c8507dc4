// Benchmark: loading a noisy CT-like 512×512×300 int16 .nii.gz (a typical abdominal CT, 150 MB of voxels) against
// `gzip -dc FILE > /dev/null` on the same file in the same run. Prints figures; it asserts nothing.
// Run: npx tsc -p tsconfig.node.json && node build/bench/nifti-load.js
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { gzipSync } from 'node:zlib';
import { loadVolume, nodeInflate } from '../src/cli/node-io.js';
import { readNifti } from '../src/volume/nifti-read.js';
import { encodeNifti } from '../src/volume/nifti-write.js';
import { webInflate } from '../src/volume/web-gzip.js';
import { makeVolume } from '../src/volume/volume.js';
import { coreLine, CT_VISIT, makeVisitVolumes } from './ct-visit.js';

const ROUNDS = 5;
const dims = CT_VISIT.dims;

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

async function time(label: string, f: () => Promise<unknown> | unknown): Promise<number> {
  const runs: number[] = [];
  for (let r = 0; r < ROUNDS; r++) {
    const t0 = performance.now();
    await f();
    runs.push(performance.now() - t0);
  }
  const m = median(runs);
  console.log(`${label.padEnd(44)} median ${m.toFixed(0).padStart(5)} ms   (runs: ${runs.map((x) => x.toFixed(0)).join(', ')})`);
  return m;
}

const dir = mkdtempSync(join(tmpdir(), 'falciform-bench-'));
const file = join(dir, 'ct.nii.gz');
try {
  const t0 = performance.now();
  const affine = [0.7, 0, 0, -179, 0, 0.7, 0, -179, 0, 0, 1, -150, 0, 0, 0, 1];
  const raw = encodeNifti(makeVolume(dims, makeVisitVolumes(CT_VISIT).scan, affine, 'int16'), 'int16');
  writeFileSync(file, gzipSync(raw, { level: 6 }));
  console.log(`generated ${file} (noisy CT-like scan of bench/ct-visit.ts): ${(statSync(file).size / 1e6).toFixed(1)} MB gzip of ${(raw.length / 1e6).toFixed(1)} MB ` +
    `(${(raw.length / statSync(file).size).toFixed(2)}:1) in ${((performance.now() - t0) / 1000).toFixed(1)} s`);
  console.log(`${await coreLine()}, ${ROUNDS} rounds each, median shown`);

  const gzipMs = await time('gzip -dc FILE > /dev/null', () => {
    const r = spawnSync('sh', ['-c', 'gzip -dc "$1" > /dev/null', 'sh', file]);
    if (r.status !== 0) throw new Error(`gzip -dc failed: ${r.stderr}`);
  });
  const loadMs = await time('loadVolume (read + node:zlib + view)', async () => {
    const { volume } = await loadVolume(file);
    if (volume.data.length !== dims[0] * dims[1] * dims[2]) throw new Error('wrong voxel count');
  });
  const buf = await readFile(file);
  const bytes = new Uint8Array(buf.buffer, buf.byteOffset, buf.byteLength);
  await time('readNifti with webInflate (file in memory)', () => readNifti(bytes, file, { inflate: webInflate }));
  await time('readNifti with nodeInflate (file in memory)', () => readNifti(bytes, file, { inflate: nodeInflate }));
  console.log(`\nratio loadVolume / gzip -dc = ${(loadMs / gzipMs).toFixed(2)} (aim: within 1.5)`);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
