import { CAUTION } from '../../src/caution.js';
import { rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { run } from '../../src/cli/main.js';
import { analyzeVisit } from '../../src/visit/analyze.js';
import { ellipsoid, noiseScan, paint, runPython, scratchDir, segmentMap, volume, writeRaw, type Dims } from '../lesions/fixtures.js';

// `falciform analyze` on NIfTI files written by nibabel (tests/reference/write_nifti.py), checked
// against the contracts (analyze output, exit codes) and against the core on the same arrays.

const dims: Dims = [64, 60, 40];
const affine = [-0.9, 0, 0, 28, 0, -0.8, 0, 24, 0, 0, 2, -40, 0, 0, 0, 1];
const n = dims[0] * dims[1] * dims[2];
const liver = new Uint8Array(n);
const labels = new Uint8Array(n);
const lesions = new Uint8Array(n);
const scan = noiseScan(dims, 99);
const liverShape = ellipsoid([0, 0, 0], [26, 22, 34]);
paint(liver, dims, affine, liverShape, 1);
paint(labels, dims, affine, (x, y, z) => liverShape(x, y, z) && x > 0, 7);
paint(labels, dims, affine, (x, y, z) => liverShape(x, y, z) && x <= 0, 2);
paint(lesions, dims, affine, ellipsoid([8, 2, 4], [5, 4, 6]), 1);
paint(lesions, dims, affine, ellipsoid([-1, -6, -10], [4, 4, 4]), 1);

let dir = '';
const f = (name: string) => join(dir, name);

beforeAll(() => {
  dir = scratchDir();
  const files = [
    ['scan', scan, 'int16'], ['segments', labels, 'uint8'], ['liver', liver, 'uint8'], ['lesions', lesions, 'uint8'],
  ] as const;
  runPython('tests/reference/write_nifti.py', {
    files: files.map(([name, data, dtype]) => ({ path: f(`${name}.nii.gz`), raw: writeRaw(dir, `${name}.raw`, data), dtype, dims, affine })),
  }, dir);
  writeFileSync(f('scheme.json'), JSON.stringify({ labels: { 2: 'III', 7: 'VI' } }));
  writeFileSync(f('landmarks.json'), JSON.stringify({
    space: 'RAS', units: 'mm',
    points: {
      ivc_superior: [18, -30, 50], ivc_inferior: [15, -35, -20], right_hepatic_vein: [80, -10, 45],
      middle_hepatic_vein: [25, 20, 45], umbilical_fissure: [-15, 25, 20], portal_bifurcation: [10, 0, 15],
    },
  }));
  writeFileSync(f('marks.json'), JSON.stringify({
    space: 'RAS', units: 'mm',
    marks: [{ id: 'M1', centreMm: [8, 2, 4], longestAxialMm: 10, shortAxisMm: 8, endpointsMm: [[3, 2, 4], [13, 2, 4]] }],
  }));
  writeFileSync(f('bad-marks.json'), JSON.stringify({ marks: [{ id: 'M1', centreMm: [1, 2] }] }));
});

afterAll(() => rmSync(dir, { recursive: true, force: true }));

afterEach(() => vi.restoreAllMocks());

async function falciform(...args: string[]) {
  let stdout = '', stderr = '';
  vi.spyOn(process.stdout, 'write').mockImplementation((s) => { stdout += String(s); return true; });
  vi.spyOn(process.stderr, 'write').mockImplementation((s) => { stderr += String(s); return true; });
  const code = await run(args);
  vi.restoreAllMocks();
  return { code, stdout, stderr };
}

const CONTRACT_LESION_KEYS = ['id', 'centroidMm', 'segment', 'segmentFractions', 'volumeMl', 'longestAxialMm', 'shortAxisMm', 'marginMm', 'nearestOtherSegment', 'marginAlert'];

describe('falciform analyze', () => {
  it('prints the contract document for a segment map and a lesion mask, as the core computes it', async () => {
    const r = await falciform('analyze', '--scan', f('scan.nii.gz'), '--segments', f('segments.nii.gz'), '--lesions', f('lesions.nii.gz'), '--json');
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout.trim().split('\n')).toHaveLength(1);
    const doc = JSON.parse(r.stdout);
    expect(Object.keys(doc)).toEqual(['segments', 'liverVolumeMl', 'lesions', 'warnings', 'caution']);
    expect(doc.caution).toBe(CAUTION);
    expect(doc.lesions).toHaveLength(2);
    for (const l of doc.lesions) expect(Object.keys(l).slice(0, CONTRACT_LESION_KEYS.length)).toEqual(CONTRACT_LESION_KEYS);
    const core = analyzeVisit({
      scan: volume(dims, scan, affine, 'int16'),
      segments: segmentMap(volume(dims, labels, affine, 'uint8')),
      lesionMask: volume(dims, lesions, affine, 'uint8'),
    });
    expect(doc.segments.map((s: { segment: string }) => s.segment)).toEqual(['II', 'VII']);
    expect(doc.liverVolumeMl).toBeCloseTo(core.liverVolumeMl, 3);
    core.lesions.forEach((c, t) => {
      const l = doc.lesions[t];
      expect(l.id).toBe(c.id);
      expect(l.segment).toBe(c.segment);
      expect(Object.keys(l.segmentFractions).sort()).toEqual(Object.keys(c.segmentFractions).sort());
      l.centroidMm.forEach((x: number, d: number) => expect(x).toBeCloseTo(c.centroidMm[d], 2));
      expect(l.volumeMl).toBeCloseTo(c.volumeMl as number, 3);
      expect(l.longestAxialMm).toBeCloseTo(c.longestAxialMm, 2);
      expect(l.shortAxisMm).toBeCloseTo(c.shortAxisMm, 2);
      expect(l.marginMm).toBeCloseTo(c.marginMm as number, 2);
      expect(l.nearestOtherSegment).toBe(c.nearestOtherSegment);
      expect(l.marginAlert).toBe(c.marginAlert);
    });
    expect(doc.lesions.map((l: { segment: string }) => l.segment).sort()).toEqual(['II', 'VII']);
  });

  it('applies a scheme file and the margin setting', async () => {
    const r = await falciform('analyze', '--scan', f('scan.nii.gz'), '--segments', f('segments.nii.gz'), '--scheme', f('scheme.json'),
      '--lesions', f('lesions.nii.gz'), '--margin-mm', '0', '--json');
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout);
    expect(doc.segments.map((s: { segment: string }) => s.segment)).toEqual(['III', 'VI']);
    // Alert at or within the set margin (issue: a set margin of 0 must still alert a lesion on the border).
    expect(doc.lesions.every((l: { marginAlert: boolean; marginMm: number | null }) => l.marginAlert === (l.marginMm !== null && l.marginMm <= 0))).toBe(true);
    expect(doc.lesions.map((l: { segment: string }) => l.segment).sort()).toEqual(['III', 'VI']);
  });

  it('builds the segment map from a liver mask and landmarks, and reads marks', async () => {
    const r = await falciform('analyze', '--scan', f('scan.nii.gz'), '--liver', f('liver.nii.gz'), '--landmarks', f('landmarks.json'),
      '--marks', f('marks.json'), '--json');
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout);
    expect(doc.lesions).toHaveLength(1);
    expect(doc.lesions[0]).toMatchObject({ id: 'M1', source: 'mark', volumeMl: null, longestAxialMm: 10, shortAxisMm: 8 });
    expect(doc.lesions[0].segment).not.toBeNull();
    expect(doc.warnings.some((w: string) => /caudate/.test(w))).toBe(true);
  });

  it('prints a readable summary with the caution without --json', async () => {
    const r = await falciform('analyze', '--scan', f('scan.nii.gz'), '--segments', f('segments.nii.gz'), '--lesions', f('lesions.nii.gz'));
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^Liver \d+\.\d mL/);
    expect(r.stdout).toMatch(/L2 /);
    expect(r.stdout).toMatch(/not a medical device/);
  });

  it('exits 2 on usage mistakes', async () => {
    const base = ['analyze', '--scan', f('scan.nii.gz')];
    for (const args of [
      [...base, '--lesions', f('lesions.nii.gz'), '--json'],
      [...base, '--segments', f('segments.nii.gz'), '--liver', f('liver.nii.gz'), '--landmarks', f('landmarks.json'), '--lesions', f('lesions.nii.gz')],
      [...base, '--segments', f('segments.nii.gz'), '--json'],
      [...base, '--liver', f('liver.nii.gz'), '--marks', f('marks.json')],
      [...base, '--segments', f('segments.nii.gz'), '--lesions', f('lesions.nii.gz'), '--margin-mm', 'ten'],
    ]) {
      const r = await falciform(...args);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stdout).toBe('');
    }
  });

  it('takes a lesion mask and marks together: the mask\'s lesions, then the marks', async () => {
    const both = await falciform('analyze', '--scan', f('scan.nii.gz'), '--segments', f('segments.nii.gz'),
      '--lesions', f('lesions.nii.gz'), '--marks', f('marks.json'), '--json');
    expect(both.code).toBe(0);
    const mask = await falciform('analyze', '--scan', f('scan.nii.gz'), '--segments', f('segments.nii.gz'), '--lesions', f('lesions.nii.gz'), '--json');
    const marks = await falciform('analyze', '--scan', f('scan.nii.gz'), '--segments', f('segments.nii.gz'), '--marks', f('marks.json'), '--json');
    const ids = (r: { stdout: string }) => (JSON.parse(r.stdout) as { lesions: { id: string }[] }).lesions.map((l) => l.id);
    expect(ids(both)).toEqual([...ids(mask), ...ids(marks)]);
  });

  it('exits 3 with one line naming the file on bad input', async () => {
    for (const [args, file] of [
      [['--segments', f('segments.nii.gz'), '--lesions', f('missing.nii.gz')], 'missing.nii.gz'],
      [['--segments', f('segments.nii.gz'), '--marks', f('bad-marks.json')], 'bad-marks.json'],
      [['--segments', f('marks.json'), '--lesions', f('lesions.nii.gz')], 'marks.json'],
    ] as const) {
      const r = await falciform('analyze', '--scan', f('scan.nii.gz'), ...args, '--json');
      expect(r.code).toBe(3);
      expect(r.stdout).toBe('');
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).toContain(file);
    }
  });
});
