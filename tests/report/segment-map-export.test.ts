import { describe, expect, it } from 'vitest';
import { customSchemeJson } from '../../src/report/scheme-export.js';
import { exportDatatype, segmentMapNifti } from '../../src/report/segment-map-export.js';
import { defaultScheme, parseScheme } from '../../src/segments/scheme.js';
import { readNifti } from '../../src/volume/nifti-read.js';
import { makeVolume, type VoxelArray } from '../../src/volume/volume.js';
import { VERSION } from '../../src/version.js';

// Type choice and header of exported maps; the full check against nibabel runs in cli.test.ts.
const affine = [0.8, 0, 0, -40, 0, 0.8, 0, -30, 0, 0, 2.5, 12, 0, 0, 0, 1];
const vol = (data: VoxelArray, datatype: Parameters<typeof makeVolume>[3], slope = 1, inter = 0) =>
  makeVolume([2, 2, 2], data, affine, datatype, slope, inter);

describe('segment map export', () => {
  it('keeps a type the writer has, else takes the smallest that holds the labels exactly', () => {
    expect(exportDatatype(vol(new Uint8Array(8), 'uint8'))).toBe('uint8');
    expect(exportDatatype(vol(new Int16Array(8), 'int16'))).toBe('int16');
    expect(exportDatatype(vol(Int32Array.from([0, 1, 2, 3, 4, 5, 8, 9]), 'int32'))).toBe('uint8');
    expect(exportDatatype(vol(Int32Array.from([0, 1, 2, 300, 4, 5, 8, 9]), 'int32'))).toBe('int16');
    expect(exportDatatype(vol(Float64Array.from([0, 1, 2, 3, 4, 5, 8, 9.5]), 'float64'))).toBe('float32');
    expect(exportDatatype(vol(Uint16Array.from([0, 1, 2, 3, 4, 5, 8, 9]), 'uint16', 2, 1))).toBe('uint8');
  });

  it('writes the labels and affine the map has, with a description that carries the caution', async () => {
    const labels = vol(Int32Array.from([0, 1, 2, 3, 4, 5, 8, 9]), 'int32');
    const bytes = segmentMapNifti({ labels, scheme: defaultScheme(true) }, 'v7');
    const back = await readNifti(bytes, 'v7.nii', { inflate: () => Promise.reject(new Error('not gzipped')) });
    expect(back.volume.datatype).toBe('uint8');
    expect(Array.from(back.volume.data)).toEqual([0, 1, 2, 3, 4, 5, 8, 9]);
    back.volume.affine.forEach((x, n) => expect(x).toBeCloseTo(affine[n], 5));
    const descrip = new TextDecoder().decode(bytes.subarray(148, 228)).replace(/\0.*$/s, '');
    expect(descrip).toBe(`Falciform ${VERSION} segment map v7; not a medical device`);
  });

  it('writes a scheme file only for a map that does not use the default scheme', () => {
    expect(customSchemeJson(defaultScheme(false))).toBeNull();
    expect(customSchemeJson(defaultScheme(true))).toBeNull();
    const own = parseScheme('{"labels": {"10": "II", "20": "IVa", "21": "IVb"}}', 'scheme.json');
    const json = customSchemeJson(own)!;
    expect(JSON.parse(json)).toEqual({ labels: { 10: 'II', 20: 'IVa', 21: 'IVb' } });
    expect(parseScheme(json, 'back.json')).toEqual(own);
  });
});
