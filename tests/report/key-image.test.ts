import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { Mat4 } from '../../src/geometry/mat4.js';
import {
  DIAMETER_RGB, KEY_IMAGE_PX, OUTLINE_RGB, SOFT_TISSUE_WINDOW, fieldOfViewMm, renderKeyImage, WASH,
} from '../../src/report/key-image.js';
import { OKABE_ITO } from '../../src/report/palette.js';
import { dataUrl, encodePng } from '../../src/report/png.js';
import { defaultScheme, SEGMENT_CODES } from '../../src/segments/scheme.js';
import type { LesionResult } from '../../src/visit/analyze.js';
import { makeVolume } from '../../src/volume/volume.js';

// A key image is checked pixel by pixel against the volume it was cut from: the grey of the soft-tissue
// window (W 400 / L 50 HU, common practice for the abdomen, from memory: linear from L - W/2 to L + W/2),
// the segment colour (Okabe-Ito) washed over it, the outline and the diameter line; and the PNG is read
// back by Pillow (python3-pil), a decoder outside the project.
const dir = mkdtempSync(join(tmpdir(), 'falciform-key-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// A 64 × 64 × 21 grid of 1 mm voxels, identity affine (RAS+: i runs to the patient's right, j anterior).
const [NX, NY, NZ] = [64, 64, 21];
const AFFINE: Mat4 = [1, 0, 0, -32, 0, 1, 0, -32, 0, 0, 1, -10, 0, 0, 0, 1];
const idx = (i: number, j: number, k: number) => i + NX * (j + NY * k);
const LIVER_HU = 100;
const LESION_HU = 20;
const BRIGHT_HU = 300;

function phantom() {
  const scan = new Int16Array(NX * NY * NZ).fill(LIVER_HU);
  const labels = new Uint8Array(NX * NY * NZ);
  const mask = new Uint8Array(NX * NY * NZ);
  for (let k = 0; k < NZ; k++) {
    for (let j = 0; j < NY; j++) {
      for (let i = 0; i < NX; i++) {
        // Segment VIII on the patient's right half (x > 0), II on the left.
        labels[idx(i, j, k)] = i >= 32 ? SEGMENT_CODES.VIII : SEGMENT_CODES.II;
        // A bright block on the patient's right and anterior, to check the orientation.
        if (i >= 44 && i < 50 && j >= 44 && j < 50) scan[idx(i, j, k)] = BRIGHT_HU;
        // The lesion: a 9 × 5 × 5 box around voxel (32, 32, 10), longest axial diameter along x.
        if (Math.abs(i - 32) <= 4 && Math.abs(j - 32) <= 2 && Math.abs(k - 10) <= 2) {
          mask[idx(i, j, k)] = 1;
          scan[idx(i, j, k)] = LESION_HU;
        }
      }
    }
  }
  return {
    scan: makeVolume([NX, NY, NZ], scan, AFFINE, 'int16'),
    segments: { labels: makeVolume([NX, NY, NZ], labels, AFFINE, 'uint8'), scheme: defaultScheme() },
    mask: makeVolume([NX, NY, NZ], mask, AFFINE, 'uint8'),
  };
}

const lesion: LesionResult = {
  id: 'L1', centroidMm: [0, 0, 0], segment: 'VIII', segmentFractions: { VIII: 0.56, II: 0.44 }, volumeMl: 0.225,
  longestAxialMm: 8, shortAxisMm: 4, marginMm: 0, nearestOtherSegment: 'II', marginAlert: true, source: 'mask',
  max3dMm: 9, meanValue: LESION_HU, longestAxialEndpointsMm: [[-4, 0, 0], [4, 0, 0]], voxelCount: 225, segmentWarning: null,
};

const grey = (hu: number) => {
  const lo = SOFT_TISSUE_WINDOW.levelHu - SOFT_TISSUE_WINDOW.widthHu / 2;
  return Math.round(255 * Math.min(1, Math.max(0, (hu - lo) / SOFT_TISSUE_WINDOW.widthHu)));
};
const wash = (g: number, hex: string) => [0, 1, 2].map((c) => Math.round((1 - WASH) * g + WASH * parseInt(hex.slice(1 + 2 * c, 3 + 2 * c), 16)));

describe('key image', () => {
  const { scan, segments, mask } = phantom();
  const img = renderKeyImage(scan, segments, mask, lesion);
  const S = KEY_IMAGE_PX;
  const at = (x: number, y: number) => Array.from(img.rgb.subarray(3 * (y * S + x), 3 * (y * S + x) + 3));
  /** The pixel showing a world point of the slice (x, y mm): right of the patient on the image's left, anterior up. */
  const pixelOf = (xMm: number, yMm: number) => [Math.floor(S / 2 - xMm / img.mmPerPx), Math.floor(S / 2 - yMm / img.mmPerPx)] as const;

  it('cuts the slice through the centroid at 2.5 diameters, windowed, with the segment washed over', () => {
    expect(img.widthPx).toBe(S);
    expect(img.mmPerPx).toBeCloseTo(fieldOfViewMm(8) / S, 10);
    expect(fieldOfViewMm(8)).toBe(40);
    // Inside the lesion, next to the centroid, away from the diameter line: the lesion's HU in segment VIII's colour.
    expect(at(...pixelOf(1.5, 1.2))).toEqual(wash(grey(LESION_HU), OKABE_ITO.reddishPurple));
    // Liver in segment II on the patient's left (the image's right) and in VIII on the right (the image's left).
    expect(at(...pixelOf(-12, -10))).toEqual(wash(grey(LIVER_HU), OKABE_ITO.orange));
    expect(at(...pixelOf(8, -10))).toEqual(wash(grey(LIVER_HU), OKABE_ITO.reddishPurple));
    // The bright block sits at x 12..17, y 12..17 mm: right and anterior, so left and up in the image.
    const [bx, by] = pixelOf(14.5, 14.5);
    expect(bx).toBeLessThan(S / 2);
    expect(by).toBeLessThan(S / 2);
    expect(at(bx, by)).toEqual(wash(grey(BRIGHT_HU), OKABE_ITO.reddishPurple));
  });

  it('draws the lesion outline and its longest diameter', () => {
    // The box's edge along y = +2 mm (voxel centres), half a voxel inside its border at 2.5 mm.
    let outline = 0;
    for (let x = 0; x < S; x++) for (let y = 0; y < S; y++) if (at(x, y).join() === OUTLINE_RGB.join()) outline++;
    // The outline runs round the 9 × 5 mm box: about 2 × (9 + 5) mm of pixels.
    expect(outline * img.mmPerPx).toBeGreaterThan(2 * (9 + 5) * 0.8);
    expect(outline * img.mmPerPx).toBeLessThan(2 * (9 + 5) * 1.6);
    expect(at(...pixelOf(0, 2.4))).toEqual([...OUTLINE_RGB]);
    expect(at(...pixelOf(0, 1.5))).not.toEqual([...OUTLINE_RGB]);
    // The diameter from x -4 to +4 mm along y = 0, in this slice.
    expect(img.diameterInSlice).toBe(true);
    for (const x of [-3, 0, 3]) expect(at(...pixelOf(x, -0.01))).toEqual([...DIAMETER_RGB]);
  });

  it('encodes a PNG that Pillow reads back pixel for pixel', () => {
    const png = encodePng(img.rgb, S, S);
    const file = join(dir, 'key.png');
    writeFileSync(file, png);
    const points = [[0, 0], pixelOf(1.5, 1.2), pixelOf(0, 2.4), pixelOf(0, -0.01), [S - 1, S - 1]];
    const r = spawnSync('/usr/bin/python3', ['tests/report/key_image_png.py', file, ...points.map((p) => p.join(','))], { encoding: 'utf8' });
    expect(r.stderr).toBe('');
    const out = JSON.parse(r.stdout) as { size: number[]; mode: string; pixels: number[][] };
    expect(out.size).toEqual([S, S]);
    expect(out.mode).toBe('RGB');
    expect(out.pixels).toEqual(points.map(([x, y]) => at(x, y)));
    expect(dataUrl('image/png', png.subarray(0, 4))).toBe('data:image/png;base64,iVBORw==');
  });
});
