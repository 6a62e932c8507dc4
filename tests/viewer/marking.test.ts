import { describe, expect, it } from 'vitest';
import { parseMarks } from '../../src/lesions/marks.js';
import type { LandmarkSet } from '../../src/segments/landmarks.js';
import { markFromCaliper, markJson, nextMarkId, shortAxisEnds, shortAxisOfDrag } from '../../renderer/viewer/caliper.js';
import { landmarkProblems, landmarkQcNotes } from '../../renderer/viewer/landmark-qc.js';
import { LANDMARKS } from '../store/fixtures.js';

describe('caliper marks', () => {
  it('a caliper gives centre, longest diameter and endpoints that the marks reader accepts', () => {
    const m = markFromCaliper('M4', [10.04, -20, 33.5], [22.11, -15.02, 33.5], 9.96);
    expect(m.endpointsMm).toEqual([[10, -20, 33.5], [22.1, -15, 33.5]]);
    expect(m.centreMm).toEqual([16.1, -17.5, 33.5]);
    expect(m.longestAxialMm).toBe(13.1); // hypot(12.1, 5) = 13.09
    expect(m.shortAxisMm).toBe(10);
    const file = JSON.stringify({ space: 'RAS', units: 'mm', marks: [markJson(m)] });
    expect(parseMarks(file, 'marks.json')).toEqual([m]);
  });

  it('keeps a viable diameter typed with the caliper, and the marks reader accepts it back', () => {
    // mRECIST (Lencioni and Llovet 2010, from memory): the viable part is no longer than the lesion.
    const m = markFromCaliper('M2', [0, 0, 0], [20, 0, 0], 12, 7.5);
    expect(m.viableAxialMm).toBe(7.5);
    expect(parseMarks(JSON.stringify({ marks: [markJson(m)] }), 'marks.json')[0].viableAxialMm).toBe(7.5);
    // A caliper moved shorter than the viable diameter keeps the viable one within the lesion.
    expect(markFromCaliper('M2', [0, 0, 0], [6, 0, 0], 5, 7.5).viableAxialMm).toBe(6);
  });

  it('caps the short axis at the longest diameter (RECIST: the short axis is the lesser one)', () => {
    expect(markFromCaliper('M1', [0, 0, 0], [10, 0, 0], 14).shortAxisMm).toBe(10);
  });

  it('measures the short axis across the long axis, whatever the drag\'s slant', () => {
    // Long axis along x; a drag from (3, 1) to (7, 9) spans 8 mm across it.
    expect(shortAxisOfDrag([0, 0, 5], [20, 0, 5], [3, 1, 5], [7, 9, 5])).toBeCloseTo(8, 9);
    // Long axis at 45°: a drag along the other diagonal is all across.
    expect(shortAxisOfDrag([0, 0, 0], [10, 10, 0], [0, 6, 0], [6, 0, 0])).toBeCloseTo(Math.hypot(6, 6), 9);
    const ends = shortAxisEnds(markFromCaliper('M1', [0, 0, 0], [20, 0, 0], 8))!;
    expect(ends[0][1] - ends[1][1]).toBeCloseTo(-8, 9);
    expect(ends[0][0]).toBeCloseTo(10, 9);
  });

  it('numbers new marks after the highest M number and never reuses an id', () => {
    expect(nextMarkId(['L1', 'L2'])).toBe('M1');
    expect(nextMarkId(['L1', 'M1', 'M7', 'M3'])).toBe('M8');
    expect(nextMarkId([])).toBe('M1');
  });
});

describe('landmark messages beside each landmark', () => {
  const base: LandmarkSet = { points: LANDMARKS.points as unknown as LandmarkSet['points'] };
  const moved = (changes: Partial<LandmarkSet['points']>): LandmarkSet => ({ points: { ...base.points, ...changes } });

  it('a usable set has no problems', () => {
    expect(landmarkProblems(base)).toBeNull();
  });

  it('files each problem of the core check under the landmark it is about', () => {
    // Right and middle hepatic veins placed the wrong way round: the right-to-left order is broken. Each
    // vein plane faces away from its medial neighbour, so the checks that fire name the right hepatic
    // vein (against the middle vein's plane) and the umbilical fissure (against the right vein's plane).
    const notes = landmarkProblems(moved({ middle_hepatic_vein: base.points.right_hepatic_vein, right_hepatic_vein: base.points.middle_hepatic_vein }))!;
    expect(Object.keys(notes.byLandmark).sort()).toEqual(['right_hepatic_vein', 'umbilical_fissure']);
    expect(notes.byLandmark.right_hepatic_vein!.join(' ')).toMatch(/^right hepatic vein is not right of the middle hepatic vein plane/);
    expect(notes.byLandmark.umbilical_fissure!.join(' ')).toMatch(/^umbilical fissure is not left of the right hepatic vein plane/);
    // IVC points swapped: the message belongs to the upper point.
    const swapped = landmarkProblems(moved({ ivc_superior: base.points.ivc_inferior, ivc_inferior: base.points.ivc_superior }))!;
    expect(swapped.byLandmark.ivc_superior![0]).toMatch(/is not above ivc, lower point/);
  });

  it('names the landmark the configuration check points to, against the other visits', () => {
    // The same configuration moved rigidly at another visit, then one point displaced by 20 mm.
    const shifted = (s: LandmarkSet): LandmarkSet => ({ points: Object.fromEntries(Object.entries(s.points).map(([k, p]) => [k, [p[0] + 5, p[1] - 3, p[2] + 12]])) as unknown as LandmarkSet['points'] });
    const displaced = moved({ umbilical_fissure: [base.points.umbilical_fissure[0] - 20, base.points.umbilical_fissure[1], base.points.umbilical_fissure[2]] });
    const notes = landmarkQcNotes(displaced, [{ visitId: 'v1', set: shifted(base) }])!;
    expect(Object.keys(notes.byLandmark)).toEqual(['umbilical_fissure']);
    expect(notes.byLandmark.umbilical_fissure![0]).toMatch(/^Check this point/);
    expect(notes.general[0]).toMatch(/^Compared with visit v1: .*largest change is \d+\.\d mm/);
    expect(landmarkQcNotes(base, [{ visitId: 'v1', set: shifted(base) }])!.byLandmark).toEqual({});
    expect(landmarkQcNotes(base, [])).toBeNull();
  });
});
