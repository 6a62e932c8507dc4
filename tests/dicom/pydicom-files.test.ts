// Falciform's DICOM file decoding against pydicom 2.x (Debian's python3-pydicom) on pydicom's own
// shipped test files, run live (tests/reference/dicom_facts.py): for every file pydicom decodes, the
// same values (pixel_array × RescaleSlope + RescaleIntercept, PS3.3 C.11.1.1.2 / C.7.6.16.2.9) and the
// same Image Plane values (PS3.3 C.7.6.2); a transfer syntax we do not decode (PS3.5 section 10) is
// refused by name. Files pydicom itself cannot decode are not compared.
import { spawnSync } from 'node:child_process';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { nodeInflateRaw } from '../../src/cli/dicom-io.js';
import { isDicomPart10, parseDicomFile } from '../../src/dicom/parse.js';
import { decodeFrame, pixelProblem } from '../../src/dicom/pixels.js';
import { tempDir } from '../volume/nifti-fixtures.js';
import { ensureBuilt, falciform, PYDICOM_DATA, root } from './fixtures.js';

interface PydicomFacts {
  file: string;
  decoded: boolean;
  syntax: string | null;
  samplesPerPixel: number;
  bitsAllocated: number;
  frames: number;
  position: number[] | null;
  orientation: number[] | null;
  pixelSpacing: number[] | null;
  slope: number;
  inter: number;
  shape?: number[];
  values?: string;
}

const files = readdirSync(PYDICOM_DATA).filter((f) => f.endsWith('.dcm')).sort().map((f) => join(PYDICOM_DATA, f));
let facts: PydicomFacts[] = [];

beforeAll(() => {
  const out = tempDir('pydicom');
  const r = spawnSync('/usr/bin/python3', [join(root, 'tests/reference/dicom_facts.py'), out, ...files], { encoding: 'utf8', maxBuffer: 64 << 20 });
  if (r.status !== 0) throw new Error(r.stderr);
  facts = JSON.parse(r.stdout) as PydicomFacts[];
}, 60_000);

describe('DICOM files against pydicom', () => {
  it('every grey-scale file pydicom decodes gives the same values and image plane, or is refused by its transfer syntax', async () => {
    const compared: string[] = [];
    const refused: string[] = [];
    for (const ref of facts.filter((f) => f.decoded && f.samplesPerPixel === 1 && f.bitsAllocated >= 8)) {
      const bytes = new Uint8Array(readFileSync(ref.file));
      if (!isDicomPart10(bytes)) continue;
      const parsed = await parseDicomFile(bytes, ref.file, nodeInflateRaw, 1 << 30);
      const problem = pixelProblem(parsed.info);
      if (problem) {
        // The refusal names the transfer syntax in words (PS3.5 / PS3.6 names).
        expect(problem).toMatch(/is stored in JPEG/);
        refused.push(ref.file);
        continue;
      }
      expect(parsed.info.numberOfFrames).toBe(ref.frames);
      const expected = new Float64Array(new Uint8Array(readFileSync(ref.values!)).buffer);
      const perFrame = expected.length / ref.frames;
      for (let f = 0; f < ref.frames; f++) {
        const plane = parsed.info.frames[f];
        const stored = decodeFrame(parsed, f);
        expect(stored.length).toBe(perFrame);
        let mismatch = -1;
        for (let n = 0; n < perFrame; n++) {
          if (stored[n] * plane.slope + plane.inter !== expected[f * perFrame + n]) { mismatch = n; break; }
        }
        expect(mismatch, `${ref.file} frame ${f + 1}`).toBe(-1);
      }
      const first = parsed.info.frames[0];
      expect(first.positionLps ?? null).toEqual(ref.position);
      expect(first.orientation ?? null).toEqual(ref.orientation);
      expect(first.pixelSpacingMm ?? null).toEqual(ref.pixelSpacing);
      expect([first.slope, first.inter]).toEqual([ref.slope, ref.inter]);
      compared.push(ref.file.split('/').pop()!);
    }
    // The comparison covered each syntax we decode: explicit/implicit little endian, big endian,
    // deflated, RLE, and multi-frame files.
    expect(compared).toEqual(expect.arrayContaining([
      'CT_small.dcm', 'MR_small.dcm', 'MR_small_implicit.dcm', 'MR_small_bigendian.dcm', 'MR_small_expb.dcm',
      'MR_small_RLE.dcm', 'image_dfl.dcm', 'rtdose.dcm', 'rtdose_rle.dcm', 'rtdose_expb.dcm', 'MR_small_padded.dcm',
    ]));
    expect(refused.map((f) => f.split('/').pop())).toEqual(expect.arrayContaining(['MR_small_jp2klossless.dcm']));
  });

  it('a truncated file gives exit 3 with one line naming it (pydicom cannot decode it either)', () => {
    ensureBuilt();
    const file = join(PYDICOM_DATA, 'MR_truncated.dcm');
    expect(facts.find((f) => f.file === file)?.decoded).toBe(false);
    const r = falciform('inspect', file, '--json');
    expect(r.code).toBe(3);
    expect(r.stdout).toBe('');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain(file);
    expect(r.stderr).toMatch(/cut short/);
  });

  it('a JPEG 2000 file is refused with exit 3 naming the file and the transfer syntax in words', () => {
    const file = join(PYDICOM_DATA, 'MR_small_jp2klossless.dcm');
    const r = falciform('convert', file, '--out', join(tempDir('j2k'), 'x.nii.gz'));
    expect(r.code).toBe(3);
    expect(r.stderr).toContain(file);
    expect(r.stderr).toContain('JPEG 2000 Image Compression (Lossless Only)');
  });
});
