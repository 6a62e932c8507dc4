/**
 * Writes a cohort of small invented patients for `falciform batch`: each a folder with a manifest and
 * three visits drawn by the demo generator's anatomy on a coarse grid (6 × 6 × 8 mm, about 43 000
 * voxels), deterministically from the seed. Lesions sit where the demo scenario puts its metastases;
 * sizes shrink, hold or grow per patient, and some patients show a new lesion at the last visit.
 * Patients are spread over two site folders so the batch's folder walk is exercised. With `broken`,
 * the last patient's second scan is cut short, as a failed copy would leave it.
 * Run: node build/demo-data/cohort.js OUT_DIR [COUNT] [--no-broken]
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Vec3 } from '../src/geometry/mat4.js';
import { rng, writeVisit } from './generate.js';
import type { DemoLesion, DemoPatient, DemoVisit } from './scenario.js';

export const COHORT_SEED = 20261203;
const DIMS: [number, number, number] = [58, 41, 18];

/** Lesion sites of the demo scenario (body frame, mm) and the segment each lies in. */
const SITES: { segment: string; centre: Vec3 }[] = [
  { segment: 'VII', centre: [80, -32, 32] },
  { segment: 'V', centre: [45, 30, -28] },
  { segment: 'II', centre: [-75, 25, 26] },
  { segment: 'VIII', centre: [40, 20, 40] },
  { segment: 'VI', centre: [75, -28, -28] },
];

/** Per-visit size factor: response, stable disease, growth. */
const TRENDS = [0.6, 1.0, 1.25];

const pad = (n: number) => String(n).padStart(4, '0');

/** The folder (relative to the cohort root) of patient n (1-based). */
export function cohortPatientDir(n: number): string {
  return join(n % 2 ? 'site-a' : 'site-b', `C-${pad(n)}`);
}

function cohortPatient(n: number, random: () => number): DemoPatient {
  const pick = (k: number) => Math.floor(random() * k);
  const trend = TRENDS[pick(TRENDS.length)];
  const count = 1 + pick(3);
  const start = pick(SITES.length);
  const lesions: DemoLesion[] = [];
  for (let k = 0; k < count; k++) {
    const site = SITES[(start + k) % SITES.length];
    const base = 22 + Math.round(random() * 12);
    lesions.push({
      key: `l${k + 1}`, segment: site.segment, centres: [site.centre],
      diametersMm: [0, 1, 2].map((v) => Math.round(base * trend ** v)), hu: 45 + pick(10),
    });
  }
  // A new lesion at the last visit for about one patient in four, at a site not yet used.
  if (pick(4) === 0 && count < SITES.length) {
    const site = SITES[(start + count) % SITES.length];
    lesions.push({ key: 'new', segment: site.segment, centres: [site.centre], diametersMm: [0, 0, 20], hu: 50 });
  }
  const shift = () => Math.round(random() * 10 - 5);
  const motion = (): DemoVisit['motion'] => ({
    rotZDeg: Math.round((random() * 4 - 2) * 10) / 10,
    rotXDeg: Math.round((random() * 2 - 1) * 10) / 10,
    shiftMm: [shift(), shift(), shift()],
  });
  const month = 1 + pick(6);
  const date = (m: number) => `2026-${String(month + m).padStart(2, '0')}-${String(5 + pick(20)).padStart(2, '0')}`;
  return {
    id: `C-${pad(n)}`, title: 'Invented cohort patient', story: '',
    birthYear: 1945 + pick(35), heightCm: 155 + pick(35), weightKg: 55 + pick(40), sex: pick(2) ? 'female' : 'male',
    criteria: 'RECIST 1.1', liverHu: 95 + pick(15), noiseHu: 10 + pick(6),
    spacingMm: [6, 6, 8], flipX: pick(2) === 1, tiltDeg: 0,
    visits: [
      { id: 'v1', date: date(0), segmentsFrom: 'map', lesionsFrom: 'mask', motion: { rotZDeg: 0, rotXDeg: 0, shiftMm: [0, 0, 0] } },
      { id: 'v2', date: date(2), segmentsFrom: 'landmarks', lesionsFrom: 'mask', motion: motion() },
      { id: 'v3', date: date(4), segmentsFrom: 'map', lesionsFrom: pick(2) ? 'marks' : 'mask', motion: motion() },
    ],
    lesions,
    treatments: [],
  };
}

/** Writes `count` patients under outDir; returns their manifest paths relative to outDir. */
export async function generateCohort(outDir: string, count: number, opts: { broken?: boolean } = {}): Promise<string[]> {
  const manifests: string[] = [];
  for (let n = 1; n <= count; n++) {
    const random = rng(COHORT_SEED + n);
    const p = cohortPatient(n, random);
    const rel = cohortPatientDir(n);
    const dir = join(outDir, rel);
    mkdirSync(dir, { recursive: true });
    const visits = [];
    for (let vi = 0; vi < p.visits.length; vi++) visits.push(await writeVisit(p, vi, dir, random, DIMS));
    const manifest = {
      patient: { id: p.id, birthYear: p.birthYear, heightCm: p.heightCm, weightKg: p.weightKg, sex: p.sex, demo: true },
      marginMm: 10, criteria: p.criteria, visits,
    };
    writeFileSync(join(dir, 'manifest.json'), `${JSON.stringify(manifest, null, 2)}\n`);
    manifests.push(join(rel, 'manifest.json'));
  }
  if (opts.broken && count > 0) {
    // Cut the last patient's second scan short: the gzip stream ends inside the image.
    const scan = join(outDir, cohortPatientDir(count), 'v2', 'scan.nii.gz');
    writeFileSync(scan, readFileSync(scan).subarray(0, 300));
  }
  return manifests;
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const args = process.argv.slice(2);
  const out = args.find((a) => !a.startsWith('--'));
  const count = Number(args.filter((a) => !a.startsWith('--'))[1] ?? 12);
  if (!out || !Number.isInteger(count) || count < 1) {
    console.error('usage: node build/demo-data/cohort.js OUT_DIR [COUNT] [--no-broken]');
    process.exit(2);
  }
  await generateCohort(out, count, { broken: !args.includes('--no-broken') });
  console.log(`${count} invented cohort patients written to ${out}`);
}
