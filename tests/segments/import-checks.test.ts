import { describe, expect, it } from 'vitest';
import { checkMask } from '../../src/segments/import-checks.js';
import { makeVolume } from '../../src/volume/volume.js';

const I = [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1];
const mask = (values: number[], type: 'uint8' | 'float32' = 'uint8', slope = 1, inter = 0) =>
  makeVolume([values.length, 1, 1], type === 'uint8' ? Uint8Array.from(values) : Float32Array.from(values), I, type, slope, inter);

describe('the import checks of a mask, from one count of its labels', () => {
  it('names the first voxel that is not a whole-number label, after scaling', () => {
    expect(() => checkMask(mask([0, 1, 2.5, 3.5], 'float32'), 'lesions', 'les.nii', 'default'))
      .toThrow('les.nii: holds the value 2.5 at voxel 2; a lesions mask must hold whole-number labels from 0 up');
    expect(() => checkMask(mask([0, 0, 1, Number.NaN], 'float32'), 'liver', 'liver.nii', 'default')).toThrow(/holds the value NaN at voxel 3/);
    expect(() => checkMask(mask([0, 3, 0], 'uint8', 1, -2), 'segments', 's.nii', 'default')).toThrow(/holds the value -2 at voxel 0/);
  });

  it('an empty lesion mask is a warning, an empty liver or segment map an error', () => {
    expect(checkMask(mask([0, 0, 0, 0]), 'lesions', 'les.nii', 'default')).toEqual(['les.nii: the lesions mask is empty (no lesion voxels)']);
    expect(() => checkMask(mask([0, 0, 0]), 'liver', 'liver.nii', 'default')).toThrow('liver.nii: the liver mask is empty (no voxel above 0)');
    expect(checkMask(mask([0, 1, 1, 7]), 'liver', 'liver.nii', 'default')).toEqual([]);
  });

  it('a segment map also gets the import warnings, from the same count', () => {
    expect(checkMask(mask([0, 1, 12, 12, 5]), 'segments', 's.nii', 'default'))
      .toEqual(['s.nii: label value 12 not in the segment scheme; 2 voxels read as background']);
  });
});
