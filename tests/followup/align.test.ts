import { describe, expect, it } from 'vitest';
import { transpose3 } from '../../src/geometry/eigen.js';
import { applyRigid } from '../../src/geometry/rigid.js';
import { alignVisit } from '../../src/followup/align.js';
import { describeLiver, insideGrid } from '../../src/followup/liver-shape.js';
import { checkLandmarks } from '../../src/segments/landmarks.js';
import { angleBetween, gridAround, inLiver, LANDMARKS, LIVER, maskVolume, move, movedLandmarks, movedLiver, randomMotion, seeded, unmove, type Motion, type V3 } from './phantom.js';

// Source for the bounds: the product's acceptance criterion (a known rigid motion recovered within
// 1 mm and 0.5°). Displacement error is measured at the liver centroid and at the far end of the
// bump, so a small rotation error cannot hide behind a well-placed centroid.
function expectRecovered(transform: { rotation: readonly number[]; translation: readonly number[] }, m: Motion) {
  expect(angleBetween(transform.rotation, transpose3(m.R))).toBeLessThan(0.5);
  const far: V3 = [LIVER.bump.centre[0] - LIVER.bump.radius, LIVER.bump.centre[1], LIVER.bump.centre[2]];
  for (const p of [LIVER.centre, far, [LIVER.centre[0] + LIVER.semi[0], LIVER.centre[1], LIVER.centre[2]] as V3]) {
    const q = applyRigid({ rotation: transform.rotation, translation: transform.translation as V3 }, move(m, p));
    expect(Math.hypot(q[0] - p[0], q[1] - p[1], q[2] - p[2])).toBeLessThan(1);
  }
}

describe('visit alignment', () => {
  const reference = describeLiver(movedLiver(null));

  it('uses the landmark sets when both visits have one', () => {
    expect(() => checkLandmarks(LANDMARKS, 'phantom')).not.toThrow();
    const m = randomMotion(seeded(11), 15, 20);
    const moved = movedLandmarks(m);
    const a = alignVisit({ landmarks: moved }, { landmarks: LANDMARKS }, 'v2');
    expect(a.method).toBe('landmarks');
    expect(a.residualMm).toBeLessThan(1e-6);
    expectRecovered(a.transform, m);
  });

  it('recovers known rigid motions from the liver masks alone (axes, sign choice, surface ICP)', () => {
    const rand = seeded(4242);
    for (let trial = 0; trial < 3; trial++) {
      // Up to 25° exercises the axis-sign search; serial scans usually differ by far less.
      const m = randomMotion(rand, 25, 25);
      const shape = describeLiver(movedLiver(m, trial === 2 ? [1.6, 1.6, 2.5] : [2, 2, 2]));
      const a = alignVisit({ liver: shape }, { liver: reference }, 'v2');
      expect(a.method).toBe('liver');
      expect(a.residualMm).toBeLessThan(1);
      expectRecovered(a.transform, m);
    }
  });

  it('copes with a resected tip: trimming keeps the rest of the surface in charge', () => {
    // The later liver lacks its right tip, the last 30 mm of its 190 mm width; the trimmed fit
    // still recovers the motion within 1 mm and 0.5°.
    const m = randomMotion(seeded(77), 15, 20);
    const { dims, affine } = gridAround(m);
    const cut = LIVER.centre[0] + LIVER.semi[0] - 30;
    const shape = describeLiver(maskVolume(dims, affine, (p) => {
      const q = unmove(m, p);
      return q[0] < cut && inLiver(q);
    }));
    const a = alignVisit({ liver: shape }, { liver: reference }, 'v2');
    expectRecovered(a.transform, m);
  });

  it('leaves world coordinates unchanged, with a warning, when the visits share nothing to align on', () => {
    const a = alignVisit({ landmarks: LANDMARKS }, { liver: reference }, 'v3');
    expect(a.method).toBe('none');
    expect(a.residualMm).toBeNull();
    expect(a.warnings.join(' ')).toMatch(/unaligned/);
  });

  it('keeps the grid so a point outside the scanned field can be told apart', () => {
    expect(reference).not.toBeNull();
    expect(insideGrid(reference!, LIVER.centre)).toBe(true);
    expect(insideGrid(reference!, [LIVER.centre[0], LIVER.centre[1], LIVER.centre[2] + 400])).toBe(false);
  });
});
