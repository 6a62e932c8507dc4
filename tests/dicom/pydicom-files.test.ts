// Falciform's DICOM file decoding against pydicom 2.x (Debian's python3-pydicom) on pydicom's own
// shipped test files, run live (tests/reference/dicom_facts.py): for every file pydicom decodes, the
// same values (pixel_array × RescaleSlope + RescaleIntercept, PS3.3 C.11.1.1.2 / C.7.6.16.2.9) and the
// same Image Plane values (PS3.3 C.7.6.2); a transfer syntax we do not decode (PS3.5 section 10) is
// refused by name. Files pydicom itself cannot decode are not compared there; the JPEG-LS Lossless and
// JPEG 2000 Lossless files (pydicom has no decoder for them without plugins) are compared with their
// uncompressed twin as pydicom reads it, and the lossy syntaxes (PS3.5 A.4.3 near-lossless JPEG-LS,
// A.4.4 JPEG 2000) are refused by name, also when a file mislabels a lossy code stream as lossless.
import { spawnSync } from 'node:child_process';
import { readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { nodeDecodeImage, nodeInflateRaw } from '../../src/cli/dicom-io.js';
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
        const stored = await decodeFrame(parsed, f, { decodeImage: nodeDecodeImage });
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

  it('a possibly lossy JPEG 2000 file is refused with exit 3 naming the file and the transfer syntax in words', () => {
    ensureBuilt();
    const file = join(PYDICOM_DATA, '693_J2KI.dcm');
    const r = falciform('convert', file, '--out', join(tempDir('j2k'), 'x.nii.gz'));
    expect(r.code).toBe(3);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain(file);
    expect(r.stderr).toContain('JPEG 2000 Image Compression, possibly lossy, which Falciform does not decode');
  });
});

async function decodeAll(file: string): Promise<{ values: Float64Array; info: Awaited<ReturnType<typeof parseDicomFile>>['info'] }> {
  const parsed = await parseDicomFile(new Uint8Array(readFileSync(file)), file, nodeInflateRaw, 1 << 30);
  const plane = parsed.info.frames[0];
  const stored = await decodeFrame(parsed, 0, { decodeImage: nodeDecodeImage });
  return { values: Float64Array.from(stored, (x) => x * plane.slope + plane.inter), info: parsed.info };
}

function firstMismatch(a: ArrayLike<number>, b: ArrayLike<number>): number {
  if (a.length !== b.length) return -2;
  for (let n = 0; n < a.length; n++) if (a[n] !== b[n]) return n;
  return -1;
}

describe('JPEG-LS Lossless and JPEG 2000 Lossless (PS3.5 A.4.3, A.4.4) through the WebAssembly decoders', () => {
  for (const [compressed, twin] of [['MR_small_jpeg_ls_lossless.dcm', 'MR_small.dcm'], ['MR_small_jp2klossless.dcm', 'MR_small.dcm']]) {
    it(`${compressed} equals its uncompressed twin ${twin} as pydicom reads it, voxel for voxel`, async () => {
      const ref = facts.find((f) => f.file === join(PYDICOM_DATA, twin))!;
      expect(ref.decoded).toBe(true);
      const expected = new Float64Array(new Uint8Array(readFileSync(ref.values!)).buffer);
      const ours = await decodeAll(join(PYDICOM_DATA, compressed));
      expect(ours.values.length).toBe(64 * 64);
      expect(firstMismatch(ours.values, expected)).toBe(-1);
      expect(ours.info.pixel).toMatchObject({ bitsAllocated: 16, signed: true });
      expect(ours.info.frames[0].positionLps ?? null).toEqual(ref.position);
      expect(ours.info.frames[0].orientation ?? null).toEqual(ref.orientation);
    });
  }

  it('J2K_pixelrep_mismatch.dcm (signed 13-bit CT whose code stream says unsigned) gives pydicom\'s published values', async () => {
    // Expected values from pydicom's own test of this file (test_pylibjpeg.py, test_pixel_rep_mismatch,
    // shipped by Debian's python3-pydicom): the header's Pixel Representation rules, the 13 stored bits
    // sign-extended.
    const { values } = await decodeAll(join(PYDICOM_DATA, 'J2K_pixelrep_mismatch.dcm'));
    const at = (row: number, col: number) => values[row * 512 + col];
    expect(at(0, 0)).toBe(-2000);
    expect([...Array(10).keys()].map((n) => at(47 + n, 279))).toEqual([621, 412, 138, -193, -520, -767, -907, -966, -988, -995]);
    expect([...Array(10).keys()].map((n) => at(328 + n, 106))).toEqual([-377, -121, 141, 383, 633, 910, 1198, 1455, 1638, 1732]);
  });

  it('lossy syntaxes are refused by name, and a lossy code stream labelled lossless is refused naming its coding', async () => {
    const dir = tempDir('lossy');
    const mr = join(PYDICOM_DATA, 'MR_small.dcm');
    const made: Record<string, string> = {};
    // GDCM's gdcmconv (Debian's libgdcm-tools) writes near-lossless JPEG-LS (.81), lossy JPEG 2000 (.91)
    // and lossy JPEG Extended (.51) from the same MR image.
    for (const [name, args] of [['ls81.dcm', ['--jpegls', '--lossy', '-e', '2']], ['j2k91.dcm', ['--j2k', '--lossy', '--irreversible', '-q', '30']], ['jpeg51.dcm', ['--jpeg', '--lossy', '-q', '90']]] as const) {
      made[name] = join(dir, name);
      const r = spawnSync('gdcmconv', [...args, mr, made[name]], { encoding: 'utf8' });
      expect(r.status, r.stderr).toBe(0);
    }
    ensureBuilt();
    for (const [file, words] of [
      [made['ls81.dcm'], 'JPEG-LS Lossy (Near-Lossless)'],
      [made['j2k91.dcm'], 'JPEG 2000 Image Compression, possibly lossy'],
      [made['jpeg51.dcm'], 'JPEG Extended (Process 2 and 4), a lossy compression'],
    ]) {
      const r = falciform('inspect', file, '--json');
      expect(r.code, file).toBe(3);
      expect(r.stderr).toContain(file);
      expect(r.stderr).toContain(`${words}, which Falciform does not decode`);
    }
    // The same code streams relabelled as the lossless syntaxes (".81" → ".80", ".91" → ".90" in the file
    // meta): the code stream itself says lossy (JPEG-LS NEAR > 0, the irreversible 9-7 wavelet), so the
    // frame is refused, never taken as exact.
    for (const [name, from, to, coding] of [['ls81.dcm', '1.2.840.10008.1.2.4.81', '1.2.840.10008.1.2.4.80', /coded lossy \(NEAR=2\)/], ['j2k91.dcm', '1.2.840.10008.1.2.4.91', '1.2.840.10008.1.2.4.90', /coded lossy \(irreversible 9-7 wavelet\)/]] as const) {
      const bytes = new Uint8Array(readFileSync(made[name]));
      const text = new TextDecoder('latin1').decode(bytes);
      const at = text.indexOf(from);
      expect(at).toBeGreaterThan(128);
      bytes.set(new TextEncoder().encode(to), at);
      const relabelled = join(dir, `relabelled-${name}`);
      writeFileSync(relabelled, bytes);
      const parsed = await parseDicomFile(bytes, relabelled, nodeInflateRaw, 1 << 30);
      const e = await decodeFrame(parsed, 0, { decodeImage: nodeDecodeImage }).then(() => null, (x: unknown) => x as Error);
      expect(e?.message).toMatch(coding);
      expect(e?.message.startsWith(`${relabelled}: `)).toBe(true);
    }
  });
});
