// A second, independent NIfTI reader, nifti-reader-js (the design's NIfTI package, its own parser and
// inflater), reads the same headers as ours: every NIfTI image in nibabel's own test data (Debian
// python3-nibabel), the files nibabel writes in tests/reference/nifti_make.py, and files our writer
// makes. Dims, pixdim, datatype, byte order, qform/sform codes, sform rows and the quaternion must agree.
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import * as nifti from 'nifti-reader-js';
import { beforeAll, describe, expect, it } from 'vitest';
import { saveVolume } from '../../src/cli/node-io.js';
import { qformToAffine } from '../../src/volume/nifti-affine.js';
import { DATATYPE_CODES } from '../../src/volume/nifti-datatype.js';
import { parseNiftiHeader, type NiftiInfo } from '../../src/volume/nifti-read.js';
import { makeVolume } from '../../src/volume/volume.js';
import { NIBABEL_DATA, python, tempDir } from './nifti-fixtures.js';

const NIFTI_NAME = /\.(nii|nii\.gz|hdr)$/;

/** Both readers on one file's bytes: ours through parseNiftiHeader, theirs through readHeader. */
function bothReaders(path: string): { ours: NiftiInfo; theirs: nifti.NIFTI1 | nifti.NIFTI2 } | null {
  const file = readFileSync(path);
  let ab = file.buffer.slice(file.byteOffset, file.byteOffset + file.byteLength) as ArrayBuffer;
  if (nifti.isCompressed(ab)) ab = nifti.decompress(ab) as ArrayBuffer;
  if (!nifti.isNIFTI(ab, true)) return null;
  return { ours: parseNiftiHeader(new Uint8Array(ab), path).info, theirs: nifti.readHeader(ab, true) };
}

function sameNumbers(a: readonly number[], b: readonly number[], tol = 0) {
  expect(a.length).toBe(b.length);
  a.forEach((x, n) => {
    const ok = tol === 0 ? Object.is(x, b[n]) || x === b[n] : Math.abs(x - b[n]) <= tol * Math.max(1, Math.abs(b[n]));
    if (!ok) throw new Error(`element ${n}: ours ${x}, nifti-reader-js ${b[n]}`);
  });
}

function agree(path: string) {
  const read = bothReaders(path);
  if (!read) throw new Error(`${path}: nifti-reader-js does not take it for NIfTI`);
  const { ours, theirs } = read;
  expect(ours.format).toBe(theirs instanceof nifti.NIFTI2 ? 'NIfTI-2' : 'NIfTI-1');
  expect(ours.dims).toEqual(theirs.dims.slice(1, theirs.dims[0] + 1));
  expect(DATATYPE_CODES[ours.datatype]).toBe(theirs.datatypeCode);
  expect(ours.littleEndian).toBe(theirs.littleEndian);
  sameNumbers(ours.stored.pixdim, theirs.pixDims);
  expect(ours.qformCode).toBe(theirs.qform_code);
  expect(ours.sformCode).toBe(theirs.sform_code);
  sameNumbers(ours.stored.quatern, [theirs.quatern_b, theirs.quatern_c, theirs.quatern_d]);
  sameNumbers(ours.stored.qoffset, [theirs.qoffset_x, theirs.qoffset_y, theirs.qoffset_z]);
  // nifti-reader-js keeps one affine: the srow for NIfTI-2, and for NIfTI-1 the qform when its code
  // is the higher of the two, else the srow when set, else pixdim alone.
  const nifti1QformWins = theirs instanceof nifti.NIFTI1 && theirs.qform_code > 0 && theirs.sform_code < theirs.qform_code;
  const theirAffine = theirs.affine.flat();
  if (!nifti1QformWins && theirs.sform_code > 0) {
    sameNumbers(ours.stored.srow.flat(), theirAffine.slice(0, 12));
    if (ours.affineSource === 'sform') sameNumbers(ours.affine, theirAffine);
  } else if (nifti1QformWins) {
    // Their quaternion arithmetic against ours (nifti1.h method 2), on the same stored fields.
    const [b, c, d] = ours.stored.quatern, [x, y, z] = ours.stored.qoffset, p = ours.stored.pixdim;
    if (b * b + c * c + d * d <= 1) {
      sameNumbers(qformToAffine({ b, c, d, x, y, z, dx: p[1], dy: p[2], dz: p[3], qfac: p[0] < 0 ? -1 : 1 }), theirAffine, 1e-6);
    }
    if (ours.affineSource === 'qform') sameNumbers(ours.affine, theirAffine, 1e-6);
  }
  return ours;
}

describe('nifti-reader-js and our reader agree on headers', () => {
  const names = readdirSync(NIBABEL_DATA).filter((f) => NIFTI_NAME.test(f)).sort();

  it.each(names.filter((f) => f !== 'analyze.hdr'))("nibabel's %s", (name) => {
    agree(join(NIBABEL_DATA, name));
  });

  it('covers the NIfTI-1, NIfTI-2, gzipped, 4-D and pair images', () => {
    for (const f of ['anatomical.nii', 'example4d.nii.gz', 'example_nifti2.nii.gz', 'nifti1.hdr', 'nifti2.hdr', 'standard.nii.gz']) expect(names).toContain(f);
  });

  describe('files nibabel writes', () => {
    let made: { file: string; kind: string }[];
    beforeAll(() => {
      made = python<{ file: string; kind: string }[]>('nifti_make.py', [tempDir('second-reader')]).filter((m) => m.kind !== 'unsupported');
    });
    it('every one, oblique sform, qform with qfac ±1, pixdim only, both byte orders, NIfTI-2', () => {
      const sources = new Set<string>();
      for (const m of made.filter((x) => !x.file.endsWith('.img') && !x.file.endsWith('.img.gz'))) sources.add(agree(m.file).affineSource);
      expect([...sources].sort()).toEqual(['pixdim', 'qform', 'sform']);
      expect(made.length).toBeGreaterThan(10);
    });
  });

  it('files our writer makes: an oblique CT-like int16 scan and a uint8 label map', async () => {
    const dir = tempDir('second-reader-ours');
    const c = Math.cos(0.3), s = Math.sin(0.3);
    const affine = [-0.7 * c, 0.7 * s, 0, 180, -0.7 * s, -0.7 * c, 0, 150, 0, 0, 2.5, -90, 0, 0, 0, 1];
    const dims: [number, number, number] = [20, 16, 6];
    const n = dims[0] * dims[1] * dims[2];
    await saveVolume(join(dir, 'scan.nii.gz'), makeVolume(dims, Int16Array.from({ length: n }, (_, q) => (q % 37) * 9 - 1000), affine, 'int16'), 'int16');
    await saveVolume(join(dir, 'labels.nii'), makeVolume(dims, Uint8Array.from({ length: n }, (_, q) => q % 9), affine, 'uint8'), 'uint8');
    for (const f of ['scan.nii.gz', 'labels.nii']) {
      const ours = agree(join(dir, f));
      expect(ours.affineSource).toBe('sform');
      expect(ours.qformCode).toBeGreaterThan(0);
    }
  });
});
