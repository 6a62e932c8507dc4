import { describe, expect, it } from 'vitest';
import { describeLiver } from '../../src/followup/liver-shape.js';
import { LANDMARK_NAMES } from '../../src/segments/landmarks.js';
import { proposeLandmarks } from '../../src/segments/propose.js';
import { LANDMARKS, move, movedLandmarks, movedLiver, randomMotion, seeded } from '../followup/phantom.js';

// Landmarks carried from an earlier visit to a later one through the follow-up's liver alignment:
// a later visit is the earlier liver under a known rigid motion (the follow-up phantom), so the
// proposed points must land where the motion puts the earlier ones. Bound: the alignment's own
// acceptance criterion (1 mm at the liver's extremes), checked in tests/followup/align.test.ts.
describe('landmarks proposed from an earlier visit', () => {
  it('puts each of the six points where the known motion takes it, within 1.5 mm', () => {
    const m = randomMotion(seeded(31), 12, 15);
    const earlier = { landmarks: LANDMARKS, liver: describeLiver(movedLiver(null))! };
    const later = { liver: describeLiver(movedLiver(m))! };
    const proposed = proposeLandmarks(earlier, later, 'v2');
    expect(proposed).not.toBeNull();
    expect(proposed!.alignment.method).toBe('liver');
    expect(proposed!.alignment.residualMm).toBeLessThan(1);
    const truth = movedLandmarks(m);
    for (const name of LANDMARK_NAMES) {
      const p = proposed!.set.points[name], q = truth.points[name];
      expect(Math.hypot(p[0] - q[0], p[1] - q[1], p[2] - q[2])).toBeLessThan(1.5);
    }
    // And they moved: the motion is not small.
    const moved = LANDMARK_NAMES.map((n) => Math.hypot(...[0, 1, 2].map((c) => truth.points[n][c] - LANDMARKS.points[n][c])));
    expect(Math.max(...moved)).toBeGreaterThan(5);
  });

  it('carries the optional umbilical point of the left portal vein with the six, by the same motion', () => {
    const m = randomMotion(seeded(31), 12, 15);
    const extra: [number, number, number] = [-45, 30, 5];
    const earlier = { landmarks: { points: { ...LANDMARKS.points, left_portal_umbilical: extra } }, liver: describeLiver(movedLiver(null))! };
    const proposed = proposeLandmarks(earlier, { liver: describeLiver(movedLiver(m))! }, 'v2')!;
    const p = proposed.set.points.left_portal_umbilical!;
    const q = move(m, extra);
    expect(Math.hypot(p[0] - q[0], p[1] - q[1], p[2] - q[2])).toBeLessThan(1.5);
    // Without it, none is invented.
    expect(proposeLandmarks({ ...earlier, landmarks: LANDMARKS }, { liver: describeLiver(movedLiver(m))! }, 'v2')!.set.points.left_portal_umbilical).toBeUndefined();
  });
});
