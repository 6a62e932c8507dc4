// End-to-end check of `falciform segments` on files written with the project's NIfTI writer.
import { CAUTION } from '../../src/caution.js';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadVolume, saveVolume } from '../../src/cli/node-io.js';
import { buildSegmentMap } from '../../src/segments/build.js';
import { segmentVolumes } from '../../src/segments/volumes.js';
import { makeVolume } from '../../src/volume/volume.js';
import { gridAffine, liverVolume, phantomLandmarks, rotation, sphereMask, LIVER, type V3 } from './phantom.js';

const BIN = join(process.cwd(), 'bin', 'falciform.js');

function falciform(...args: string[]) {
  const r = spawnSync(process.execPath, [BIN, 'segments', ...args], { encoding: 'utf8' });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe('falciform segments (source: contracts.md, command line)', () => {
  let dir = '';
  const dims: V3 = [120, 100, 40];
  const affine = gridAffine(rotation(0.15, -0.1, 0.25), [1.7, 1.7, 3.5], dims, LIVER.centre);
  const liver = liverVolume(dims, affine);
  const cDims: V3 = [30, 30, 30];
  const cAffine = gridAffine(rotation(0, 0, 0), [1, 1, 1], cDims, [12, -18, 24]);
  const caudate = makeVolume(cDims, sphereMask(cDims, cAffine, [12, -18, 24], 12), cAffine, 'uint8');
  const landmarks = { space: 'RAS', units: 'mm', points: phantomLandmarks().points };

  beforeAll(async () => {
    // The command as a user runs it: the compiled bin script (built once by tests/setup/build.ts).
    dir = mkdtempSync(join(tmpdir(), 'falciform-segments-'));
    await saveVolume(join(dir, 'liver.nii.gz'), liver, 'uint8');
    await saveVolume(join(dir, 'caudate.nii'), caudate, 'uint8');
    writeFileSync(join(dir, 'landmarks.json'), JSON.stringify(landmarks));
    writeFileSync(join(dir, 'reference.json'), JSON.stringify([landmarks, landmarks]));
    const bad = { ...landmarks, points: { ...landmarks.points, umbilical_fissure: [100, 0, 30] } };
    writeFileSync(join(dir, 'bad-landmarks.json'), JSON.stringify(bad));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('writes the map and prints volumes, QC and warnings as one JSON document', async () => {
    const out = join(dir, 'segments.nii.gz');
    const r = falciform(
      '--liver', join(dir, 'liver.nii.gz'), '--landmarks', join(dir, 'landmarks.json'), '--out', out,
      '--caudate', join(dir, 'caudate.nii'), '--split-iv', '--reference', join(dir, 'reference.json'), '--json',
    );
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout);
    expect(Object.keys(doc)).toEqual(['segments', 'liverVolumeMl', 'qc', 'warnings', 'method', 'caution']);
    expect(doc.caution).toBe(CAUTION);
    expect(doc.method).toMatch(/approximation by flat planes/);
    // Same numbers as the core on the same inputs (the CLI and the app share one core).
    const core = buildSegmentMap(liver, phantomLandmarks(), { caudate, splitIV: true });
    const want = segmentVolumes(core.map);
    expect(doc.segments.map((s: { segment: string }) => s.segment)).toEqual(['I', 'II', 'III', 'IVa', 'IVb', 'V', 'VI', 'VII', 'VIII']);
    doc.segments.forEach((s: { volumeMl: number }, n: number) => expect(s.volumeMl).toBeCloseTo(want[n].volumeMl, 3));
    expect(doc.liverVolumeMl).toBeCloseTo(want.reduce((a, v) => a + v.volumeMl, 0), 2);
    expect(doc.qc.correlation).toBe(1);
    expect(doc.qc.worstLandmark).toBeNull();
    expect(doc.qc.comparedWith).toBe(2);
    // The one warning: II/III from the main portal plane, as the set has no seventh point.
    expect(doc.warnings).toEqual([expect.stringMatching(/II and III are divided by the main portal plane/)]);
    const saved = await loadVolume(out);
    expect(saved.volume.dims).toEqual(dims);
    expect([...saved.volume.data]).toEqual([...core.map.labels.data]);
  });

  it('says that segment I is left out without a caudate mask, and QC is null without a reference', () => {
    const r = falciform('--liver', join(dir, 'liver.nii.gz'), '--landmarks', join(dir, 'landmarks.json'), '--out', join(dir, 'b.nii'), '--json');
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout);
    expect(doc.qc).toBeNull();
    expect(doc.segments.map((s: { segment: string }) => s.segment)).toEqual(['II', 'III', 'IV', 'V', 'VI', 'VII', 'VIII']);
    expect(doc.warnings.join('\n')).toMatch(/segment I is left out/);
  });

  it('exits 3 with one line naming the landmark file for bad landmarks', () => {
    const file = join(dir, 'bad-landmarks.json');
    const r = falciform('--liver', join(dir, 'liver.nii.gz'), '--landmarks', file, '--out', join(dir, 'c.nii'), '--json');
    expect(r.code).toBe(3);
    expect(r.stdout).toBe('');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain(`${file}: `);
    expect(r.stderr).toMatch(/umbilical_fissure/);
    expect(existsSync(join(dir, 'c.nii'))).toBe(false);
  });

  it('exits 3 for a missing liver file and 2 for a missing option', () => {
    const missing = falciform('--liver', join(dir, 'nope.nii'), '--landmarks', join(dir, 'landmarks.json'), '--out', join(dir, 'd.nii'));
    expect(missing.code).toBe(3);
    expect(missing.stderr).toMatch(/nope\.nii: cannot be read/);
    const usage = falciform('--liver', join(dir, 'liver.nii.gz'), '--out', join(dir, 'd.nii'));
    expect(usage.code).toBe(2);
    expect(usage.stderr).toMatch(/--landmarks is required/);
  });

  it('prints a readable summary without --json', () => {
    const r = falciform('--liver', join(dir, 'liver.nii.gz'), '--landmarks', join(dir, 'landmarks.json'), '--out', join(dir, 'e.nii.gz'));
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^VIII\s+\d+\.\d$/m);
    expect(r.stdout).toMatch(/^liver\s+\d+\.\d$/m);
    expect(r.stderr).toMatch(/^warning: .*segment I is left out/m);
  });
});
