import { describe, expect, it } from 'vitest';
import { alignVisit } from '../../src/followup/align.js';
import { describeLiver } from '../../src/followup/liver-shape.js';
import { pointInVisit } from '../../src/followup/visit-point.js';
import { IDENTITY_RIGID } from '../../src/geometry/rigid.js';
import { LANDMARKS, move, movedLandmarks, movedLiver, randomMotion, seeded, unmove, type V3 } from './phantom.js';

// Two follow-up visits shown side by side: a point of one visit is carried into the other through
// both visits' alignments to the baseline. Each visit is the baseline under a known rigid motion
// (the follow-up phantom), so the right answer is analytic: undo one motion, apply the other.
const POINTS: V3[] = [[40, 0, 20], [100, -30, 50], [-30, 40, -10], [60, 35, -25]];
const dist = (a: readonly number[], b: readonly number[]) => Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);

describe('a world point of one visit in another visit', () => {
  it('is where the two known motions put it, through landmark alignments (exact up to rounding)', () => {
    const rand = seeded(7);
    const ma = randomMotion(rand, 15, 20), mb = randomMotion(rand, 15, 20);
    const a = alignVisit({ landmarks: movedLandmarks(ma) }, { landmarks: LANDMARKS }, 'a');
    const b = alignVisit({ landmarks: movedLandmarks(mb) }, { landmarks: LANDMARKS }, 'b');
    expect(a.method).toBe('landmarks');
    for (const p of POINTS) {
      const inA = move(ma, p);
      const truth = move(mb, unmove(ma, inA));
      expect(dist(pointInVisit(inA, a.transform, b.transform), truth)).toBeLessThan(1e-6);
      // And back again.
      expect(dist(pointInVisit(truth, b.transform, a.transform), inA)).toBeLessThan(1e-6);
    }
  });

  it('is within 1.5 mm of the truth through liver-surface alignments', () => {
    const rand = seeded(11);
    const ma = randomMotion(rand, 10, 15), mb = randomMotion(rand, 10, 15);
    const base = describeLiver(movedLiver(null))!;
    const a = alignVisit({ liver: describeLiver(movedLiver(ma)) }, { liver: base }, 'a');
    const b = alignVisit({ liver: describeLiver(movedLiver(mb)) }, { liver: base }, 'b');
    expect(a.method).toBe('liver');
    expect(b.method).toBe('liver');
    // Bound: the alignment's own acceptance (1 mm at the liver's extremes, tests/followup/align.test.ts), twice.
    for (const p of POINTS) {
      const inA = move(ma, p);
      expect(dist(pointInVisit(inA, a.transform, b.transform), move(mb, p))).toBeLessThan(1.5);
    }
  });

  it('leaves the point where it is between the baseline and an unaligned visit', () => {
    expect(pointInVisit([12.5, -3, 40], IDENTITY_RIGID, IDENTITY_RIGID)).toEqual([12.5, -3, 40]);
  });
});
