import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { invertAffine, multiply, type Mat4, type Vec3 } from '../../src/geometry/mat4.js';
import {
  displayMmOfWorld, extractSlice, gridAxesOfWorld, sliceLayout, sliceStepTowardsPlus, voxelIndexOfDisplay, worldOfDisplayMm, type Plane,
} from '../../renderer/viewer/slice.js';
import { fitView, toDisplayMm, toScreen, zoomAt } from '../../renderer/viewer/view-transform.js';

type Dims = [number, number, number];

const spacing = (a: Mat4): [number, number, number] => [0, 1, 2].map((c) => Math.hypot(a[c], a[4 + c], a[8 + c])) as [number, number, number];

/** Rotation about an axis by deg, as a 4×4 affine. */
function rotation(axis: 0 | 1 | 2, deg: number): number[] {
  const c = Math.cos((deg * Math.PI) / 180), s = Math.sin((deg * Math.PI) / 180);
  const [p, q] = [0, 1, 2].filter((k) => k !== axis);
  const m = [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1];
  m[p * 4 + p] = c; m[p * 4 + q] = -s; m[q * 4 + p] = s; m[q * 4 + q] = c;
  return m;
}

/** Grid axes permuted (grid axis g runs along world axis perm[g]), flipped, scaled, then rotated slightly. */
function gridAffine(perm: [number, number, number], signs: [number, number, number], steps: [number, number, number], tiltDeg: number[] = [0, 0, 0]): number[] {
  const m = [0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1];
  for (let g = 0; g < 3; g++) m[perm[g] * 4 + g] = signs[g] * steps[g];
  m[3] = -40; m[7] = 25; m[11] = -10;
  return multiply(multiply(rotation(0, tiltDeg[0]), multiply(rotation(1, tiltDeg[1]), rotation(2, tiltDeg[2]))), m);
}

describe('slice layout: radiological display (common practice)', () => {
  // The display convention, common practice in radiology: axial and coronal images show the patient's
  // right on the viewer's left; axial anterior at the top; coronal and sagittal superior at the top;
  // sagittal anterior on the left. RAS world: +x right, +y anterior, +z superior.
  const expectations: Record<Plane, { right: Vec3; down: Vec3 }> = {
    axial: { right: [-1, 0, 0], down: [0, -1, 0] },
    coronal: { right: [-1, 0, 0], down: [0, 0, -1] },
    sagittal: { right: [0, -1, 0], down: [0, 0, -1] },
  };
  const grids: [string, number[]][] = [
    ['RAS grid', gridAffine([0, 1, 2], [1, 1, 1], [0.8, 0.8, 2.5])],
    ['LPS-like grid (i left, j posterior)', gridAffine([0, 1, 2], [-1, -1, 1], [0.7, 0.7, 3])],
    ['permuted grid (i superior, j right, k posterior)', gridAffine([2, 0, 1], [1, 1, -1], [2, 1.2, 1.5])],
    ['oblique grid, tilted 12° and 8°', gridAffine([0, 1, 2], [1, -1, 1], [1, 1, 2], [12, -8, 5])],
  ];
  for (const [name, affine] of grids) {
    for (const plane of ['axial', 'coronal', 'sagittal'] as Plane[]) {
      it(`${name}, ${plane}: screen right and screen down point the conventional way`, () => {
        const dims: Dims = [20, 16, 12];
        const layout = sliceLayout(dims, affine, spacing(affine), plane);
        const s = layout.depth >> 1;
        const at = (c: number, r: number) => worldOfDisplayMm(layout, affine, (c + 0.5) * layout.colMm, (r + 0.5) * layout.rowMm, s);
        const o = at(2, 2);
        const unit = (p: Vec3) => { const v = [p[0] - o[0], p[1] - o[1], p[2] - o[2]]; const n = Math.hypot(v[0], v[1], v[2]); return v.map((x) => x / n); };
        const right = unit(at(3, 2)), down = unit(at(2, 3));
        const e = expectations[plane];
        // Within the grid's tilt of the ideal direction.
        expect(right[0] * e.right[0] + right[1] * e.right[1] + right[2] * e.right[2]).toBeGreaterThan(0.95);
        expect(down[0] * e.down[0] + down[1] * e.down[1] + down[2] * e.down[2]).toBeGreaterThan(0.95);
        // Up a slice moves towards +world along the plane's normal (S, A, R).
        const k = plane === 'axial' ? 2 : plane === 'coronal' ? 1 : 0;
        const step = sliceStepTowardsPlus(layout);
        const next = worldOfDisplayMm(layout, affine, 2.5 * layout.colMm, 2.5 * layout.rowMm, s + step);
        expect(next[k] - o[k]).toBeGreaterThan(0);
      });
    }
  }

  it('extracts the same values a world-coordinate lookup gives, pixel by pixel', () => {
    const affine = gridAffine([2, 0, 1], [-1, 1, -1], [2, 1, 1.5], [6, 0, -4]);
    const dims: Dims = [9, 7, 5];
    const data = new Int16Array(dims[0] * dims[1] * dims[2]).map((_, n) => n);
    const inverse = invertAffine(affine);
    for (const plane of ['axial', 'coronal', 'sagittal'] as Plane[]) {
      const layout = sliceLayout(dims, affine, spacing(affine), plane);
      for (let s = 0; s < layout.depth; s++) {
        const out = new Float32Array(layout.width * layout.height);
        extractSlice(data, dims, layout, s, out);
        for (let r = 0; r < layout.height; r++) {
          for (let c = 0; c < layout.width; c++) {
            const p = worldOfDisplayMm(layout, affine, (c + 0.5) * layout.colMm, (r + 0.5) * layout.rowMm, s);
            const g = [0, 1, 2].map((row) => Math.round(inverse[row * 4] * p[0] + inverse[row * 4 + 1] * p[1] + inverse[row * 4 + 2] * p[2] + inverse[row * 4 + 3]));
            expect(out[r * layout.width + c]).toBe(g[0] + dims[0] * (g[1] + dims[1] * g[2]));
            expect(voxelIndexOfDisplay(layout, dims, c, r, s)).toBe(out[r * layout.width + c]);
          }
        }
      }
    }
  });

  it('world → display → world returns the point', () => {
    const affine = gridAffine([1, 2, 0], [1, -1, -1], [0.9, 1.1, 2.2], [10, 5, -7]);
    const inverse = invertAffine(affine);
    const layout = sliceLayout([30, 30, 30], affine, spacing(affine), 'coronal');
    const p: Vec3 = [12.3, -4.5, 7.8];
    const d = displayMmOfWorld(layout, inverse, p);
    const back = worldOfDisplayMm(layout, affine, d.xMm, d.yMm, d.slice);
    back.forEach((x, c) => expect(x).toBeCloseTo(p[c], 9));
  });

  it('picks for each world axis the grid axis nibabel\'s aff2axcodes picks (python3-nibabel, live)', () => {
    let seed = 12345;
    const rand = () => ((seed = (Math.imul(seed, 1103515245) + 12345) >>> 0) / 2 ** 32);
    const perms: [number, number, number][] = [[0, 1, 2], [0, 2, 1], [1, 0, 2], [1, 2, 0], [2, 0, 1], [2, 1, 0]];
    const cases = Array.from({ length: 30 }, (_, n) => gridAffine(
      perms[n % 6],
      [rand() < 0.5 ? -1 : 1, rand() < 0.5 ? -1 : 1, rand() < 0.5 ? -1 : 1],
      [0.5 + 3 * rand(), 0.5 + 3 * rand(), 0.5 + 3 * rand()],
      [40 * rand() - 20, 40 * rand() - 20, 40 * rand() - 20],
    ));
    const script = [
      'import json, sys', 'import numpy as np', 'from nibabel.orientations import aff2axcodes',
      'cases = json.load(sys.stdin)',
      'print(json.dumps(["".join(aff2axcodes(np.array(a).reshape(4, 4))) for a in cases]))',
    ].join('\n');
    const r = spawnSync('/usr/bin/python3', ['-c', script], { input: JSON.stringify(cases), encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    const nibabel = JSON.parse(r.stdout) as string[];
    const ours = cases.map((a) => {
      const grid = gridAxesOfWorld(a);
      return [0, 1, 2].map((g) => {
        const w = grid.indexOf(g as 0 | 1 | 2);
        return a[w * 4 + g] > 0 ? 'RAS'[w] : 'LPI'[w];
      }).join('');
    });
    expect(ours).toEqual(nibabel);
  });
});

describe('zoom and pan', () => {
  it('fits the slice, and zooming keeps the point under the pointer still', () => {
    const v = fitView(200, 100, 800, 600);
    expect(v.zoom).toBeCloseTo(3.84, 9); // 0.96 × 800 / 200
    const [sx, sy] = toScreen(v, 100, 50);
    expect(sx).toBeCloseTo(400, 9);
    expect(sy).toBeCloseTo(300, 9);
    const z = zoomAt(v, 2, 250, 180, v.zoom);
    const before = toDisplayMm(v, 250, 180), after = toDisplayMm(z, 250, 180);
    expect(after[0]).toBeCloseTo(before[0], 9);
    expect(after[1]).toBeCloseTo(before[1], 9);
    expect(zoomAt(v, 1000, 0, 0, v.zoom).zoom).toBeCloseTo(v.zoom * 16, 9);
  });
});
