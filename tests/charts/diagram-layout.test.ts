import { describe, expect, it } from 'vitest';
import {
  CAUDATE, dotRadius, insidePolygon, lineX, MIDDLE_HEPATIC_VEIN, outlinePolygon, PORTAL_Y, REGIONS, RIGHT_HEPATIC_VEIN, slotPosition,
  UMBILICAL_FISSURE, type Point,
} from '../../renderer/diagram/layout.js';
import { placeLesions } from '../../renderer/diagram/placement.js';
import { runFollowup, type FollowupLesion } from '../../src/followup/followup.js';
import type { SegmentName } from '../../src/segments/segment-map.js';

const outline = outlinePolygon();
const inCaudate = ([x, y]: Point) => ((x - CAUDATE.cx) / CAUDATE.rx) ** 2 + ((y - CAUDATE.cy) / CAUDATE.ry) ** 2 <= 1;

describe('segment diagram layout', () => {
  it('keeps the plane rule\'s order: VII/VI, VIII/V, IV, II/III from the patient\'s right (viewer\'s left), upper above the portal line', () => {
    // Couinaud anatomy, common practice: right hepatic vein, middle hepatic vein, umbilical fissure.
    for (const y of [60, PORTAL_Y, 320]) {
      expect(lineX(RIGHT_HEPATIC_VEIN, y)).toBeLessThan(lineX(MIDDLE_HEPATIC_VEIN, y));
      expect(lineX(MIDDLE_HEPATIC_VEIN, y)).toBeLessThan(lineX(UMBILICAL_FISSURE, y));
    }
    const centre = (s: keyof typeof REGIONS) => REGIONS[s].anchor;
    expect(centre('VII')[1]).toBeLessThan(PORTAL_Y);
    expect(centre('VI')[1]).toBeGreaterThan(PORTAL_Y);
    expect(centre('IVa')[1]).toBeLessThan(PORTAL_Y);
    expect(centre('IVb')[1]).toBeGreaterThan(PORTAL_Y);
    expect(centre('VII')[0]).toBeLessThan(centre('VIII')[0]);
    expect(centre('VIII')[0]).toBeLessThan(centre('IVa')[0]);
    expect(centre('IVa')[0]).toBeLessThan(centre('II')[0]);
  });

  it('places every slot (up to eight lesions a segment) inside its own region and the outline, clear of the caudate', () => {
    for (const [segment, region] of Object.entries(REGIONS)) {
      for (let n = 1; n <= 8; n++) {
        for (let k = 0; k < n; k++) {
          const p = slotPosition(region.anchor, region.anchorRadius, k, n);
          expect(insidePolygon(p, region.polygon), `${segment} slot ${k}/${n}`).toBe(true);
          expect(insidePolygon(p, outline), `${segment} slot ${k}/${n} in the outline`).toBe(true);
          expect(inCaudate(p), `${segment} slot ${k}/${n} clear of I`).toBe(false);
        }
      }
      expect(insidePolygon(region.labelAt, outline), `${segment} label`).toBe(true);
    }
  });

  it('sizes dots by diameter (1 px per mm) within limits', () => {
    expect(dotRadius(20)).toBe(10);
    expect(dotRadius(32.2)).toBeCloseTo(16.1, 6);
    expect(dotRadius(1)).toBe(3);
    expect(dotRadius(200)).toBe(30);
  });

  it('keeps a lesion on the same spot from visit to visit, and marks new lesions and alerts', () => {
    const l = (id: string, c: [number, number, number], mm: number, segment: SegmentName, marginMm: number | null = 20): FollowupLesion & { nearestOtherSegment: SegmentName | null; marginMm: number | null } =>
      ({ id, centroidMm: c, segment, longestAxialMm: mm, volumeMl: null, marginAlert: false, marginMm, nearestOtherSegment: 'VIII' });
    const visits = [
      { id: 'v1', date: '2026-01-12', sliceThicknessMm: 2.5, lesions: [l('L1', [-70, -20, 4], 21.5, 'V'), l('L2', [-60, -10, 4], 12, 'V')] },
      { id: 'v2', date: '2026-03-02', sliceThicknessMm: 2.5, lesions: [l('L1', [-60, -10, 4], 11, 'V', 3), l('L2', [-70, -20, 4], 20, 'V'), l('L3', [40, 0, 0], 9, 'III')] },
    ];
    const f = runFollowup(visits, { marginMm: 10 });
    const at1 = placeLesions(f, visits, 'v1');
    const at2 = placeLesions(f, visits, 'v2');
    const spot = (ps: typeof at1, track: string) => ps.find((p) => p.track === track)!.at;
    expect(spot(at2, 'T1')).toEqual(spot(at1, 'T1'));
    expect(spot(at2, 'T2')).toEqual(spot(at1, 'T2'));
    expect(spot(at1, 'T1')).not.toEqual(spot(at1, 'T2'));
    expect(at2.map((p) => [p.lesion, p.track, p.isNew, p.alert])).toEqual([
      ['L2', 'T1', false, false], ['L1', 'T2', false, true], ['L3', 'T3', true, false],
    ]);
  });
});
