// `falciform liver` and `falciform lesion` as a user runs them (the compiled bin script), on the
// invented phantom of bench/abdomen-phantom.ts written with the project's NIfTI writer.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makePhantom, SHAPES } from '../../bench/abdomen-phantom.js';
import { loadVolume, saveVolume } from '../../src/cli/node-io.js';
import { makeVolume } from '../../src/volume/volume.js';

const BIN = join(process.cwd(), 'bin', 'falciform.js');
const run = (...args: string[]) => {
  const r = spawnSync(process.execPath, [BIN, ...args], { encoding: 'utf8' });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
};
const phantom = makePhantom([180, 150, 80], [1.5, 1.5, 2.5]);
const pt = (p: readonly number[]) => p.join(',');

describe('falciform liver and falciform lesion (source: contracts.md, command line)', () => {
  let dir = '';
  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'falciform-grow-'));
    await saveVolume(join(dir, 'scan.nii.gz'), makeVolume(phantom.dims, phantom.scan, phantom.affine, 'int16'), 'int16');
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('writes a liver mask on the scan grid and prints its volume and settings', async () => {
    const r = run('liver', '--scan', join(dir, 'scan.nii.gz'), '--seed', pt(phantom.liverSeedMm), '--out', join(dir, 'liver.nii.gz'), '--json');
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    const mask = (await loadVolume(join(dir, 'liver.nii.gz'))).volume;
    expect(mask.dims).toEqual(phantom.dims);
    mask.affine.forEach((x, n) => expect(x).toBeCloseTo(phantom.affine[n], 5));
    let count = 0, both = 0, truth = 0;
    for (let n = 0; n < phantom.liver.length; n++) {
      count += mask.data[n];
      truth += phantom.liver[n];
      if (mask.data[n] && phantom.liver[n]) both++;
    }
    expect(out.voxels).toBe(count);
    expect(out.volumeMl).toBeCloseTo((count * 1.5 * 1.5 * 2.5) / 1000, 3);
    expect((2 * both) / (count + truth)).toBeGreaterThanOrEqual(0.98);
    expect(out.params.openingMm).toBe(5);
    expect(out.params.window).toHaveLength(2);
  });

  it('grows the lesion inside that liver and measures it', () => {
    const r = run('lesion', '--scan', join(dir, 'scan.nii.gz'), '--liver', join(dir, 'liver.nii.gz'), '--seed', pt(SHAPES.lesion.c),
      '--out', join(dir, 'lesion.nii.gz'), '--json');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.kind).toBe('hypodense');
    // A 15 mm ball (invented): 1.767 mL, longest axial diameter about 15 mm.
    expect(out.lesion.volumeMl).toBeGreaterThan(1.4);
    expect(out.lesion.volumeMl).toBeLessThan(2.1);
    expect(out.lesion.longestAxialMm).toBeGreaterThan(12);
    expect(out.lesion.longestAxialMm).toBeLessThan(18);
    expect(existsSync(join(dir, 'lesion.nii.gz'))).toBe(true);
  });

  it('exits 3 with one line for a seed outside the scan or a missing file, 2 for a malformed seed', () => {
    const outside = run('liver', '--scan', join(dir, 'scan.nii.gz'), '--seed', '900,0,0', '--out', join(dir, 'x.nii.gz'));
    expect(outside.code).toBe(3);
    expect(outside.stderr.trim().split('\n')).toHaveLength(1);
    expect(outside.stderr).toMatch(/liver seed.*outside the scan/);
    expect(existsSync(join(dir, 'x.nii.gz'))).toBe(false);
    const missing = run('lesion', '--scan', join(dir, 'nope.nii.gz'), '--liver', join(dir, 'liver.nii.gz'), '--seed', '0,0,0', '--out', join(dir, 'y.nii.gz'));
    expect(missing.code).toBe(3);
    expect(missing.stderr).toMatch(/nope\.nii\.gz: cannot be read: no such file/);
    expect(run('liver', '--scan', join(dir, 'scan.nii.gz'), '--seed', '1,2', '--out', join(dir, 'x.nii.gz')).code).toBe(2);
    expect(run('lesion', '--scan', join(dir, 'scan.nii.gz'), '--seed', '1,2,3', '--out', join(dir, 'x.nii.gz')).code).toBe(2);
  });
});

describe('a manifest visit with liverSeedMm instead of a liver mask (falciform followup)', () => {
  let dir = '';
  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'falciform-seeded-'));
    await saveVolume(join(dir, 'scan.nii.gz'), makeVolume(phantom.dims, phantom.scan, phantom.affine, 'int16'), 'int16');
    await saveVolume(join(dir, 'liver.nii.gz'), makeVolume(phantom.dims, phantom.liver, phantom.affine, 'uint8'), 'uint8');
    // Invented landmark positions for the phantom liver.
    const points = {
      ivc_superior: [20, -30, 60], ivc_inferior: [20, -30, -20], right_hepatic_vein: [80, -15, 55],
      middle_hepatic_vein: [30, 10, 60], umbilical_fissure: [-5, 30, 40], portal_bifurcation: [25, 0, 15],
    };
    writeFileSync(join(dir, 'landmarks.json'), JSON.stringify({ space: 'RAS', units: 'mm', points }));
    writeFileSync(join(dir, 'marks.json'), JSON.stringify({ space: 'RAS', units: 'mm', marks: [{ id: 'M1', centreMm: SHAPES.lesion.c, longestAxialMm: 15, shortAxisMm: 15 }] }));
    const visit = { date: '2026-01-12', scan: 'scan.nii.gz', landmarks: 'landmarks.json', marks: 'marks.json' };
    const manifest = (liver: Record<string, unknown>) => ({ patient: { id: 'PH-1' }, visits: [{ id: 'v1', ...visit, ...liver }] });
    writeFileSync(join(dir, 'seeded.json'), JSON.stringify(manifest({ liverSeedMm: phantom.liverSeedMm })));
    writeFileSync(join(dir, 'masked.json'), JSON.stringify(manifest({ liver: 'liver.nii.gz' })));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('grows the liver and places the lesion in the same segment as with the true liver mask', () => {
    const seeded = run('followup', join(dir, 'seeded.json'), '--json');
    const masked = run('followup', join(dir, 'masked.json'), '--json');
    expect(seeded.code).toBe(0);
    expect(masked.code).toBe(0);
    const a = JSON.parse(seeded.stdout), b = JSON.parse(masked.stdout);
    expect(a.tracks[0].segments.v1).toBe(b.tracks[0].segments.v1);
    expect(a.tracks[0].segments.v1).not.toBeNull();
  });
});
