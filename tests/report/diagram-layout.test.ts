import { describe, expect, it } from 'vitest';
import { diagramDrawing } from '../../src/report/diagram-drawing.js';
import {
  CAUDATE, dotRadius, insideOutline, insidePolygon, lineX, MIDDLE_HEPATIC_VEIN, OUTSIDE_REGION, outlinePolygon, PORTAL_Y, REGIONS, RIGHT_HEPATIC_VEIN,
  shownRegions, slotPosition, UMBILICAL_FISSURE, VIEW_HEIGHT, VIEW_WIDTH, type Point,
} from '../../src/report/diagram-layout.js';
import { placeLesions } from '../../src/report/diagram-placement.js';
import { runFollowup, type FollowupLesion } from '../../src/followup/followup.js';
import type { SegmentName } from '../../src/segments/segment-map.js';

const outline = outlinePolygon();
const inCaudate = ([x, y]: Point, pad = 0) => ((x - CAUDATE.cx) / (CAUDATE.rx + pad)) ** 2 + ((y - CAUDATE.cy) / (CAUDATE.ry + pad)) ** 2 <= 1;
const area = (poly: readonly Point[]) => Math.abs(poly.reduce((s, p, i) => s + p[0] * poly[(i + 1) % poly.length][1] - poly[(i + 1) % poly.length][0] * p[1], 0)) / 2;

describe('segment diagram layout', () => {
  it('keeps the plane rule\'s order: VII/VI, VIII/V, IV, II/III from the patient\'s right (drawing\'s left), upper above the portal line', () => {
    // Couinaud anatomy, common practice: right hepatic vein, middle hepatic vein, umbilical fissure.
    for (const y of [60, PORTAL_Y, 320]) {
      expect(lineX(RIGHT_HEPATIC_VEIN, y)).toBeLessThan(lineX(MIDDLE_HEPATIC_VEIN, y));
      expect(lineX(MIDDLE_HEPATIC_VEIN, y)).toBeLessThan(lineX(UMBILICAL_FISSURE, y));
    }
    const centre = (s: keyof typeof REGIONS) => REGIONS[s].anchor;
    for (const s of ['VII', 'VIII', 'IVa', 'II'] as const) expect(centre(s)[1], s).toBeLessThan(PORTAL_Y);
    for (const s of ['VI', 'V', 'IVb', 'III'] as const) expect(centre(s)[1], s).toBeGreaterThan(PORTAL_Y);
    expect(centre('VII')[0]).toBeLessThan(centre('VIII')[0]);
    expect(centre('VIII')[0]).toBeLessThan(centre('IVa')[0]);
    expect(centre('IVa')[0]).toBeLessThan(centre('II')[0]);
  });

  it('cuts the outline into regions that tile it: IV is IVa and IVb together', () => {
    const whole = area(outline);
    const split = (['VII', 'VI', 'VIII', 'V', 'IVa', 'IVb', 'II', 'III'] as const).reduce((s, k) => s + area(REGIONS[k].polygon), 0);
    expect(split / whole).toBeCloseTo(1, 6);
    expect(area(REGIONS.IV.polygon)).toBeCloseTo(area(REGIONS.IVa.polygon) + area(REGIONS.IVb.polygon), 6);
    for (const p of REGIONS.VII.polygon) expect(p[1]).toBeLessThanOrEqual(PORTAL_Y + 1e-9);
    expect(shownRegions(['I', 'II', 'III', 'IV', 'V', 'VI', 'VII', 'VIII'])).toContain('IV');
    expect(shownRegions(['II', 'III', 'IVa', 'IVb', 'V', 'VI', 'VII', 'VIII'])).toEqual(expect.arrayContaining(['IVa', 'IVb']));
    expect(shownRegions(['II', 'III', 'IVa', 'IVb', 'V', 'VI', 'VII', 'VIII'])).not.toContain('IV');
  });

  it('places every slot (up to eight lesions a segment) inside its own region, clear of segment I and of the segment\'s name', () => {
    for (const [segment, region] of Object.entries(REGIONS)) {
      for (let n = 1; n <= 8; n++) {
        for (let k = 0; k < n; k++) {
          const p = slotPosition(region.anchor, region.anchorRadius, k, n);
          expect(insidePolygon(p, region.polygon), `${segment} slot ${k}/${n}`).toBe(true);
          // The smallest dot (3 units) drawn there does not touch the island.
          expect(inCaudate(p, 3), `${segment} slot ${k}/${n} clear of I`).toBe(false);
          // The segment's name stays readable beside a mid-sized (20 mm) dot.
          expect(Math.hypot(p[0] - region.labelAt[0], p[1] - region.labelAt[1]), `${segment} slot ${k}/${n} clear of its name`).toBeGreaterThan(24);
        }
      }
      expect(insidePolygon(region.labelAt, region.polygon), `${segment} label in its region`).toBe(true);
      expect(inCaudate(region.labelAt, 6), `${segment} label clear of I`).toBe(false);
    }
    // The box for lesions outside the map lies outside the liver.
    expect(insidePolygon(OUTSIDE_REGION.anchor, outline)).toBe(false);
  });

  it('stops the cuts at the outline', () => {
    const [piece] = insideOutline([200, 30], [110, 360]);
    expect(insidePolygon([(piece[0][0] + piece[1][0]) / 2, (piece[0][1] + piece[1][1]) / 2], outline)).toBe(true);
    expect(piece[0][1]).toBeGreaterThan(30);
    expect(piece[1][1]).toBeLessThan(360);
    expect(insideOutline([0, 10], [VIEW_WIDTH, 10])).toEqual([]);
  });

  it('sizes dots by diameter (one drawing unit per mm) within limits', () => {
    expect(dotRadius(20)).toBe(10);
    expect(dotRadius(32.2)).toBeCloseTo(16.1, 6);
    expect(dotRadius(1)).toBe(3);
    expect(dotRadius(200)).toBe(30);
  });
});

describe('lesion placement', () => {
  const l = (id: string, c: [number, number, number], mm: number, segment: SegmentName | null, marginMm: number | null = 20): FollowupLesion & { nearestOtherSegment: SegmentName | null; marginMm: number | null } =>
    ({ id, centroidMm: c, segment, longestAxialMm: mm, volumeMl: null, marginAlert: false, marginMm, nearestOtherSegment: 'VIII' });
  const visits = [
    { id: 'v1', date: '2026-01-12', sliceThicknessMm: 2.5, lesions: [l('L1', [-70, -20, 4], 21.5, 'V'), l('L2', [-60, -10, 4], 12, 'V')] },
    { id: 'v2', date: '2026-03-02', sliceThicknessMm: 2.5, lesions: [l('L1', [-60, -10, 4], 11, 'V', 3), l('L2', [-70, -20, 4], 20, 'V'), l('L3', [40, 0, 0], 9, 'III'), l('L4', [90, 90, 0], 7, null)] },
  ];
  const f = runFollowup(visits, { marginMm: 10 });

  it('keeps a lesion on the same spot from visit to visit, and marks targets, new lesions and alerts', () => {
    const at1 = placeLesions(f, visits, 'v1');
    const at2 = placeLesions(f, visits, 'v2');
    const spot = (ps: typeof at1, track: string) => ps.find((p) => p.track === track)!.at;
    expect(spot(at2, 'A')).toEqual(spot(at1, 'A'));
    expect(spot(at2, 'B')).toEqual(spot(at1, 'B'));
    expect(spot(at1, 'A')).not.toEqual(spot(at1, 'B'));
    expect(at2.map((p) => [p.lesion, p.track, p.isNew, p.alert])).toEqual([
      ['L2', 'A', false, false], ['L1', 'B', false, true], ['L3', 'C', true, false], ['L4', 'D', true, false],
    ]);
    // Default RECIST 1.1 targets (measurable at baseline): A and B.
    expect(at2.filter((p) => p.target).map((p) => p.track)).toEqual(f.targets.tracks.filter((t) => at2.some((p) => p.track === t)));
    expect(at2.find((p) => p.track === 'A')!.target).toBe(true);
    expect(at2.find((p) => p.segment === null)!.at).toEqual(OUTSIDE_REGION.anchor);
  });

  it('draws the same shapes for the app and the page: regions named as the map has them, one mark per lesion', () => {
    const lesions = placeLesions(f, visits, 'v2');
    const d = diagramDrawing({ segments: ['I', 'II', 'III', 'IVa', 'IVb', 'V', 'VI', 'VII', 'VIII'], lesions, label: 'v2' });
    expect(d.viewBox).toBe(`0 0 ${VIEW_WIDTH} ${VIEW_HEIGHT}`);
    const regions = d.base.filter((s) => s.attrs['data-segment-region'] !== undefined).map((s) => s.attrs['data-segment-region']);
    expect(regions.sort()).toEqual(['I', 'II', 'III', 'IVa', 'IVb', 'V', 'VI', 'VII', 'VIII']);
    expect(d.lesions.map((m) => m.label.text)).toEqual(['A', 'B', 'C new', 'D new']);
    const dot = (track: string) => d.lesions.find((m) => m.lesion.track === track)!.shapes.find((s) => s.attrs.class === 'lesion-dot')!.attrs;
    expect(dot('A').fill).not.toBe(dot('C').fill); // target filled, other open
    expect(d.lesions.find((m) => m.lesion.track === 'B')!.shapes).toHaveLength(2); // ring for the alert
    expect(d.base.some((s) => s.text === 'outside the segment map')).toBe(true);
    for (const s of [...d.base, ...d.lesions.flatMap((m) => [...m.shapes, m.label])]) expect(Object.keys(s.attrs)).not.toContain('style');
  });
});

describe('a lesion crossing a segment border', () => {
  // 60% of the lesion's voxels in V, 40% in VIII (margin 0: it spans segments, brief: measures).
  const crossing = {
    id: 'L1', centroidMm: [-70, -20, 4] as [number, number, number], segment: 'V' as SegmentName, longestAxialMm: 24, volumeMl: 3,
    marginAlert: true, marginMm: 0, nearestOtherSegment: 'VIII' as SegmentName, segmentFractions: { V: 0.6, VIII: 0.4 },
  };
  const inside = { ...crossing, id: 'L2', centroidMm: [40, 0, 0] as [number, number, number], segment: 'III' as SegmentName, marginMm: 30, nearestOtherSegment: 'II' as SegmentName, segmentFractions: { III: 1 } };
  const visits = [{ id: 'v1', date: '2026-01-12', sliceThicknessMm: 2.5, lesions: [crossing, inside] }];
  const f = runFollowup(visits, { marginMm: 10 });

  it('is drawn on the border between its two segments, with the share in each', () => {
    const [onBorder, inIII] = placeLesions(f, visits, 'v1');
    expect(onBorder.crossing).toEqual(['V', 'VIII']);
    expect(onBorder.shares).toEqual([{ segment: 'V', share: 0.6 }, { segment: 'VIII', share: 0.4 }]);
    // V and VIII meet on the portal line between the right and middle hepatic veins.
    expect(onBorder.at[1]).toBeCloseTo(PORTAL_Y, 9);
    expect(onBorder.at[0]).toBeGreaterThan(lineX(RIGHT_HEPATIC_VEIN, PORTAL_Y));
    expect(onBorder.at[0]).toBeLessThan(lineX(MIDDLE_HEPATIC_VEIN, PORTAL_Y));
    expect(inIII.crossing).toBeNull();
    expect(insidePolygon(inIII.at, REGIONS.III.polygon)).toBe(true);
    const d = diagramDrawing({ segments: ['I', 'II', 'III', 'IV', 'V', 'VI', 'VII', 'VIII'], lesions: [onBorder, inIII], label: 'v1' });
    expect(d.lesions[0].label.text).toBe('A V 60% / VIII 40%');
    expect(d.lesions[0].attrs['data-crossing']).toBe('V|VIII');
    expect(d.lesions[0].title).toContain('crossing the border: V 60% / VIII 40%');
    expect(d.lesions[1].label.text).toBe('B');
  });
});
