// Benchmark: a long follow-up, 12 invented visits of 20 lesions each (bench/ct-visit.ts: noisy CT-like
// int16 scans, uint8 segment maps and lesion masks on a 256×256×160 grid of 1.4 × 1.4 × 1.5 mm), the
// lesions shrinking under treatment and then growing back. Times `falciform followup` and, in Debian's
// Chromium, the app's Course tab drawing its charts once the patient is stored, beside `gzip -dc` of
// the 36 inputs (the floor for reading them). Prints figures; asserts nothing.
// Run: npx tsc -p tsconfig.node.json && npx vite build && node build/bench/followup-long.js
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { importFolder, openApp } from './app-browser.js';
import { coreLine, writeCtVisit, type BenchLesion, type VisitSpec } from './ct-visit.js';

const VISITS = 12;
const LESIONS = 20;
const PATIENT = 'BENCH-FU';

/** Twenty lesions spread through the liver ellipsoid of ct-visit.ts, 4–12 mm across their semi-axes. */
function lesionsAt(visit: number): BenchLesion[] {
  // Size factor: down to 0.6 by the sixth visit under treatment, then back up to 1.1.
  const f = visit < 6 ? 1 - (0.4 * visit) / 5 : 0.6 + (0.5 * (visit - 5)) / 6;
  return Array.from({ length: LESIONS }, (_, n) => {
    const z = -0.7 + (1.4 * (n + 0.5)) / LESIONS;
    const theta = n * 2.39996;
    const r = 0.6 * Math.sqrt(1 - z * z);
    const semi = 4 + ((n * 7) % 9);
    return {
      at: [0.39 + 0.29 * r * Math.cos(theta), 0.49 + 0.2 * r * Math.sin(theta), 0.5 + 0.37 * z],
      semiMm: [semi * f, semi * f * 0.9, semi * f * 0.8],
    } as BenchLesion;
  });
}

/** Page script: after `delayMs`, opens the patient's Course tab; resolves with the ms until its charts are drawn. */
function openCourse(delayMs: number): string {
  return `new Promise((resolve) => setTimeout(() => {
    const t0 = performance.now();
    window.location.hash = '#/patient/${PATIENT}?tab=course';
    const check = () => {
      const drawn = document.querySelector('[data-testid="chart-response"]') && !document.querySelector('[data-testid="analysis-progress"]');
      if (drawn) requestAnimationFrame(() => resolve(performance.now() - t0));
      else requestAnimationFrame(check);
    };
    check();
  }, ${delayMs}))`;
}

function timedRun(cmd: string, args: string[]): { wallS: number; stdout: string } {
  const r = spawnSync('/usr/bin/time', ['-f', 'BENCH %e', cmd, ...args], { encoding: 'utf8', maxBuffer: 1 << 26 });
  const line = r.stderr.trim().split('\n').reverse().find((l) => l.startsWith('BENCH '));
  if (r.status !== 0 || !line) throw new Error(`${cmd} ${args.join(' ')} failed:\n${r.stderr}`);
  return { wallS: Number(line.split(' ')[1]), stdout: r.stdout };
}

const dir = mkdtempSync(join(tmpdir(), 'falciform-bench-followup-'));
const folder = join(dir, PATIENT);
try {
  const t0 = performance.now();
  const visits = [];
  let gz = 0, raw = 0;
  for (let v = 0; v < VISITS; v++) {
    const id = `v${v + 1}`;
    mkdirSync(join(folder, id), { recursive: true });
    const spec: VisitSpec = { dims: [256, 256, 160], spacingMm: [1.4, 1.4, 1.5], lesions: lesionsAt(v), seed: 100 + v };
    const w = await writeCtVisit(join(folder, id), spec);
    gz += w.gzBytes;
    raw += w.rawBytes;
    const date = new Date(Date.UTC(2026, 0, 12 + 42 * v)).toISOString().slice(0, 10);
    visits.push({ id, date, scan: `${id}/scan.nii.gz`, segments: `${id}/segments.nii.gz`, lesions: `${id}/lesions.nii.gz` });
  }
  const manifest = join(folder, 'manifest.json');
  writeFileSync(manifest, JSON.stringify({ patient: { id: PATIENT, birthYear: 1958 }, visits }));
  console.log(`${VISITS} visits × ${LESIONS} lesions, 256×256×160 each, generated in ${((performance.now() - t0) / 1000).toFixed(0)} s: ` +
    `${(gz / 1e6).toFixed(0)} MB of .nii.gz for ${(raw / 1e6).toFixed(0)} MB of voxels`);
  console.log(await coreLine());

  const files = visits.flatMap((v) => [v.scan, v.segments, v.lesions].map((f) => join(folder, f)));
  const floor = timedRun('sh', ['-c', 'gzip -dc "$@" > /dev/null', 'sh', ...files]);
  console.log(`gzip -dc of the ${files.length} inputs: ${floor.wallS.toFixed(2)} s`);
  const cli = timedRun(process.execPath, ['bin/falciform.js', 'followup', manifest, '--json']);
  const out = JSON.parse(cli.stdout) as { tracks: unknown[]; visits: { response?: { category?: string } }[] };
  console.log(`falciform followup: ${cli.wallS.toFixed(2)} s (aim < 10 s); ${out.tracks.length} lesion tracks; ` +
    `categories ${out.visits.map((v) => v.response?.category ?? '–').join(' ')}`);

  const app = await openApp();
  try {
    const importS = await importFolder(app.page, folder, PATIENT);
    console.log(`import of the 12 visits through the app: ${importS.toFixed(1)} s`);
    const courseMs = await app.page.evaluate<number>(openCourse(0));
    console.log(`app Course tab, opened → charts drawn with the analysis done: ${(courseMs / 1000).toFixed(2)} s (aim < 1 s)`);
    await app.page.evaluate(`window.location.hash = '#/'`);
    const again = await app.page.evaluate<number>(openCourse(500));
    console.log(`app Course tab opened a second time: ${(again / 1000).toFixed(2)} s`);
  } finally {
    await app.close();
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}
