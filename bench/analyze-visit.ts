// Benchmark: `falciform analyze` on one noisy CT-like 512×512×300 visit (bench/ct-visit.ts: int16 scan,
// uint8 segment map, lesion mask with six lesions) beside `gzip -dc` of its three inputs and beside the same computation written with nibabel and scipy
// (bench/analyze_reference.py), on the same .nii.gz files in the same run. Both run as their own
// process under /usr/bin/time, loading included. Prints figures and the agreement of the results;
// it asserts nothing.
// Run: npx tsc -p tsconfig.node.json && node build/bench/analyze-visit.js [--rounds N] [--keep] [--inputs DIR]
// (--inputs: reuse the visit a --keep run left in DIR)
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { coreLine, CT_VISIT, writeCtVisit } from './ct-visit.js';

const MARGIN_MM = 10;

interface Timed { wallS: number; peakMb: number; stdout: string }

/** Runs a command under /usr/bin/time: wall seconds and peak resident memory of that process. */
function timed(cmd: string, args: string[]): Timed {
  const r = spawnSync('/usr/bin/time', ['-f', 'BENCH %e %M', cmd, ...args], { encoding: 'utf8', maxBuffer: 1 << 26 });
  const line = r.stderr.trim().split('\n').reverse().find((l) => l.startsWith('BENCH '));
  if (r.status !== 0 || !line) throw new Error(`${cmd} ${args.join(' ')} failed:\n${r.stderr}`);
  const [, wall, kb] = line.split(' ');
  return { wallS: Number(wall), peakMb: (Number(kb) * 1024) / 1e6, stdout: r.stdout };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

interface OutLesion {
  centroidMm: number[]; segment: string | null; volumeMl: number | null; longestAxialMm: number; shortAxisMm: number;
  max3dMm: number | null; marginMm: number | null; meanValue: number | null;
}

/** Largest disagreement per measure between our lesions and the reference's, matched by centroid. */
function agreement(ours: OutLesion[], ref: OutLesion[]): string {
  if (ours.length !== ref.length) return `lesion counts differ: ours ${ours.length}, reference ${ref.length}`;
  const worst: Record<string, number> = { centroidMm: 0, volumeMl: 0, longestAxialMm: 0, shortAxisMm: 0, max3dMm: 0, marginMm: 0, meanValue: 0 };
  let segments = 0;
  for (const o of ours) {
    const r = ref.reduce((best, x) =>
      Math.hypot(...x.centroidMm.map((c, d) => c - o.centroidMm[d])) < Math.hypot(...best.centroidMm.map((c, d) => c - o.centroidMm[d])) ? x : best);
    worst.centroidMm = Math.max(worst.centroidMm, Math.hypot(...r.centroidMm.map((c, d) => c - o.centroidMm[d])));
    for (const key of ['volumeMl', 'longestAxialMm', 'shortAxisMm', 'max3dMm', 'marginMm', 'meanValue'] as const) {
      const a = o[key], b = r[key];
      worst[key] = Math.max(worst[key], a === null || b === null ? (a === b ? 0 : Infinity) : Math.abs(a - b));
    }
    if (o.segment === r.segment) segments++;
  }
  return `${ours.length} lesions, segments agree ${segments}/${ours.length}; largest differences (ours printed to 0.01 mm, 0.001 mL): ` +
    Object.entries(worst).map(([k, x]) => `${k} ${x.toPrecision(2)}`).join(', ');
}

const argv = process.argv.slice(2);
const rounds = Number(argv[argv.indexOf('--rounds') + 1]) || 3;
const given = argv.includes('--inputs') ? argv[argv.indexOf('--inputs') + 1] : undefined;
const dir = given ?? mkdtempSync(join(tmpdir(), 'falciform-bench-analyze-'));
const [NX, NY, NZ] = CT_VISIT.dims;
try {
  const t0 = performance.now();
  const files = ['scan', 'segments', 'lesions'].map((f) => join(dir, `${f}.nii.gz`));
  if (!given || !files.every((f) => existsSync(f))) await writeCtVisit(dir, CT_VISIT);
  const inputsMb = (NX * NY * NZ * (2 + 1 + 1)) / 1e6;
  const gzMb = files.reduce((s, f) => s + statSync(f).size, 0) / 1e6;
  console.log(`${CT_VISIT.dims.join('×')} CT-like visit ready in ${((performance.now() - t0) / 1000).toFixed(1)} s: ` +
    files.map((f) => `${f.split('/').pop()} ${(statSync(f).size / 1e6).toFixed(1)} MB`).join(', ') +
    `; decompressed inputs ${inputsMb.toFixed(1)} MB; gzip ratio scan ${((NX * NY * NZ * 2 + 352) / statSync(files[0]).size).toFixed(2)}:1, ` +
    `all three ${(inputsMb / gzMb).toFixed(2)}:1`);
  const oursArgs = ['bin/falciform.js', 'analyze', '--scan', files[0], '--segments', files[1], '--lesions', files[2], '--margin-mm', String(MARGIN_MM), '--json'];
  const refArgs = ['bench/analyze_reference.py', '--scan', files[0], '--segments', files[1], '--lesions', files[2], '--margin-mm', String(MARGIN_MM)];
  const ours: Timed[] = [], ref: Timed[] = [], gz: Timed[] = [];
  for (let r = 0; r < rounds; r++) {
    gz.push(timed('sh', ['-c', 'gzip -dc "$@" > /dev/null', 'sh', ...files]));
    ours.push(timed(process.execPath, oursArgs));
    ref.push(timed('/usr/bin/python3', refArgs));
  }
  const ow = median(ours.map((t) => t.wallS)), rw = median(ref.map((t) => t.wallS)), gw = median(gz.map((t) => t.wallS));
  const om = Math.max(...ours.map((t) => t.peakMb)), rm = Math.max(...ref.map((t) => t.peakMb));
  const show = (label: string, runs: Timed[], wall: number, peak?: number) =>
    console.log(`${label.padEnd(30)} wall median ${wall.toFixed(2)} s (runs ${runs.map((t) => t.wallS.toFixed(2)).join(', ')})` +
      (peak === undefined ? '' : `, peak RSS ${peak.toFixed(0)} MB`));
  console.log(`${await coreLine()}; ${rounds} rounds each, alternating; wall and peak RSS from /usr/bin/time`);
  show('gzip -dc of the three inputs', gz, gw);
  show('falciform analyze (node)', ours, ow, om);
  show('reference (nibabel + scipy)', ref, rw, rm);
  console.log(`wall ratio ours / gzip -dc = ${(ow / gw).toFixed(2)} (aim ≤ 1.5)`);
  console.log(`wall ratio ours / reference = ${(ow / rw).toFixed(2)} (aim ≤ 0.35)`);
  console.log(`peak memory ours / decompressed inputs = ${(om / inputsMb).toFixed(2)} (aim ≤ 1.5); reference: ${(rm / inputsMb).toFixed(2)}`);
  const o = JSON.parse(ours[0].stdout) as { lesions: OutLesion[] };
  const x = JSON.parse(ref[0].stdout) as { lesions: OutLesion[] };
  console.log(`agreement: ${agreement(o.lesions, x.lesions)}`);
  if (argv.includes('--keep')) console.log(`inputs kept in ${dir}`);
} finally {
  if (!argv.includes('--keep') && !given) rmSync(dir, { recursive: true, force: true });
}
