/**
 * Writes the demo patients into demo-data/<patient id>/ from the scenario, deterministically from the
 * seed: scans, liver and caudate masks, landmark sets, segment maps (built with the project's own
 * segment builder), lesion masks or manual marks, and a manifest per patient.
 * Run: npm run demo:generate   (node build/demo-data/generate.js [outDir])
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { invertAffine, multiply, transformPoint, type Vec3 } from '../src/geometry/mat4.js';
import { buildSegmentMap } from '../src/segments/build.js';
import type { LandmarkSet } from '../src/segments/landmarks.js';
import { landmarkPlanes, signedDistance } from '../src/segments/planes.js';
import { segmentAtWorld } from '../src/segments/segment-map.js';
import { makeVolume } from '../src/volume/volume.js';
import { saveVolume } from '../src/cli/node-io.js';
import { BODY_LANDMARKS, HU, inBody, inCaudate, inIvc, inLesion, inLiver, inSpine, inVein } from './anatomy.js';
import { borderDistancesMm, patients, SEED, type DemoPatient, type DemoVisit } from './scenario.js';

const DIMS: Record<string, [number, number, number]> = {
  'DEMO-0001': [138, 110, 44],
  'DEMO-0002': [144, 116, 44],
  'DEMO-0003': [138, 110, 55],
};

/** mulberry32: small, fast, and the same numbers on every platform. */
export function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function gaussian(next: () => number): () => number {
  return () => {
    const u = Math.max(next(), 1e-12);
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * next());
  };
}

const rad = (deg: number) => (deg * Math.PI) / 180;

/** Body → world for one visit: rotate about z, then x, then shift. */
function bodyToWorld(m: DemoVisit['motion']): number[] {
  const cz = Math.cos(rad(m.rotZDeg)), sz = Math.sin(rad(m.rotZDeg));
  const cx = Math.cos(rad(m.rotXDeg)), sx = Math.sin(rad(m.rotXDeg));
  const rz = [cz, -sz, 0, 0, sz, cz, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1];
  const rx = [1, 0, 0, 0, 0, cx, -sx, 0, 0, sx, cx, 0, 0, 0, 0, 1];
  const r = multiply(rx, rz);
  r[3] = m.shiftMm[0]; r[7] = m.shiftMm[1]; r[11] = m.shiftMm[2];
  return r;
}

/** The scanner grid: centred on the body, optionally stored right-to-left and tilted about x. */
function scannerAffine(p: DemoPatient, dims: [number, number, number]): number[] {
  const [nx, ny, nz] = dims;
  const [dx, dy, dz] = p.spacingMm;
  const sx = p.flipX ? -dx : dx;
  const c = Math.cos(rad(p.tiltDeg)), s = Math.sin(rad(p.tiltDeg));
  const scale = [sx, 0, 0, 0, 0, dy, 0, 0, 0, 0, dz, 0, 0, 0, 0, 1];
  const tilt = [1, 0, 0, 0, 0, c, -s, 0, 0, s, c, 0, 0, 0, 0, 1];
  const a = multiply(tilt, scale);
  const centre = transformPoint(a, [(nx - 1) / 2, (ny - 1) / 2, (nz - 1) / 2]);
  a[3] = -centre[0]; a[7] = -10 - centre[1]; a[11] = 5 - centre[2];
  return a;
}

/** Lesion centres in the body frame for one visit (DEMO-0003's border lesion is placed from the plane). */
function lesionCentre(p: DemoPatient, key: string, visit: number): Vec3 {
  const lesion = p.lesions.find((l) => l.key === key)!;
  if (p.id !== 'DEMO-0003' || key !== 'border') return lesion.centres[Math.min(visit, lesion.centres.length - 1)];
  const rhv = landmarkPlanes({ points: BODY_LANDMARKS }).rightHepatic;
  // A point on the right hepatic vein plane, between the IVC and the vein point, 35 mm above the portal plane.
  const base: Vec3 = [62.5, -5, 35];
  const off = signedDistance(rhv, base);
  const d = borderDistancesMm[visit] + off;
  // Move to the VIII side (against the plane's normal) by the designed distance.
  return [base[0] - d * rhv.normal[0], base[1] - d * rhv.normal[1], base[2] - d * rhv.normal[2]];
}

function landmarksIn(toWorld: number[]): LandmarkSet {
  const points = Object.fromEntries(
    Object.entries(BODY_LANDMARKS).map(([k, v]) => [k, transformPoint(toWorld, v).map((x) => Math.round(x * 10) / 10)]),
  ) as unknown as LandmarkSet['points'];
  return { points };
}

function json(path: string, value: unknown): void {
  writeFileSync(path, `${JSON.stringify(value, null, 2)}\n`);
}

/** Writes one visit's files under outDir/<visit id>/ and returns its manifest entry; `dims` is the scanner grid. */
export async function writeVisit(
  p: DemoPatient, vi: number, outDir: string, random: () => number, dims: [number, number, number] = DIMS[p.id],
): Promise<Record<string, unknown>> {
  const visit = p.visits[vi];
  const [nx, ny, nz] = dims;
  const affine = scannerAffine(p, dims);
  const toWorld = bodyToWorld(visit.motion);
  const toBody = multiply(invertAffine(toWorld), affine); // voxel → body
  const noise = gaussian(random);
  const n = nx * ny * nz;
  const scan = new Int16Array(n);
  const liver = new Uint8Array(n);
  const caudate = new Uint8Array(n);
  const lesions = new Uint8Array(n);
  const viable = new Uint8Array(n);
  const present = p.lesions.map((l, li) => ({ l, li, d: l.diametersMm[vi], v: l.viableMm?.[vi], c: lesionCentre(p, l.key, vi) }))
    .filter((x) => x.d > 0);

  for (let k = 0, idx = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      for (let i = 0; i < nx; i++, idx++) {
        const b = transformPoint(toBody, [i, j, k]);
        const where = inBody(b);
        let hu: number = where === 'air' ? HU.air : where === 'fat' ? HU.fat : HU.soft;
        if (where === 'inside') {
          if (inSpine(b)) hu = HU.bone;
          else if (inIvc(b) && b[2] > -95 && b[2] < 95) hu = HU.ivc;
          else if (inLiver(b)) {
            liver[idx] = 1;
            if (inCaudate(b)) caudate[idx] = 1;
            hu = inVein(b) ? HU.vein : p.liverHu;
            for (const x of present) {
              if (!inLesion(b, x.c, x.d)) continue;
              lesions[idx] = visit.lesionsFrom === 'labels' ? x.li + 1 : 1;
              const viableHere = x.v === undefined || (x.v > 0 && inLesion(b, x.c, x.v));
              if (viableHere && x.v !== undefined) viable[idx] = 1;
              hu = x.v === 0 ? HU.ablation : x.l.hu;
            }
          }
        }
        scan[idx] = Math.round(hu + p.noiseHu * noise());
      }
    }
  }

  const dir = join(outDir, visit.id);
  mkdirSync(dir, { recursive: true });
  const entry: Record<string, unknown> = { id: visit.id, date: visit.date, scan: `${visit.id}/scan.nii.gz` };
  await saveVolume(join(dir, 'scan.nii.gz'), makeVolume(dims, scan, affine, 'int16'), 'int16');
  const liverVol = makeVolume(dims, liver, affine, 'uint8');
  const caudateVol = makeVolume(dims, caudate, affine, 'uint8');
  const landmarks = landmarksIn(toWorld);
  const splitIV = p.id === 'DEMO-0003';

  if (visit.segmentsFrom === 'map') {
    const { map } = buildSegmentMap(liverVol, landmarks, { caudate: caudateVol, splitIV });
    await saveVolume(join(dir, 'segments.nii.gz'), map.labels, 'uint8');
    entry.segments = `${visit.id}/segments.nii.gz`;
    entry.scheme = 'default';
    // The design puts each lesion in a named segment: make sure the built map agrees.
    for (const x of present) {
      const seg = segmentAtWorld(map, transformPoint(toWorld, x.c));
      if (seg !== x.l.segment) throw new Error(`${p.id} ${visit.id} ${x.l.key}: designed in ${x.l.segment}, map says ${seg}`);
    }
  } else {
    await saveVolume(join(dir, 'liver.nii.gz'), liverVol, 'uint8');
    await saveVolume(join(dir, 'caudate.nii.gz'), caudateVol, 'uint8');
    json(join(dir, 'landmarks.json'), { space: 'RAS', units: 'mm', points: landmarks.points });
    Object.assign(entry, { liver: `${visit.id}/liver.nii.gz`, landmarks: `${visit.id}/landmarks.json`, caudate: `${visit.id}/caudate.nii.gz` });
  }
  if (splitIV) entry.splitIV = true;
  if (visit.readerCalls) entry.readerCalls = visit.readerCalls;

  if (visit.lesionsFrom === 'marks') {
    const marks = present.map((x, m) => {
      const centre = transformPoint(toWorld, x.c).map((v) => Math.round(v * 10) / 10);
      // Caliper along the body's x axis, which the visit's motion turns slightly.
      const half = x.d / 2;
      const a = transformPoint(toWorld, [x.c[0] - half, x.c[1], x.c[2]]).map((v) => Math.round(v * 10) / 10);
      const b = transformPoint(toWorld, [x.c[0] + half, x.c[1], x.c[2]]).map((v) => Math.round(v * 10) / 10);
      const mark: Record<string, unknown> = {
        id: `M${m + 1}`, centreMm: centre, longestAxialMm: x.d, shortAxisMm: Math.round(0.8 * x.d * 10) / 10, endpointsMm: [a, b],
      };
      if (x.v !== undefined) mark.viableAxialMm = x.v;
      return mark;
    });
    json(join(dir, 'marks.json'), { space: 'RAS', units: 'mm', marks });
    entry.marks = `${visit.id}/marks.json`;
  } else {
    await saveVolume(join(dir, 'lesions.nii.gz'), makeVolume(dims, lesions, affine, 'uint8'), 'uint8');
    entry.lesions = `${visit.id}/lesions.nii.gz`;
    if (p.criteria === 'mRECIST') {
      await saveVolume(join(dir, 'viable.nii.gz'), makeVolume(dims, viable, affine, 'uint8'), 'uint8');
      entry.viable = `${visit.id}/viable.nii.gz`;
    }
  }
  return entry;
}

export async function generateDemo(outDir: string): Promise<void> {
  const index: { id: string; title: string; manifest: string }[] = [];
  for (const [pi, p] of patients.entries()) {
    const dir = join(outDir, p.id);
    mkdirSync(dir, { recursive: true });
    const random = rng(SEED + pi);
    const visits = [];
    for (let vi = 0; vi < p.visits.length; vi++) visits.push(await writeVisit(p, vi, dir, random));
    json(join(dir, 'manifest.json'), {
      patient: { id: p.id, birthYear: p.birthYear, heightCm: p.heightCm, weightKg: p.weightKg, sex: p.sex, demo: true },
      marginMm: 10,
      criteria: p.criteria,
      visits,
      treatments: p.treatments,
    });
    index.push({ id: p.id, title: p.title, manifest: `${p.id}/manifest.json` });
  }
  json(join(outDir, 'index.json'), { note: 'Invented demo patients; not real people or real scans.', patients: index });
}

const here = dirname(fileURLToPath(import.meta.url));
if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const out = process.argv[2] ?? join(here, '..', '..', 'demo-data');
  await generateDemo(out);
  console.log(`demo patients written to ${out}`);
}
