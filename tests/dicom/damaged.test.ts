// Damaged DICOM files (pydicom's shipped test files, cut short or with bytes changed, seeded so a
// failure reproduces; the JPEG-LS and JPEG 2000 ones through the WebAssembly decoders): every header
// parse and frame decode ends in a result or a FalciformError naming the file, never a bare exception
// from the parsing library or a codec. Project rule: docs/contracts.md (bad input).
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { nodeDecodeImage, nodeInflateRaw } from '../../src/cli/dicom-io.js';
import { parseDicomFile } from '../../src/dicom/parse.js';
import { decodeFrame } from '../../src/dicom/pixels.js';
import { readDicom } from '../../src/dicom/read.js';
import { isFalciformError } from '../../src/errors.js';
import { PYDICOM_DATA } from './fixtures.js';

const FILES = ['CT_small.dcm', 'MR_small_RLE.dcm', 'image_dfl.dcm', 'MR_small_bigendian.dcm', 'MR_small_implicit.dcm', 'rtdose_rle.dcm', 'MR_small_jpeg_ls_lossless.dcm', 'MR_small_jp2klossless.dcm'];
const CASES = 80;

function prng(seed: number) {
  let s = seed >>> 0;
  return (n: number) => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s % n;
  };
}

function damage(bytes: Uint8Array, rand: (n: number) => number): Uint8Array {
  if (rand(2) === 0) return bytes.slice(0, 132 + rand(bytes.length - 132));
  const out = bytes.slice();
  for (let n = 1 + rand(8); n > 0; n--) out[132 + rand(out.length - 132)] = rand(256);
  return out;
}

describe('damaged DICOM files', () => {
  for (const name of FILES) {
    it(`${name}: ${CASES} damaged copies each end in a result or a typed error naming the file`, async () => {
      const original = new Uint8Array(readFileSync(join(PYDICOM_DATA, name)));
      const rand = prng(20261202 + name.length);
      let typed = 0;
      let results = 0;
      for (let c = 0; c < CASES; c++) {
        const bytes = damage(original, rand);
        const file = `${name}#${c}`;
        try {
          const parsed = await parseDicomFile(bytes, file, nodeInflateRaw, 1 << 26);
          for (let f = 0; f < parsed.info.numberOfFrames; f++) await decodeFrame(parsed, f, { decodeImage: nodeDecodeImage });
          results++;
        } catch (e) {
          expect(isFalciformError(e), `${file}: ${String(e)}`).toBe(true);
          expect((e as Error).message.startsWith(`${file}: `)).toBe(true);
          typed++;
        }
        // The whole reader too: a single image is refused, but always with a typed error.
        const whole = await readDicom([{ name: file, bytes: async () => bytes }], file, { inflateRaw: nodeInflateRaw, decodeImage: nodeDecodeImage }).then(() => null, (e: unknown) => e);
        if (whole !== null) expect(isFalciformError(whole), `${file}: ${String(whole)}`).toBe(true);
      }
      expect(typed + results).toBe(CASES);
      expect(typed).toBeGreaterThan(0);
    });
  }
});
