// Writing NIfTI-1: what Falciform writes, nibabel reads back equal (run live through
// tests/reference/nifti_facts.py), and our own reader too. Quaternion conversion checked against the
// NIfTI-1 standard's method 2 formula (nifti1.h) via our reader.
import { readdirSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadVolume, nodeInflate, saveVolume } from '../../src/cli/node-io.js';
import { isFalciformError } from '../../src/errors.js';
import { affineToQform, qformToAffine } from '../../src/volume/nifti-affine.js';
import { readNifti } from '../../src/volume/nifti-read.js';
import { encodeNifti } from '../../src/volume/nifti-write.js';
import { webGzip, webInflate } from '../../src/volume/web-gzip.js';
import { makeVolume, type Volume } from '../../src/volume/volume.js';
import { python, tempDir, type NibabelFacts } from './nifti-fixtures.js';

function rotation(ax: number, ay: number, az: number): number[][] {
  const [cx, sx, cy, sy, cz, sz] = [Math.cos(ax), Math.sin(ax), Math.cos(ay), Math.sin(ay), Math.cos(az), Math.sin(az)];
  const rx = [[1, 0, 0], [0, cx, -sx], [0, sx, cx]];
  const ry = [[cy, 0, sy], [0, 1, 0], [-sy, 0, cy]];
  const rz = [[cz, -sz, 0], [sz, cz, 0], [0, 0, 1]];
  const mul = (a: number[][], b: number[][]) => a.map((row) => [0, 1, 2].map((c) => row[0] * b[0][c] + row[1] * b[1][c] + row[2] * b[2][c]));
  return mul(rz, mul(ry, rx));
}

function affine(r: number[][], steps: number[], shift: number[]): number[] {
  return [0, 1, 2].flatMap((row) => [r[row][0] * steps[0], r[row][1] * steps[1], r[row][2] * steps[2], shift[row]]).concat([0, 0, 0, 1]);
}

function expectClose(actual: readonly number[], expected: readonly number[], tol: number) {
  expected.forEach((e, n) => expect(Math.abs(actual[n] - e), `element ${n}: ${actual[n]} vs ${e}`).toBeLessThanOrEqual(tol));
}

const dims: [number, number, number] = [9, 7, 5];
const count = dims[0] * dims[1] * dims[2];
const oblique = affine(rotation(0.3, -0.2, 0.5), [0.7, 0.8, 2.5], [-120.5, 40.25, 11]);
const flipped = affine(rotation(-1.2, 0.4, 2.9), [0.9, 0.9, -3], [10, -20, 30]); // det < 0: qfac -1
const halfTurn = affine(rotation(Math.PI, 0, 0), [1, 2, 3], [0, 0, 0]); // quaternion a = 0

function labels(): Volume {
  const data = new Uint8Array(count).map((_, n) => (n * 7) % 10);
  return makeVolume(dims, data, oblique, 'uint8');
}
function scaledCt(a = flipped): Volume {
  const data = new Int16Array(count).map((_, n) => ((n * 37) % 4000) - 1024);
  return makeVolume(dims, data, a, 'int16', 0.5, -10);
}
function floats(): Volume {
  const data = new Float32Array(count).map((_, n) => Math.sin(n) * 1000);
  return makeVolume(dims, data, halfTurn, 'float32');
}

function physical(v: Volume): number[] {
  return Array.from(v.data, (x) => x * v.slope + v.inter);
}

describe('affine ↔ qform parameters', () => {
  it.each([['oblique', oblique], ['improper (qfac -1)', flipped], ['half turn (a = 0)', halfTurn],
    ['half turn about y', affine(rotation(0, Math.PI, 0), [1, 1, 1], [1, 2, 3])],
    ['half turn about z', affine(rotation(0, 0, Math.PI), [2, 2, 2], [0, 0, 0])]])('%s survives the round trip', (_n, a) => {
    const q = affineToQform(a);
    expect(q.qfac).toBe(a === flipped ? -1 : 1);
    expectClose(qformToAffine(q), a, 1e-12);
  });

  it('a sheared affine gets the nearest rigid qform with the same column lengths', () => {
    const sheared = oblique.slice();
    sheared[1] += 0.15;
    const q = affineToQform(sheared);
    const back = qformToAffine(q);
    const norm = (m: readonly number[], c: number) => Math.hypot(m[c], m[4 + c], m[8 + c]);
    for (const c of [0, 1, 2]) expect(norm(back, c)).toBeCloseTo(norm(sheared, c), 10);
    // Columns of a qform are orthogonal.
    const dot = back[0] * back[1] + back[4] * back[5] + back[8] * back[9];
    expect(Math.abs(dot)).toBeLessThan(1e-9);
  });
});

describe('write then read with our own reader', () => {
  it.each([['uint8', labels], ['int16', scaledCt], ['float32', floats]] as const)('%s keeps values and affine', async (dt, make) => {
    const v = make();
    const back = (await readNifti(encodeNifti(v, dt), 'out.nii', { inflate: nodeInflate })).volume;
    expect(back.datatype).toBe(dt);
    expect(back.dims).toEqual(dims);
    expect(physical(back)).toEqual(physical(v));
    expectClose(back.affine, v.affine, 1e-4);
  });

  it('converts physical values into another type, and refuses values that do not fit', async () => {
    const v = scaledCt();
    const asFloat = (await readNifti(encodeNifti(v, 'float32'), 'out.nii', { inflate: nodeInflate })).volume;
    expect(Array.from(asFloat.data)).toEqual(physical(v));
    expect([asFloat.slope, asFloat.inter]).toEqual([1, 0]);
    let err: unknown;
    try {
      encodeNifti(v, 'uint8');
    } catch (e) {
      err = e;
    }
    expect(isFalciformError(err) && err.kind).toBe('bad-input');
    expect((err as Error).message).toMatch(/^volume: value -522 at voxel 0 does not fit in uint8$/);
  });

  it('webGzip output is read back through both inflaters', async () => {
    const gz = await webGzip(encodeNifti(labels(), 'uint8'));
    expect([gz[0], gz[1]]).toEqual([0x1f, 0x8b]);
    for (const inflate of [nodeInflate, webInflate]) {
      const back = (await readNifti(gz, 'out.nii.gz', { inflate })).volume;
      expect(Array.from(back.data)).toEqual(Array.from(labels().data));
    }
  });
});

describe('what Falciform writes, nibabel reads back equal (nibabel 5.x, run live)', () => {
  const dir = tempDir('write');
  const cases = [
    { name: 'segments.nii.gz', dt: 'uint8' as const, make: labels, rigid: true },
    { name: 'scan.nii.gz', dt: 'int16' as const, make: scaledCt, rigid: true },
    { name: 'export.nii.gz', dt: 'float32' as const, make: floats, rigid: true },
    { name: 'plain.nii', dt: 'int16' as const, make: () => scaledCt(oblique), rigid: true },
    { name: 'sheared.nii.gz', dt: 'uint8' as const, make: () => { const a = oblique.slice(); a[1] += 0.15; return makeVolume(dims, labels().data, a, 'uint8'); }, rigid: false },
  ];

  it('dims, datatype, sform, qform, codes and every value', async () => {
    for (const c of cases) await saveVolume(join(dir, c.name), c.make(), c.dt);
    const facts = python<NibabelFacts[]>('nifti_facts.py', cases.map((c) => join(dir, c.name)));
    facts.forEach((ref, n) => {
      const c = cases[n];
      const v = c.make();
      expect(ref.class).toBe('Nifti1Image');
      expect(ref.dims).toEqual([...dims]);
      expect(ref.dtype).toBe(c.dt);
      expect([ref.sformCode, ref.qformCode]).toEqual([2, 2]);
      expectClose(ref.sform.flat(), v.affine, 1e-4);
      if (c.rigid) expectClose(ref.qform.flat(), v.affine, 1e-4);
      else expect(Math.abs(ref.qform[0][1] - v.affine[1])).toBeGreaterThan(0.05);
      const values = physical(v);
      const sum = values.reduce((s, x) => s + x, 0);
      const wsum = values.reduce((s, x, k) => s + x * ((k % 101) + 1), 0);
      expect(ref.values!.sum).toBeCloseTo(sum, 6);
      expect(ref.values!.wsum).toBeCloseTo(wsum, 4);
      expect(ref.values!.min).toBe(Math.min(...values));
      expect(ref.values!.max).toBe(Math.max(...values));
      for (const [k, x] of ref.values!.samples) expect(x).toBe(values[k]);
    });
    // .nii stays uncompressed; the others are gzip.
    const back = await loadVolume(join(dir, 'plain.nii'));
    expect(physical(back.volume)).toEqual(physical(scaledCt(oblique)));
  });

  it('saving is atomic: a failed write leaves nothing behind', async () => {
    const target = join(dir, 'taken');
    mkdirSync(target);
    mkdirSync(join(target, 'child'));
    await expect(saveVolume(target, labels(), 'uint8')).rejects.toThrow(new RegExp(`^${target}: cannot be written`));
    expect(readdirSync(dir).filter((f) => f.endsWith('.tmp'))).toEqual([]);
    await expect(saveVolume(join(dir, 'no', 'such', 'folder.nii.gz'), labels(), 'uint8')).rejects.toThrow(/cannot be written/);
  });
});
