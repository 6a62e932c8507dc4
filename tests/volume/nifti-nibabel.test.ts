// Falciform's NIfTI reader against nibabel, run live: every NIfTI image shipped in nibabel's own test
// data (Debian python3-nibabel) and files written by nibabel in tests/reference/nifti_make.py.
// Source of every expected value: nibabel 5.x (load, get_best_affine, dataobj), via
// tests/reference/nifti_facts.py.
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { loadVolume } from '../../src/cli/node-io.js';
import { isFalciformError } from '../../src/errors.js';
import { parseNiftiHeader, type LoadedNifti } from '../../src/volume/nifti-read.js';
import { readFileSync } from 'node:fs';
import { NIBABEL_DATA, python, tempDir, type NibabelFacts } from './nifti-fixtures.js';

const NIFTI_NAME = /\.(nii|nii\.gz|hdr)$/;

function flat(rows: number[][]): number[] {
  return rows.flat();
}

function expectClose(actual: readonly number[], expected: readonly number[], tol: number) {
  expect(actual.length).toBe(expected.length);
  actual.forEach((a, n) => {
    if (Math.abs(a - expected[n]) > tol) throw new Error(`element ${n}: ${a} vs ${expected[n]} (tolerance ${tol})`);
  });
}

function relClose(a: number, b: number, rel = 1e-9) {
  expect(Math.abs(a - b)).toBeLessThanOrEqual(rel * Math.max(1, Math.abs(b)));
}

/** Method 1 of the NIfTI-1 standard (nifti1.h): x = pixdim[1]·i, y = pixdim[2]·j, z = pixdim[3]·k. */
function method1(pixdim: number[]): number[] {
  return [pixdim[1], 0, 0, 0, 0, pixdim[2], 0, 0, 0, 0, pixdim[3], 0, 0, 0, 0, 1];
}

/** Header facts both readers must agree on. */
function compareHeader(info: LoadedNifti['info'], ref: NibabelFacts) {
  expect(info.format).toBe(ref.format);
  expect(info.dims).toEqual(ref.dims);
  expect(info.datatype).toBe(ref.dtype);
  expect(info.littleEndian).toBe(ref.endianness === '<');
  expect(info.affineSource).toBe(ref.sformCode > 0 ? 'sform' : ref.qformCode > 0 ? 'qform' : 'pixdim');
  // nibabel's best affine when sform or qform is set. With neither, nibabel falls back to its Analyze
  // convention (centred, x flipped); Falciform follows the NIfTI-1 standard's method 1 instead.
  const expected = info.affineSource === 'pixdim' ? method1(ref.pixdim) : flat(ref.bestAffine);
  expectClose(info.affine, expected, 1e-4);
  const [slope, inter] = ref.slopeInter;
  expect(info.slope).toBeCloseTo(slope ?? 1, 12);
  expect(info.inter).toBeCloseTo(inter ?? 0, 12);
}

/** Value facts of the first 3-D volume, computed the way nifti_facts.py does. */
function compareValues(loaded: LoadedNifti, ref: NibabelFacts) {
  const v = ref.values;
  if (!v) throw new Error(`nibabel read no values from ${ref.file}: ${ref.valuesError}`);
  const { data, slope, inter } = loaded.volume;
  expect(data.length).toBe(v.count);
  let sum = 0, wsum = 0, min = Infinity, max = -Infinity, nanCount = 0;
  for (let n = 0; n < data.length; n++) {
    const x = data[n] * slope + inter;
    if (Number.isNaN(x)) { nanCount++; continue; }
    sum += x;
    wsum += x * ((n % 101) + 1);
    if (x < min) min = x;
    if (x > max) max = x;
  }
  expect(nanCount).toBe(v.nanCount);
  relClose(sum, v.sum);
  relClose(wsum, v.wsum);
  relClose(min, v.min, 1e-12);
  relClose(max, v.max, 1e-12);
  for (const [n, x] of v.samples) {
    if (x === null) expect(data[n]).toBeNaN();
    else relClose(data[n] * slope + inter, x, 1e-12);
  }
}

describe("nibabel's own test images", () => {
  const names = readdirSync(NIBABEL_DATA).filter((f) => NIFTI_NAME.test(f)).sort();
  let facts: Map<string, NibabelFacts>;

  beforeAll(() => {
    const list = python<NibabelFacts[]>('nifti_facts.py', names.map((f) => join(NIBABEL_DATA, f)));
    facts = new Map(list.map((f) => [f.file, f]));
  });

  it('includes the NIfTI-1, NIfTI-2, 4-D, big-endian and pair images we expect', () => {
    for (const f of ['anatomical.nii', 'example4d.nii.gz', 'example_nifti2.nii.gz', 'functional.nii', 'nifti1.hdr', 'nifti2.hdr', 'standard.nii.gz']) {
      expect(names).toContain(f);
    }
  });

  it.each(names)('%s: dims, affine, datatype and values equal nibabel\'s (or a clear refusal)', async (name) => {
    const path = join(NIBABEL_DATA, name);
    const ref = facts.get(path)!;
    if (/Analyze/.test(ref.class)) {
      // nibabel reads it as Analyze 7.5 (no NIfTI magic): no orientation, so Falciform refuses it.
      await expect(loadVolume(path)).rejects.toThrow(/analyze\.hdr: is an Analyze 7\.5 header without the NIfTI magic/);
      return;
    }
    if (!ref.values) {
      // A header shipped without its .img: compare the header, and loading names the missing file.
      const { info } = parseNiftiHeader(new Uint8Array(readFileSync(path)), path);
      expect(info.pair).toBe(true);
      compareHeader(info, ref);
      await expect(loadVolume(path)).rejects.toThrow(/\.img: cannot be read: the \.img data file of this \.hdr\/\.img pair is missing/);
      return;
    }
    const loaded = await loadVolume(path);
    compareHeader(loaded.info, ref);
    compareValues(loaded, ref);
    if (ref.dims.length > 3) expect(loaded.warnings.join(' ')).toMatch(/Falciform uses the first/);
  });
});

interface Made { file: string; kind: string; qfac?: number; datatype?: string; littleEndian?: boolean; slope?: number; inter?: number; code?: number; volumes?: number }

describe('files written by nibabel', () => {
  let made: Made[];
  let facts: Map<string, NibabelFacts>;

  beforeAll(() => {
    made = python<Made[]>('nifti_make.py', [tempDir('nibabel')]);
    const readable = made.filter((m) => m.kind !== 'unsupported').map((m) => m.file);
    facts = new Map(python<NibabelFacts[]>('nifti_facts.py', readable).map((f) => [f.file, f]));
  });

  const load = async (suffix: string) => {
    const m = made.find((x) => x.file.endsWith(suffix))!;
    return { m, ref: facts.get(m.file)!, loaded: await loadVolume(m.file) };
  };

  it('oblique, sheared sform: taken over a different qform', async () => {
    const { ref, loaded } = await load('oblique_sform.nii.gz');
    compareHeader(loaded.info, ref);
    compareValues(loaded, ref);
    expect(loaded.info.affineSource).toBe('sform');
    // The test would not notice a qform mix-up if nibabel's two transforms agreed.
    expect(Math.abs(ref.qform[0][0] - ref.sform[0][0])).toBeGreaterThan(0.1);
    expect(loaded.volume.affine[1]).toBeCloseTo(ref.sform[0][1], 5);
  });

  it.each([['qform_qfac_pos.nii', 1], ['qform_qfac_neg.nii', -1]])('%s: qform only, qfac %d', async (name, qfac) => {
    const { ref, loaded } = await load(name as string);
    compareHeader(loaded.info, ref);
    compareValues(loaded, ref);
    expect(ref.pixdim[0]).toBe(qfac);
    const a = loaded.volume.affine;
    const det = a[0] * (a[5] * a[10] - a[6] * a[9]) - a[1] * (a[4] * a[10] - a[6] * a[8]) + a[2] * (a[4] * a[9] - a[5] * a[8]);
    expect(Math.sign(det)).toBe(qfac);
    expect(Math.abs(det)).toBeCloseTo(0.9 * 1.1 * 3.0, 4);
  });

  it('pixdim only: method 1 scaling from the header nibabel wrote', async () => {
    const { ref, loaded } = await load('pixdim_only.nii');
    compareHeader(loaded.info, ref);
    compareValues(loaded, ref);
    expectClose(loaded.volume.affine, [0.7, 0, 0, 0, 0, 0.8, 0, 0, 0, 0, 2.5, 0, 0, 0, 0, 1], 1e-6);
    expect(loaded.warnings.join(' ')).toMatch(/neither sform nor qform/);
  });

  it('every supported datatype, little- and big-endian', async () => {
    const dtypes = made.filter((m) => m.kind === 'datatype');
    expect(dtypes).toHaveLength(16);
    for (const m of dtypes) {
      const loaded = await loadVolume(m.file);
      const ref = facts.get(m.file)!;
      expect(loaded.info.datatype).toBe(m.datatype);
      expect(loaded.info.littleEndian).toBe(m.littleEndian);
      compareHeader(loaded.info, ref);
      compareValues(loaded, ref);
    }
  });

  it('scl_slope and scl_inter are applied (explicit, big-endian, gzipped)', async () => {
    const { m, ref, loaded } = await load('scaled_be.nii.gz');
    expect(loaded.info.slope).toBe(m.slope);
    expect(loaded.info.inter).toBe(m.inter);
    compareHeader(loaded.info, ref);
    compareValues(loaded, ref);
  });

  it("scaling nibabel chose for floats stored as int16", async () => {
    const { ref, loaded } = await load('scaled_auto.nii.gz');
    expect(ref.slopeInter[0]).not.toBe(1);
    compareHeader(loaded.info, ref);
    compareValues(loaded, ref);
  });

  it('4-D: dims list all four, the first volume is loaded and the user is told', async () => {
    const { ref, loaded } = await load('four_d.nii.gz');
    compareHeader(loaded.info, ref);
    compareValues(loaded, ref);
    expect(loaded.info.dims).toEqual([7, 6, 5, 3]);
    expect(loaded.volume.dims).toEqual([7, 6, 5]);
    expect(loaded.warnings.join(' ')).toMatch(/3 volumes; Falciform uses the first/);
  });

  it('NIfTI-2 big-endian with a qform', async () => {
    const { ref, loaded } = await load('nifti2_be.nii');
    expect(loaded.info.format).toBe('NIfTI-2');
    expect(loaded.info.littleEndian).toBe(false);
    compareHeader(loaded.info, ref);
    compareValues(loaded, ref);
  });

  it.each(['pair1.hdr', 'pair2.hdr'])('%s with its .img (also when given the .img)', async (name) => {
    const { ref, loaded } = await load(name);
    expect(loaded.info.pair).toBe(true);
    compareHeader(loaded.info, ref);
    compareValues(loaded, ref);
    const viaImg = await loadVolume(join(ref.file.replace(/\.hdr$/, '.img')));
    expect(Array.from(viaImg.volume.data)).toEqual(Array.from(loaded.volume.data));
  });

  it('datatypes Falciform does not read give the clear unsupported-datatype error', async () => {
    const refused = made.filter((m) => m.kind === 'unsupported');
    expect(refused.map((m) => m.datatype)).toEqual(['int64', 'uint64', 'complex64', 'complex128', 'rgb24']);
    for (const m of refused) {
      const err = await loadVolume(m.file).then(() => null, (e: unknown) => e);
      expect(isFalciformError(err) && err.kind).toBe('bad-file');
      expect((err as Error).message).toBe(
        `${m.file}: datatype ${m.datatype} (code ${m.code}) is not supported (Falciform reads uint8, int8, int16, uint16, int32, uint32, float32 and float64)`,
      );
    }
  });
});
