// Benchmark: `falciform liver` on a 512×512×300 CT-like noisy phantom (bench/abdomen-phantom.ts,
// invented values, Gaussian noise 15 HU) beside the same steps written with nibabel + scipy
// (bench/grow_liver_reference.py), on the same .nii.gz in the same run. Both run as their own process
// under /usr/bin/time, loading and writing included. Prints seconds, peak memory, the Dice of each
// mask against the phantom's liver and against each other; asserts nothing.
// Run: npx tsc -p tsconfig.node.json && node build/bench/grow-liver.js [--rounds N]
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { loadVolume, saveVolume } from '../src/cli/node-io.js';
import { makeVolume } from '../src/volume/volume.js';
import { makePhantom } from './abdomen-phantom.js';

interface Timed { wallS: number; peakMb: number; stdout: string }

function timed(cmd: string, args: string[]): Timed {
  const r = spawnSync('/usr/bin/time', ['-f', 'BENCH %e %M', cmd, ...args], { encoding: 'utf8', maxBuffer: 1 << 26 });
  const line = r.stderr.trim().split('\n').reverse().find((l) => l.startsWith('BENCH '));
  if (r.status !== 0 || !line) throw new Error(`${cmd} ${args.join(' ')} failed:\n${r.stderr}`);
  const [, wall, kb] = line.split(' ');
  return { wallS: Number(wall), peakMb: (Number(kb) * 1024) / 1e6, stdout: r.stdout };
}

function dice(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let both = 0, x = 0, y = 0;
  for (let n = 0; n < a.length; n++) {
    if (a[n]) x++;
    if (b[n]) y++;
    if (a[n] && b[n]) both++;
  }
  return (2 * both) / (x + y);
}

const argv = process.argv.slice(2);
const rounds = Number(argv[argv.indexOf('--rounds') + 1]) || 2;
const dir = mkdtempSync(join(tmpdir(), 'falciform-bench-liver-'));
try {
  const t0 = performance.now();
  const p = makePhantom([512, 512, 300], [0.7, 0.7, 0.8]);
  const scanFile = join(dir, 'scan.nii.gz');
  await saveVolume(scanFile, makeVolume(p.dims, p.scan, p.affine, 'int16'), 'int16');
  const rawMb = (p.scan.length * 2) / 1e6;
  console.log(`generated 512×512×300 phantom in ${((performance.now() - t0) / 1000).toFixed(1)} s: scan.nii.gz ${(statSync(scanFile).size / 1e6).toFixed(1)} MB ` +
    `(${rawMb.toFixed(0)} MB raw, ${(rawMb / (statSync(scanFile).size / 1e6)).toFixed(1)}:1)`);
  const seed = p.liverSeedMm.join(',');
  const ours: Timed[] = [], ref: Timed[] = [];
  for (let r = 0; r < rounds; r++) {
    ours.push(timed(process.execPath, ['bin/falciform.js', 'liver', '--scan', scanFile, '--seed', seed, '--out', join(dir, 'ours.nii.gz'), '--json']));
    ref.push(timed('/usr/bin/python3', ['bench/grow_liver_reference.py', '--scan', scanFile, '--seed', seed, '--out', join(dir, 'ref.nii.gz')]));
  }
  const med = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
  const show = (label: string, runs: Timed[]) =>
    console.log(`${label.padEnd(28)} wall median ${med(runs.map((t) => t.wallS)).toFixed(2)} s (runs ${runs.map((t) => t.wallS.toFixed(2)).join(', ')}), ` +
      `peak RSS ${Math.max(...runs.map((t) => t.peakMb)).toFixed(0)} MB`);
  console.log(`node ${process.version}; ${rounds} rounds each, alternating; wall and peak RSS from /usr/bin/time; load average ${(await import('node:os')).loadavg()[0].toFixed(1)}`);
  show('falciform liver (node)', ours);
  show('reference (nibabel + scipy)', ref);
  console.log(`wall ratio ours / reference = ${(med(ours.map((t) => t.wallS)) / med(ref.map((t) => t.wallS))).toFixed(2)}`);
  const o = (await loadVolume(join(dir, 'ours.nii.gz'))).volume.data;
  const x = (await loadVolume(join(dir, 'ref.nii.gz'))).volume.data;
  console.log(`Dice against the phantom liver: ours ${dice(o, p.liver).toFixed(4)}, reference ${dice(x, p.liver).toFixed(4)}; ours against reference ${dice(o, x).toFixed(4)}`);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
