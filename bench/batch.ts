// Benchmark: `falciform batch` over 100 small invented patients (demo-data/cohort.ts: three visits
// each on a 58×41×18 grid with CT-like noise), --jobs 1 against --jobs 2, in patients per minute.
// Beside it, the plain peer a research team would otherwise script: GNU xargs -P 2 running
// `falciform followup --json` once per manifest (a fresh process per patient, no cohort tables).
// Run: npx tsc -p tsconfig.node.json && node build/bench/batch.js [COUNT]
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { availableParallelism, loadavg, tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { performance } from 'node:perf_hooks';
import { generateCohort } from '../demo-data/cohort.js';

const count = Number(process.argv[2] ?? 100);
const dir = mkdtempSync(join(tmpdir(), 'falciform-bench-batch-'));
const cohort = join(dir, 'cohort');
const bin = resolve('bin/falciform.js');

try {
  const manifests = await generateCohort(cohort, count);
  // Compression of the scans as a check that the inputs are noisy like CT (about 2:1 or less).
  const scans = manifests.flatMap((m) => readdirSync(join(cohort, m, '..')).filter((d) => d.startsWith('v')).map((v) => join(cohort, m, '..', v, 'scan.nii.gz')));
  const gz = scans.reduce((a, f) => a + statSync(f).size, 0);
  const raw = scans.length * (352 + 58 * 41 * 18 * 2);
  console.log(`${count} invented patients, ${scans.length} scans, gzip ratio ${(raw / gz).toFixed(2)}:1`);

  const timed = (label: string, cmd: string, args: string[]) => {
    const t0 = performance.now();
    const r = spawnSync(cmd, args, { encoding: 'utf8' });
    const s = (performance.now() - t0) / 1000;
    if (r.status !== 0) throw new Error(`${label} failed (${r.status}): ${r.stderr}`);
    console.log(`${label.padEnd(44)} ${s.toFixed(1).padStart(7)} s  ${((count / s) * 60).toFixed(0).padStart(5)} patients/min`);
    return s;
  };
  const one = timed('falciform batch --jobs 1', process.execPath, [bin, 'batch', cohort, '--out', join(dir, 'out-1'), '--jobs', '1']);
  const two = timed('falciform batch --jobs 2', process.execPath, [bin, 'batch', cohort, '--out', join(dir, 'out-2'), '--jobs', '2']);
  timed('falciform batch --jobs 2, rerun (all unchanged)', process.execPath, [bin, 'batch', cohort, '--out', join(dir, 'out-2'), '--jobs', '2']);
  const list = join(dir, 'manifests.txt');
  writeFileSync(list, manifests.map((m) => join(cohort, m)).join('\n'));
  timed('peer: xargs -P 2 falciform followup --json', 'sh', ['-c', `xargs -P 2 -I{} ${process.execPath} ${bin} followup {} --json < ${list} > /dev/null`]);
  console.log(`--jobs 2 against --jobs 1: ${(one / two).toFixed(2)}×; load average during the runs ${loadavg()[0].toFixed(1)} on ${availableParallelism()} cores`);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
