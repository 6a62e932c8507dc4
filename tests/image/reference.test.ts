import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { growInWindow } from '../../src/image/flood.js';
import { close, dilate, erode, fillHoles, open } from '../../src/image/morphology.js';
import { runPython, scratchDir, writeRaw, type Dims } from '../lesions/fixtures.js';

// The voxel filters against scipy.ndimage and skimage.segmentation, run live with Debian's python3
// on the same arrays (tests/reference/image_reference.py): voxel-equal results.

const SCRIPT = 'tests/reference/image_reference.py';
const dims: Dims = [46, 38, 24];
const spacing = [0.8, 1.1, 2.5];
const N = dims[0] * dims[1] * dims[2];

/** Linear congruential generator in [0, 1). */
function rng(seed: number) {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

/**
 * A mask with blobs of all sizes (some cut by the grid's edge), thin bridges, enclosed holes and
 * speckle, so every filter has work to do.
 */
function makeMask(): Uint8Array {
  const r = rng(99);
  const m = new Uint8Array(N);
  const [nx, ny, nz] = dims;
  const balls = (count: number, value: number, maxMm: number) => {
    for (let b = 0; b < count; b++) {
      const c = [r() * nx * spacing[0], r() * ny * spacing[1], r() * nz * spacing[2]];
      const rad = [1 + r() * maxMm, 1 + r() * maxMm, 1 + r() * maxMm];
      for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) {
        const q = ((i * spacing[0] - c[0]) / rad[0]) ** 2 + ((j * spacing[1] - c[1]) / rad[1]) ** 2 + ((k * spacing[2] - c[2]) / rad[2]) ** 2;
        if (q <= 1) m[i + nx * (j + ny * k)] = value;
      }
    }
  };
  balls(14, 1, 16);
  balls(18, 0, 3);
  for (let n = 0; n < N; n++) if (r() < 0.02) m[n] ^= 1;
  // A one-voxel bridge along i.
  for (let i = 5; i < 40; i++) m[i + nx * (20 + ny * 12)] = 1;
  return m;
}

/** A smooth integer-valued image with noise, so floods stop at varied places. */
function makeImage(): Float32Array {
  const r = rng(7);
  const img = new Float32Array(N);
  const [nx, ny, nz] = dims;
  for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) {
    const v = 60 * Math.sin(i / 6) + 40 * Math.cos(j / 5 + k / 4) + 30 * Math.sin((i + j + k) / 9);
    img[i + nx * (j + ny * k)] = Math.round(v + 20 * (r() - 0.5));
  }
  return img;
}

const mask = makeMask();
const image = makeImage();
const RADII = [1.2, 2.6, 4, 5.5];
const FLOODS = [
  { seed: [10, 10, 5], tolerance: 25, connectivity: 1 as const },
  { seed: [30, 20, 12], tolerance: 40, connectivity: 3 as const },
  { seed: [23, 5, 20], tolerance: 15, connectivity: 3 as const },
  { seed: [2, 30, 3], tolerance: 60, connectivity: 1 as const },
];

let dir = '';
const refs = new Map<string, Uint8Array>();

beforeAll(() => {
  dir = scratchDir();
  const ops: Record<string, unknown>[] = [];
  for (const r of RADII) for (const kind of ['dilate', 'erode', 'open', 'close']) ops.push({ kind, radiusMm: r, out: join(dir, `${kind}-${r}.raw`) });
  ops.push({ kind: 'fill', out: join(dir, 'fill.raw') });
  FLOODS.forEach((f, n) => ops.push({ kind: 'flood', ...f, out: join(dir, `flood-${n}.raw`) }));
  runPython(SCRIPT, { dims, spacing, mask: writeRaw(dir, 'mask.raw', mask), image: writeRaw(dir, 'image.raw', image), ops }, dir);
  for (const op of ops) refs.set(op.out as string, new Uint8Array(readFileSync(op.out as string)));
});

afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Voxels where the two masks differ. */
function differing(a: Uint8Array, b: Uint8Array): number {
  let d = 0;
  for (let n = 0; n < a.length; n++) if ((a[n] !== 0) !== (b[n] !== 0)) d++;
  return d;
}

function count(a: Uint8Array): number {
  let c = 0;
  for (const v of a) c += v;
  return c;
}

const SCIPY_NAME = { dilate: 'dilation', erode: 'erosion', open: 'opening', close: 'closing' };

describe('ball morphology with radii in mm on anisotropic voxels', () => {
  const ours = { dilate, erode, open, close };
  for (const r of RADII) {
    for (const kind of ['dilate', 'erode', 'open', 'close'] as const) {
      it(`${kind}, radius ${r} mm, equals scipy.ndimage.binary_${SCIPY_NAME[kind]}`, () => {
        const theirs = refs.get(join(dir, `${kind}-${r}.raw`)) as Uint8Array;
        const got = ours[kind](mask, dims, spacing, r);
        // Source: scipy.ndimage with the same ball structuring element, run live.
        expect(differing(got, theirs)).toBe(0);
        // The result is neither empty nor the whole grid, and differs from the input.
        expect(count(got)).toBeGreaterThan(0);
        expect(count(got)).toBeLessThan(N);
        expect(differing(got, mask)).toBeGreaterThan(0);
      });
    }
  }
});

describe('hole filling and seeded growing', () => {
  it('fills holes as scipy.ndimage.binary_fill_holes', () => {
    const got = fillHoles(mask, dims);
    // Source: scipy.ndimage.binary_fill_holes (default structure), run live.
    expect(differing(got, refs.get(join(dir, 'fill.raw')) as Uint8Array)).toBe(0);
    expect(count(got)).toBeGreaterThan(count(mask));
  });

  FLOODS.forEach((f, n) => {
    it(`grows from [${f.seed.join(', ')}] as skimage.segmentation.flood (tolerance ${f.tolerance}, connectivity ${f.connectivity})`, () => {
      const [i, j, k] = f.seed;
      const s = i + dims[0] * (j + dims[1] * k);
      const v = image[s];
      const got = growInWindow(image, dims, [s], v - f.tolerance, v + f.tolerance, f.connectivity === 1 ? 6 : 26);
      // Source: skimage.segmentation.flood, run live.
      expect(differing(got, refs.get(join(dir, `flood-${n}.raw`)) as Uint8Array)).toBe(0);
      expect(count(got)).toBeGreaterThan(20);
    });
  });
});
