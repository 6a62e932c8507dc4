// DICOM series read into one volume, checked against the volume pydicom wrote them from (an oblique,
// anisotropic affine; file names shuffled; InstanceNumber reversed; a localizer beside it) and against
// Debian's dcm2niix converting the same folder, run live. Geometry rules: DICOM PS3.3 C.7.6.2.1.1
// (Image Position/Orientation Patient, Pixel Spacing, LPS patient axes) and C.7.6.16 (per-frame
// functional groups); transfer syntaxes: PS3.5 section 10, A.5 (deflated), Annex G (RLE), A.4.3
// (JPEG-LS Lossless) and A.4.4 (JPEG 2000 Lossless Only), the last two written by GDCM's gdcmconv.
import { spawnSync } from 'node:child_process';
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadDicom } from '../../src/cli/dicom-io.js';
import { loadVolume } from '../../src/cli/node-io.js';
import { transformPoint } from '../../src/geometry/mat4.js';
import { isFalciformError } from '../../src/errors.js';
import { tempDir } from '../volume/nifti-fixtures.js';
import { expectSameInWorld, writeSeries } from './fixtures.js';

async function refusal(folder: string): Promise<string> {
  try {
    await loadDicom(folder);
  } catch (e) {
    if (isFalciformError(e)) return e.message;
    throw e;
  }
  throw new Error(`${folder} was read without complaint`);
}

describe('a DICOM series against the volume it was written from', () => {
  it('equals the original voxel for voxel in world space, takes the series and not the localizer', async () => {
    const fx = writeSeries(tempDir('dcm-good'), 'good');
    const loaded = await loadDicom(fx.folder);
    const original = (await loadVolume(fx.original)).volume;
    expect(loaded.volume.dims).toEqual(fx.dims);
    expect(expectSameInWorld(loaded.volume, original)).toBe(32 * 28 * 20);
    // The affine itself, not only the sampling: the generator's RAS affine.
    const rows = [0, 1, 2].map((r) => loaded.volume.affine.slice(4 * r, 4 * r + 4));
    rows.forEach((row, r) => row.forEach((x, c) => expect(x).toBeCloseTo(fx.affine[r][c], 6)));
    expect(loaded.chosen.uid).toBe(fx.seriesUid);
    const localizer = loaded.series.find((s) => s.uid !== fx.seriesUid);
    expect(localizer?.taken).toBe(false);
    expect(localizer?.why).toMatch(/localizer/);
    expect(loaded.facts).toMatchObject({ studyDate: '2026-03-14', modality: 'CT', kvp: 120, contrastAgent: 'IODINE', sliceThicknessMm: 2.5, patientId: 'SYN-0042' });
  });

  for (const syntax of ['implicit', 'bigendian', 'deflated', 'rle', 'jpegls', 'j2k']) {
    it(`reads the same series stored in ${syntax} transfer syntax`, async () => {
      const fx = writeSeries(tempDir(`dcm-${syntax}`), 'good', syntax);
      const loaded = await loadDicom(fx.folder);
      const original = (await loadVolume(fx.original)).volume;
      expect(expectSameInWorld(loaded.volume, original)).toBe(32 * 28 * 20);
    });
  }

  it('reads an enhanced multi-frame CT file through its per-frame functional groups (frames shuffled)', async () => {
    const fx = writeSeries(tempDir('dcm-enh'), 'enhanced');
    const loaded = await loadDicom(fx.folder);
    const original = (await loadVolume(fx.original)).volume;
    expect(expectSameInWorld(loaded.volume, original)).toBe(32 * 28 * 20);
  });

  it('reads an enhanced multi-frame CT file compressed as JPEG 2000 Lossless, frame by frame', async () => {
    const fx = writeSeries(tempDir('dcm-enh-j2k'), 'enhanced', 'j2k');
    const loaded = await loadDicom(fx.folder);
    const original = (await loadVolume(fx.original)).volume;
    expect(expectSameInWorld(loaded.volume, original)).toBe(32 * 28 * 20);
  });

  it('slices with different rescale intercepts become one float32 volume of physical values', async () => {
    const fx = writeSeries(tempDir('dcm-rescale'), 'rescale');
    const loaded = await loadDicom(fx.folder);
    expect(loaded.volume.datatype).toBe('float32');
    expect(expectSameInWorld(loaded.volume, (await loadVolume(fx.original)).volume)).toBe(32 * 28 * 20);
  });

  it('agrees with dcm2niix (Debian, run live) converting the same folder', async () => {
    const dir = tempDir('dcm-d2n');
    const fx = writeSeries(dir, 'good');
    const out = join(dir, 'd2n');
    spawnSync('mkdir', ['-p', out]);
    const r = spawnSync('dcm2niix', ['-z', 'y', '-b', 'n', '-f', 'series%s', '-o', out, fx.folder], { encoding: 'utf8' });
    expect(r.status).toBe(0);
    const converted = readdirSync(out).filter((f) => f.startsWith('series2') && f.endsWith('.nii.gz'));
    expect(converted).toHaveLength(1);
    const theirs = (await loadVolume(join(out, converted[0]))).volume;
    const ours = (await loadDicom(fx.folder)).volume;
    expect(expectSameInWorld(ours, theirs, 2e-3)).toBe(32 * 28 * 20);
    expect(expectSameInWorld(theirs, ours, 2e-3)).toBe(32 * 28 * 20);
  });
});

describe('bad series', () => {
  it('a missing slice is refused naming the series and the files either side', async () => {
    const fx = writeSeries(tempDir('dcm-missing'), 'missing');
    const msg = await refusal(fx.folder);
    expect(msg).toContain(fx.seriesUid);
    expect(msg).toMatch(/1 slice\(s\) missing between \S+ and \S+ \(gap 5 mm where the others are 2\.5 mm\)/);
  });

  it('two slices at one position are refused naming both files', async () => {
    const fx = writeSeries(tempDir('dcm-dup'), 'duplicate');
    const msg = await refusal(fx.folder);
    expect(msg).toContain(fx.seriesUid);
    expect(msg).toMatch(new RegExp(`${fx.folder}/\\w+ and ${fx.folder}/\\w+ lie at the same position`));
  });

  it('two orientations in one series are kept apart with a warning naming the series', async () => {
    const fx = writeSeries(tempDir('dcm-orient'), 'two-orientations');
    const loaded = await loadDicom(fx.folder);
    expect(loaded.volume.dims).toEqual([32, 28, 17]);
    expect(loaded.chosen.id).toBe(`${fx.seriesUid}:1`);
    expect(loaded.warnings.join('\n')).toMatch(new RegExp(`\\(${fx.seriesUid.replace(/\./g, '\\.')}\\) holds images of 2 different orientations`));
    expect(loaded.series.filter((s) => s.uid === fx.seriesUid).map((s) => s.slices)).toEqual([17, 3]);
  });

  it('a file that is not DICOM in the folder is ignored with a warning naming it', async () => {
    const fx = writeSeries(tempDir('dcm-junk'), 'junk');
    const loaded = await loadDicom(fx.folder);
    expect(loaded.warnings.join('\n')).toMatch(new RegExp(`1 file\\(s\\) are not DICOM and were ignored: ${fx.folder}/\\w+`));
    expect(expectSameInWorld(loaded.volume, (await loadVolume(fx.original)).volume)).toBe(32 * 28 * 20);
  });

  it('gantry tilt is warned about and each slice kept at its recorded position (sheared affine)', async () => {
    const fx = writeSeries(tempDir('dcm-tilt'), 'tilt');
    const loaded = await loadDicom(fx.folder);
    expect(loaded.warnings.join('\n')).toMatch(/sheared by 9\.09° \(gantry tilt\)/);
    // Slice k's first voxel sits where the generator put ImagePositionPatient: origin + k·(slice step +
    // 0.4 mm along the column direction), in RAS.
    const a = fx.affine;
    const colDir = [0, 1, 2].map((r) => a[r][1] / 0.9);
    for (const k of [0, 7, 19]) {
      const w = transformPoint(loaded.volume.affine, [0, 0, k]);
      const expected = [0, 1, 2].map((r) => a[r][3] + k * a[r][2] + 0.4 * k * colDir[r]);
      w.forEach((x, r) => expect(x).toBeCloseTo(expected[r], 4));
    }
  });
});
