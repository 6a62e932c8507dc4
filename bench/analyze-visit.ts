// Benchmark: `falciform analyze` on one 512×512×300 visit (int16 scan, uint8 segment map, lesion mask
// with six lesions) beside the same computation written with nibabel and scipy
// (bench/analyze_reference.py), on the same .nii.gz files in the same run. Both run as their own
// process under /usr/bin/time, loading included. Prints figures and the agreement of the results;
// it asserts nothing.
// Run: npx tsc -p tsconfig.node.json && node build/bench/analyze-visit.js [--rounds N] [--keep]
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { saveVolume } from '../src/cli/node-io.js';
import { makeVolume } from '../src/volume/volume.js';

const dims = [512, 512, 300] as const;
const [NX, NY, NZ] = dims;
// A usual NIfTI from DICOM: i towards patient left is -x, j towards posterior is -y.
const affine = [-0.7, 0, 0, 179, 0, -0.7, 0, 179, 0, 0, 0.8, -120, 0, 0, 0, 1];
const SPACING = [0.7, 0.7, 0.8];
const MARGIN_MM = 10;

interface Ball { c: [number, number, number]; semiMm: [number, number, number] }

// Six lesions, in voxel coordinates with semi-axes in mm: a large one in VIII, one in VI, one across
// the V/IV border, small ones in III and V, an elongated one in II.
const LESIONS: Ball[] = [
  { c: [230, 230, 215], semiMm: [20, 20, 20] },
  { c: [300, 260, 110], semiMm: [15, 10, 12] },
  { c: [200, 250, 120], semiMm: [8, 8, 8] },
  { c: [120, 240, 100], semiMm: [5, 5, 5] },
  { c: [110, 270, 190], semiMm: [20, 12, 15] },
  { c: [240, 300, 90], semiMm: [3, 3, 3] },
];

/** Liver ellipsoid cut into segments by index-space planes; segment I a ball near the hilum. */
function segmentLabel(i: number, j: number, k: number): number {
  const x = (i - 200) / 150, y = (j - 250) / 105, z = (k - 150) / 110;
  if (x * x + y * y + z * z >= 1) return 0;
  if ((i - 235) ** 2 + (j - 280) ** 2 + ((k - 150) * 0.8 / 0.7) ** 2 < 18 * 18) return 1;
  const upper = k >= 150;
  if (i >= 260) return upper ? 7 : 6;
  if (i >= 200) return upper ? 8 : 5;
  if (i >= 150) return 4;
  return upper ? 2 : 3;
}

function lesionAt(i: number, j: number, k: number): boolean {
  for (const { c, semiMm } of LESIONS) {
    const a = ((i - c[0]) * SPACING[0]) / semiMm[0], b = ((j - c[1]) * SPACING[1]) / semiMm[1], d = ((k - c[2]) * SPACING[2]) / semiMm[2];
    if (a * a + b * b + d * d <= 1) return true;
  }
  return false;
}

function generate(dir: string): Promise<void[]> {
  const n = NX * NY * NZ;
  const scan = new Int16Array(n);
  const seg = new Uint8Array(n);
  const mask = new Uint8Array(n);
  let seed = 7;
  let v = 0;
  for (let k = 0; k < NZ; k++) {
    for (let j = 0; j < NY; j++) {
      for (let i = 0; i < NX; i++, v++) {
        seed = (Math.imul(seed, 1103515245) + 12345) >>> 0;
        const noise = ((seed >>> 16) % 41) - 20;
        const bx = (i - 256) / 240, by = (j - 256) / 170;
        let hu = bx * bx + by * by < 1 ? 40 : -1000;
        const s = segmentLabel(i, j, k);
        seg[v] = s;
        if (s > 0) hu = 60;
        if (s > 0 && lesionAt(i, j, k)) {
          mask[v] = 1;
          hu = 25;
        }
        scan[v] = hu + (hu > -1000 ? noise : noise >> 2);
      }
    }
  }
  return Promise.all([
    saveVolume(join(dir, 'scan.nii.gz'), makeVolume(dims, scan, affine, 'int16'), 'int16'),
    saveVolume(join(dir, 'segments.nii.gz'), makeVolume(dims, seg, affine, 'uint8'), 'uint8'),
    saveVolume(join(dir, 'lesions.nii.gz'), makeVolume(dims, mask, affine, 'uint8'), 'uint8'),
  ]);
}

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
const dir = mkdtempSync(join(tmpdir(), 'falciform-bench-analyze-'));
try {
  const t0 = performance.now();
  await generate(dir);
  const files = ['scan', 'segments', 'lesions'].map((f) => join(dir, `${f}.nii.gz`));
  const inputsMb = (NX * NY * NZ * (2 + 1 + 1)) / 1e6;
  console.log(`generated ${dims.join('×')} visit in ${((performance.now() - t0) / 1000).toFixed(1)} s: ` +
    files.map((f) => `${f.split('/').pop()} ${(statSync(f).size / 1e6).toFixed(1)} MB`).join(', ') +
    `; decompressed inputs ${inputsMb.toFixed(1)} MB`);
  const oursArgs = ['bin/falciform.js', 'analyze', '--scan', files[0], '--segments', files[1], '--lesions', files[2], '--margin-mm', String(MARGIN_MM), '--json'];
  const refArgs = ['bench/analyze_reference.py', '--scan', files[0], '--segments', files[1], '--lesions', files[2], '--margin-mm', String(MARGIN_MM)];
  const ours: Timed[] = [], ref: Timed[] = [];
  for (let r = 0; r < rounds; r++) {
    ours.push(timed(process.execPath, oursArgs));
    ref.push(timed('/usr/bin/python3', refArgs));
  }
  const ow = median(ours.map((t) => t.wallS)), rw = median(ref.map((t) => t.wallS));
  const om = Math.max(...ours.map((t) => t.peakMb)), rm = Math.max(...ref.map((t) => t.peakMb));
  const show = (label: string, runs: Timed[], wall: number, peak: number) =>
    console.log(`${label.padEnd(30)} wall median ${wall.toFixed(2)} s (runs ${runs.map((t) => t.wallS.toFixed(2)).join(', ')}), peak RSS ${peak.toFixed(0)} MB`);
  console.log(`node ${process.version}; ${rounds} rounds each, alternating; wall and peak RSS from /usr/bin/time`);
  show('falciform analyze (node)', ours, ow, om);
  show('reference (nibabel + scipy)', ref, rw, rm);
  console.log(`wall ratio ours / reference = ${(ow / rw).toFixed(2)} (aim ≤ 0.5)`);
  console.log(`peak memory ours / decompressed inputs = ${(om / inputsMb).toFixed(2)} (aim ≤ 1.5); reference: ${(rm / inputsMb).toFixed(2)}`);
  const o = JSON.parse(ours[0].stdout) as { lesions: OutLesion[] };
  const x = JSON.parse(ref[0].stdout) as { lesions: OutLesion[] };
  console.log(`agreement: ${agreement(o.lesions, x.lesions)}`);
  if (argv.includes('--keep')) console.log(`inputs kept in ${dir}`);
} finally {
  if (!argv.includes('--keep')) rmSync(dir, { recursive: true, force: true });
}
