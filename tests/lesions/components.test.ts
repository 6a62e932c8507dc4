import { describe, expect, it } from 'vitest';
import { isFalciformError } from '../../src/errors.js';
import { lesionsFromMask } from '../../src/lesions/components.js';
import type { VoxelArray } from '../../src/volume/volume.js';
import { volume, type Dims } from './fixtures.js';

const eye = [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1];

function mask(dims: Dims, data: VoxelArray, datatype: 'uint8' | 'int16' | 'float32' = 'uint8', slope = 1, inter = 0) {
  return volume(dims, data, eye, datatype, slope, inter);
}

describe('lesions from a binary mask', () => {
  it('joins voxels that touch at a corner (26-connectivity) and orders lesions by first voxel', () => {
    // Source: the definition of 26-connectivity (common practice): face, edge and corner neighbours.
    const dims: Dims = [8, 8, 8];
    const d = new Uint8Array(512);
    const at = (i: number, j: number, k: number) => i + 8 * (j + 8 * k);
    d[at(5, 5, 1)] = 1; // alone: first in storage order
    d[at(1, 1, 2)] = 1;
    d[at(2, 2, 3)] = 1; // corner neighbour of (1, 1, 2)
    d[at(3, 2, 3)] = 1; // face neighbour
    d[at(6, 6, 6)] = 1; // two steps away from everything
    const found = lesionsFromMask(mask(dims, d));
    expect(found.kind).toBe('binary');
    expect(found.lesions.map((l) => [...l.voxels])).toEqual([[at(5, 5, 1)], [at(1, 1, 2), at(2, 2, 3), at(3, 2, 3)], [at(6, 6, 6)]]);
    expect(found.lesions.every((l) => l.label === 1)).toBe(true);
  });

  it('does not wrap around the grid edge', () => {
    // Voxel (7, 0, 0) and (0, 1, 0) are neighbours in storage order but not on the grid.
    const d = new Uint8Array(64);
    d[7] = 1;
    d[8] = 1;
    expect(lesionsFromMask(mask([8, 4, 2], d)).lesions).toHaveLength(2);
  });

  it('floods a large lesion without recursion', () => {
    const dims: Dims = [200, 200, 30];
    const d = new Uint8Array(200 * 200 * 30).fill(1);
    const found = lesionsFromMask(mask(dims, d));
    expect(found.lesions).toHaveLength(1);
    expect(found.lesions[0].voxels.length).toBe(d.length);
    expect(found.lesions[0].voxels[d.length - 1]).toBe(d.length - 1);
  });

  it('reads values after scaling: a scaled single value is still binary', () => {
    const d = new Int16Array([0, 3, 3, 0, 0, 0, 0, 3]);
    const found = lesionsFromMask(mask([2, 2, 2], d, 'int16', 2, 0));
    expect(found.kind).toBe('binary');
    expect(found.lesions.map((l) => l.label)).toEqual([6]);
    // With an intercept, stored 0 is a value too: every voxel is lesion.
    expect(lesionsFromMask(mask([2, 2, 2], d, 'int16', 1, 1)).kind).toBe('multi-label');
  });

  it('gives an empty result for an empty mask, ignoring NaN', () => {
    expect(lesionsFromMask(mask([2, 2, 1], new Float32Array([0, NaN, 0, 0]), 'float32'))).toEqual({ kind: 'empty', lesions: [] });
  });
});

describe('lesions from a multi-label mask', () => {
  it('gives one lesion per value, by value, connected or not', () => {
    const d = new Uint8Array(27);
    d[0] = 7;
    d[26] = 7; // far corner: same lesion
    d[1] = 2;
    d[13] = 4;
    const found = lesionsFromMask(mask([3, 3, 3], d));
    expect(found.kind).toBe('multi-label');
    expect(found.lesions.map((l) => [l.label, [...l.voxels]])).toEqual([[2, [1]], [4, [13]], [7, [0, 26]]]);
  });

  it('refuses fractional values, naming the file', () => {
    let err: unknown;
    try {
      lesionsFromMask(mask([2, 1, 1], new Float32Array([0.25, 1]), 'float32'), 'probabilities.nii.gz');
    } catch (e) {
      err = e;
    }
    expect(isFalciformError(err) && err.kind === 'bad-file' && err.message).toMatch(/^probabilities\.nii\.gz: holds the non-integer value 0\.25/);
  });
});

describe('bounded lesion masks', () => {
  it('splits the one-voxel-in-eight lattice into one lesion per voxel, in storage order', () => {
    // Voxels at even (i, j, k) are two steps apart on some axis, so no two are 26-neighbours (the
    // definition of 26-connectivity, common practice): the most components a grid can hold.
    const dims: Dims = [9, 8, 7];
    const d = new Uint8Array(9 * 8 * 7);
    const expected: number[] = [];
    for (let k = 0; k < 7; k += 2) for (let j = 0; j < 8; j += 2) for (let i = 0; i < 9; i += 2) expected.push(i + 9 * (j + 8 * k));
    for (const n of expected) d[n] = 1;
    const found = lesionsFromMask(mask(dims, d));
    expect(found.lesions.map((l) => [...l.voxels])).toEqual(expected.map((n) => [n]));
  });

  it('joins components that meet late (a U shape) under the first voxel\'s place in the order', () => {
    const dims: Dims = [5, 4, 1];
    // Two arms from row 0 joined at row 3; a lone voxel at (2, 1) between them comes second.
    const rows = ['1.1.1', '1...1', '1...1', '11111'].join('');
    const d = Uint8Array.from([...rows].map((c) => (c === '1' ? 1 : 0)));
    const found = lesionsFromMask(mask(dims, d));
    expect(found.lesions.map((l) => l.voxels.length)).toEqual([11, 1]);
    expect([...found.lesions[1].voxels]).toEqual([2]);
  });

  it('refuses a mask with more lesions than the cap, naming the file and the count', () => {
    const d = new Uint8Array(64);
    for (const n of [0, 2, 4, 6, 16]) d[n] = 1;
    expect(lesionsFromMask(mask([8, 4, 2], d), 'm.nii.gz', 5).lesions).toHaveLength(5);
    expect(() => lesionsFromMask(mask([8, 4, 2], d), 'm.nii.gz', 4)).toThrow(/^m\.nii\.gz: holds 5 lesions .*above the cap of 4 lesions per visit/);
  });

  it('refuses a scan given as a lesion mask: negative values, or more distinct values than the cap', () => {
    const ct = new Int16Array([-1000, 40, 60, 0, 0, 0, 0, 0]);
    expect(() => lesionsFromMask(mask([2, 2, 2], ct, 'int16'), 'scan.nii.gz')).toThrow(/^scan\.nii\.gz: holds the negative value -1000: an image, not a label mask/);
    const many = Int16Array.from({ length: 64 }, (_, n) => n + 1);
    expect(() => lesionsFromMask(mask([4, 4, 4], many, 'int16'), 'mr.nii.gz', 50)).toThrow(/^mr\.nii\.gz: holds more than 50 distinct label values: an image, not a label mask/);
  });
});
