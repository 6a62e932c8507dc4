// `falciform inspect` and `falciform convert` on DICOM as a user runs them (node bin/falciform.js).
// The converted NIfTI is read back by nibabel (run live, tests/reference/nifti_facts.py) and compared
// with the volume pydicom wrote the series from; geometry rules: DICOM PS3.3 C.7.6.2.1.1.
// Exit codes and output fields: docs/contracts.md and docs/formats.md.
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { diskFiles } from '../../src/cli/patient.js';
import { loadVolume } from '../../src/cli/node-io.js';
import { python, tempDir, type NibabelFacts } from '../volume/nifti-fixtures.js';
import { ensureBuilt, expectSameInWorld, falciform, writeSeries, type SeriesFixture } from './fixtures.js';

let dir: string;
let fx: SeriesFixture;

beforeAll(() => {
  ensureBuilt();
  dir = tempDir('dcm-cli');
  fx = writeSeries(dir, 'good');
}, 240_000);

describe('falciform inspect / convert on DICOM', () => {
  it('inspect --json gives the NIfTI fields, the header facts and every series with why it was or was not taken', () => {
    const r = falciform('inspect', fx.folder, '--json');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(Object.keys(out).slice(0, 9)).toEqual(['file', 'format', 'dims', 'spacingMm', 'datatype', 'affine', 'affineSource', 'min', 'max']);
    expect(out.format).toBe('DICOM');
    expect(out.dims).toEqual(fx.dims);
    expect(out.spacingMm).toEqual([0.7, 0.9, 2.5]);
    out.affine.slice(0, 3).flat().forEach((x: number, n: number) => expect(x).toBeCloseTo(fx.affine.flat()[n], 5));
    expect(out.study).toMatchObject({ date: '2026-03-14', modality: 'CT', seriesDescription: 'Portal venous', kvp: 120, manufacturerModel: 'Phantom 1' });
    expect(out.series).toHaveLength(2);
    expect(out.series.find((s: { taken: boolean }) => s.taken)).toMatchObject({ uid: fx.seriesUid, slices: 20, why: 'the only volumetric series' });
    expect(out.series.find((s: { taken: boolean }) => !s.taken)).toMatchObject({ slices: 1, why: 'a localizer (ImageType LOCALIZER)' });
  });

  it('convert writes the series as NIfTI that nibabel reads with the same world geometry and values', async () => {
    const out = join(dir, 'scan.nii.gz');
    const r = falciform('convert', fx.folder, '--out', out);
    expect(r.code).toBe(0);
    const [ref] = python<NibabelFacts[]>('nifti_facts.py', [out]);
    expect(ref.dims).toEqual(fx.dims);
    ref.bestAffine.slice(0, 3).flat().forEach((x, n) => expect(x).toBeCloseTo(fx.affine.flat()[n], 4));
    expect([ref.values!.min, ref.values!.max]).toEqual([-1024, 1975]);
    expect(expectSameInWorld((await loadVolume(out)).volume, (await loadVolume(fx.original)).volume)).toBe(32 * 28 * 20);
  });

  it('--series picks a series; one that cannot be the scan is refused with exit 3 naming it', () => {
    expect(falciform('convert', fx.folder, '--out', join(dir, 'b.nii.gz'), '--series', fx.seriesUid).code).toBe(0);
    const loc = JSON.parse(falciform('inspect', fx.folder, '--json').stdout).series.find((s: { taken: boolean }) => !s.taken).uid;
    const r = falciform('convert', fx.folder, '--out', join(dir, 'c.nii.gz'), '--series', loc);
    expect(r.code).toBe(3);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain(`(${loc}) cannot be the scan: a localizer`);
    const none = falciform('inspect', fx.folder, '--series', '1.2.3');
    expect(none.code).toBe(3);
    expect(none.stderr).toContain('no series 1.2.3 among the 2 found');
  });

  it('a bad series gives exit 3 with one line naming the series and the slice', () => {
    const bad = writeSeries(tempDir('dcm-cli-missing'), 'missing');
    const r = falciform('convert', bad.folder, '--out', join(dir, 'm.nii.gz'));
    expect(r.code).toBe(3);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain(bad.seriesUid);
    expect(r.stderr).toMatch(/slice\(s\) missing between/);
  });

  it("a manifest visit's scan may name a DICOM folder", async () => {
    const source = diskFiles(join(dir, 'manifest.json'));
    const scan = await source.volume('dicom');
    expect(expectSameInWorld(scan.volume, (await loadVolume(fx.original)).volume)).toBe(32 * 28 * 20);
  });
});
