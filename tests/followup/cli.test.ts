import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { saveVolume } from '../../src/cli/node-io.js';
import { makeVolume } from '../../src/volume/volume.js';
import { LANDMARK_NAMES } from '../../src/segments/landmarks.js';
import { gridAround, inLiver, LANDMARKS, maskVolume, move, randomMotion, seeded, unmove, type V3 } from './phantom.js';

// `falciform followup MANIFEST --json` as a user runs it (contracts: followup output, exit codes).
// Two visits of an invented patient on 3 mm grids: v1 gives a segment map and a lesion mask; v2,
// taken after a known rigid motion, gives a liver mask, a landmark set and a lesion mask in which
// both lesions shrank and a new one appeared.

function falciform(...args: string[]) {
  return spawnSync(process.execPath, ['bin/falciform.js', ...args], { encoding: 'utf8' });
}

const spacing: V3 = [3, 3, 3];
const motion = randomMotion(seeded(8), 10, 15);
const A: V3 = [70, 0, 20], B: V3 = [10, -15, 30], C: V3 = [-30, 25, 5];
const inBall = (p: V3, c: V3, r: number) => Math.hypot(p[0] - c[0], p[1] - c[1], p[2] - c[2]) <= r;
/** Segment labels by x, default scheme values: VII right, VIII, IV, II left. */
const labelAt = (p: V3) => (p[0] > 80 ? 7 : p[0] > 30 ? 8 : p[0] > -10 ? 4 : 2);

let dir: string;

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'falciform-followup-'));
  mkdirSync(join(dir, 'v1'));
  mkdirSync(join(dir, 'v2'));

  const g1 = gridAround(null, spacing);
  const liver1 = maskVolume(g1.dims, g1.affine, inLiver);
  const scan1 = makeVolume(g1.dims, Int16Array.from(liver1.data, (v) => (v ? 90 : -100)), g1.affine, 'int16');
  const seg1 = maskVolume(g1.dims, g1.affine, inLiver);
  const p: V3 = [0, 0, 0];
  for (let n = 0, k = 0; k < g1.dims[2]; k++) for (let j = 0; j < g1.dims[1]; j++) for (let i = 0; i < g1.dims[0]; i++, n++) {
    if (!seg1.data[n]) continue;
    p[0] = g1.affine[0] * i + g1.affine[3]; p[1] = g1.affine[5] * j + g1.affine[7]; p[2] = g1.affine[10] * k + g1.affine[11];
    seg1.data[n] = labelAt(p);
  }
  const les1 = maskVolume(g1.dims, g1.affine, (q) => inBall(q, A, 10) || inBall(q, B, 7.5));

  const g2 = gridAround(motion, spacing);
  const liver2 = maskVolume(g2.dims, g2.affine, (q) => inLiver(unmove(motion, q)));
  const scan2 = makeVolume(g2.dims, Int16Array.from(liver2.data, (v) => (v ? 90 : -100)), g2.affine, 'int16');
  const les2 = maskVolume(g2.dims, g2.affine, (q) => {
    const o = unmove(motion, q);
    return inBall(o, A, 6.5) || inBall(o, B, 5) || inBall(o, C, 4.5);
  });
  const landmarks2 = { space: 'RAS', units: 'mm', points: Object.fromEntries(LANDMARK_NAMES.map((n) => [n, move(motion, LANDMARKS.points[n])])) };

  await saveVolume(join(dir, 'v1/scan.nii.gz'), scan1, 'int16');
  await saveVolume(join(dir, 'v1/segments.nii.gz'), seg1, 'uint8');
  await saveVolume(join(dir, 'v1/lesions.nii.gz'), les1, 'uint8');
  await saveVolume(join(dir, 'v2/scan.nii.gz'), scan2, 'int16');
  await saveVolume(join(dir, 'v2/liver.nii.gz'), liver2, 'uint8');
  await saveVolume(join(dir, 'v2/lesions.nii.gz'), les2, 'uint8');
  writeFileSync(join(dir, 'v2/landmarks.json'), JSON.stringify(landmarks2));
  const visits = [
    { id: 'v1', date: '2026-01-12', scan: 'v1/scan.nii.gz', segments: 'v1/segments.nii.gz', scheme: 'default', lesions: 'v1/lesions.nii.gz' },
    { id: 'v2', date: '2026-03-02', scan: 'v2/scan.nii.gz', liver: 'v2/liver.nii.gz', landmarks: 'v2/landmarks.json', lesions: 'v2/lesions.nii.gz' },
  ];
  writeFileSync(join(dir, 'manifest.json'), JSON.stringify({ patient: { id: 'TEST-0001' }, marginMm: 10, visits: [visits[1], visits[0]] }));
  writeFileSync(join(dir, 'bad-target.json'), JSON.stringify({ patient: { id: 'TEST-0001' }, visits, targets: ['I'] }));
  writeFileSync(join(dir, 'missing.json'), JSON.stringify({ patient: { id: 'TEST-0001' }, visits: [{ ...visits[0], lesions: 'v1/nothing.nii.gz' }] }));
}, 120_000);

afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe('falciform followup', () => {
  it('prints the followup document: tracks across an aligned pair, response, burden', () => {
    const r = falciform('followup', join(dir, 'manifest.json'), '--json');
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    const doc = JSON.parse(r.stdout);
    expect(Object.keys(doc).slice(0, 3)).toEqual(['visits', 'tracks', 'burden']);
    expect(doc.visits.map((v: { id: string }) => v.id)).toEqual(['v1', 'v2']);
    const v2 = doc.visits[1];
    // v1 has no landmark set, so the visits are aligned on their liver outlines.
    expect(v2.alignment.method).toBe('liver');
    expect(v2.alignment.residualMm).toBeLessThan(1.5);
    // Both lesions are followed; the third is new.
    expect(doc.tracks).toHaveLength(3);
    expect(doc.tracks.slice(0, 2).every((t: { lesions: object }) => Object.keys(t.lesions).join() === 'v1,v2')).toBe(true);
    expect(v2.newLesions).toEqual(['C']);
    expect(v2.goneLesions).toEqual([]);
    // Targets shrank from about 20 + 15 mm to about 12 + 9 mm (PR by targets). The new lesion is
    // about 9 mm, under the 10 mm default: equivocal until a reader calls it (RECIST 1.1 section
    // 4.3.5, from memory), so the visit is PR; nothing is said outside the liver (not assessed).
    expect(v2.response.criteria).toBe('RECIST 1.1');
    expect(v2.response.changeFromBaselinePct).toBeLessThan(-30);
    expect(v2.response.targetCategory).toBe('PR');
    expect(v2.equivocalNewLesions).toEqual(['C']);
    expect(v2.readerCalls.outsideLiver).toBe('not-assessed');
    expect(v2.response.category).toBe('PR');
    expect(doc.scope).toMatch(/assesses the liver/);
    expect(doc.bestResponse).toMatchObject({ category: 'PR', progression: null });
    // The reader calls it unequivocal on the command line: a new lesion makes the visit PD (table 1),
    // progression dated at v2.
    const called = falciform('followup', join(dir, 'manifest.json'), '--json', '--new-lesion', `v2:${doc.tracks[2].lesions.v2}=unequivocal`, '--outside-liver', 'v2=none');
    expect(called.stderr).toBe('');
    const v2c = JSON.parse(called.stdout).visits[1];
    expect(v2c.unequivocalNewLesions).toEqual([{ track: 'C', from: 'reader' }]);
    expect(v2c.readerCalls.outsideLiver).toBe('none');
    expect(v2c.response.category).toBe('PD');
    expect(JSON.parse(called.stdout).bestResponse).toMatchObject({ category: 'PD', progression: { visit: 'v2', date: '2026-03-02' } });
    const t1 = doc.tracks[0];
    expect(t1.target).toBe(true);
    expect(t1.segments.v1).toBe('VIII');
    expect(doc.burden.filter((b: { visit: string }) => b.visit === 'v1').reduce((s: number, b: { count: number }) => s + b.count, 0)).toBe(2);
    expect(doc.caution).toMatch(/not a medical device/);
  });

  it('prints a readable table without --json', () => {
    const r = falciform('followup', join(dir, 'manifest.json'));
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/v2 {2}2026-03-02 {2}PR/);
    expect(r.stdout).toMatch(/equivocal new C \(followed, not PD\)/);
    expect(r.stdout).toMatch(/Best overall response: PR; no progression/);
    expect(r.stdout).toMatch(/Falciform assesses the liver/);
    expect(r.stdout).toMatch(/not a medical device/);
  });

  it('exits 3 naming the file on bad input, 2 on a usage mistake', () => {
    const bad = falciform('followup', join(dir, 'bad-target.json'), '--json');
    expect(bad.status).toBe(3);
    expect(bad.stdout).toBe('');
    expect(bad.stderr).toMatch(/bad-target\.json: field targets: I/);
    expect(bad.stderr.trim().split('\n')).toHaveLength(1);
    const missing = falciform('followup', join(dir, 'missing.json'), '--json');
    expect(missing.status).toBe(3);
    expect(missing.stderr).toMatch(/nothing\.nii\.gz/);
    expect(falciform('followup').status).toBe(2);
    const badCall = falciform('followup', join(dir, 'manifest.json'), '--non-target', 'v2=better');
    expect(badCall.status).toBe(2);
    expect(badCall.stderr).toMatch(/--non-target: "better" must be one of present, absent, unequivocal-progression/);
  });
});
