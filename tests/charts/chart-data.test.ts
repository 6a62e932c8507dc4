import { describe, expect, it } from 'vitest';
import { alertRows } from '../../renderer/charts/alert-rows.js';
import {
  availableCriteria, belowMargin, burdenSeries, dateMs, isoDate, lesionSeries, responseData, timeDomain, trackOfLesion,
  treatmentMarkers, valueScale, visitTicks,
} from '../../renderer/charts/chart-data.js';
import { luminance, needsOutline, segmentColour } from '../../renderer/charts/segment-style.js';
import { runFollowup, type FollowupLesion, type FollowupVisit } from '../../src/followup/followup.js';
import type { SegmentName } from '../../src/segments/segment-map.js';
import type { LesionResult } from '../../src/visit/analyze.js';

const DAY = 86_400_000;

function lesion(id: string, centre: [number, number, number], mm: number, segment: SegmentName | null, extra: Partial<FollowupLesion> = {}): FollowupLesion {
  return { id, centroidMm: centre, segment, longestAxialMm: mm, volumeMl: +(mm ** 3 / 2000).toFixed(2), marginAlert: false, ...extra };
}
const visit = (id: string, date: string, lesions: FollowupLesion[]): FollowupVisit => ({ id, date, lesions, sliceThicknessMm: 2.5 });

// The contract's worked example (RECIST 1.1, Eisenhauer et al. 2009): targets 21.5 + 17.7 = 39.2 mm at
// baseline, 15.2 + 10.5 = 25.7 mm at v2 (−34.4%, PR); then a third visit where the segment V lesion
// grows to 19 mm and a new lesion appears in VI (PD), and the small III lesion is gone.
const series = [
  visit('v1', '2026-01-12', [lesion('L1', [-70, -20, 4], 21.5, 'V'), lesion('L2', [-31, 10, 30], 17.7, 'VIII'), lesion('L3', [40, 1, 0], 8, 'III')]),
  visit('v2', '2026-03-02', [lesion('L1', [-70, -20, 5], 15.2, 'V'), lesion('L2', [-30, 10, 30], 10.5, 'VIII', { marginMm: 4.2 }), lesion('L3', [40, 0, 0], 7, 'III')]),
  visit('v3', '2026-05-04', [lesion('L1', [-70, -20, 5], 19, 'V', { volumeMl: null }), lesion('L2', [-30, 10, 30], 10.5, 'VIII', { marginMm: 12 }), lesion('L4', [-90, -40, -20], 12, 'VI', { marginMm: 0 })]),
];
const f = runFollowup(series, { marginMm: 10 });

describe('chart series from the follow-up', () => {
  it('dates are UTC midnight, written back the same', () => {
    expect(dateMs('2026-01-12')).toBe(Date.UTC(2026, 0, 12));
    expect(isoDate(dateMs('2026-03-02'))).toBe('2026-03-02');
    expect(() => dateMs('12/01/2026')).toThrow(/not an ISO date/);
  });

  it('lesion tracks: every value as the follow-up gives it, grouped in Couinaud order', () => {
    const s = lesionSeries(f);
    expect(s.map((x) => [x.track, x.segment, x.target])).toEqual([
      ['C', 'III', false], ['A', 'V', true], ['D', 'VI', false], ['B', 'VIII', true],
    ]);
    const t1 = s.find((x) => x.track === 'A')!;
    expect(t1.points.map((p) => [p.visit, p.t, p.mm, p.status])).toEqual([
      ['v1', Date.UTC(2026, 0, 12), 21.5, 'present'], ['v2', Date.UTC(2026, 2, 2), 15.2, 'present'], ['v3', Date.UTC(2026, 4, 4), 19, 'present'],
    ]);
    // Gone at v3: drawn at the follow-up's 0 mm, in the segment where it was last seen.
    expect(s.find((x) => x.track === 'C')!.points.map((p) => [p.visit, p.mm, p.segment, p.status])).toEqual([
      ['v1', 8, 'III', 'present'], ['v2', 7, 'III', 'present'], ['v3', 0, 'III', 'gone'],
    ]);
    for (const x of s) for (const p of x.points) expect(p.mm).toBe(f.tracks.find((t) => t.id === x.track)!.longestAxialMm[p.visit]);
  });

  it('response: sums, categories, baseline and nadir; PR at −34.4% and PD for the new lesion (RECIST 1.1)', () => {
    const r = responseData(f);
    expect(r.criteria).toBe('RECIST 1.1');
    expect(r.targets).toEqual(['A', 'B']);
    expect(r.points.map((p) => [p.visit, p.sumMm, p.category, p.changeFromBaselinePct])).toEqual([
      ['v1', 39.2, null, 0], ['v2', 25.7, 'PR', -34.4], ['v3', 29.5, 'PD', -24.7],
    ]);
    expect(r.baselineMm).toBe(39.2);
    expect(r.nadir).toMatchObject({ visit: 'v2', sumMm: 25.7 });
    expect(availableCriteria(f)).toEqual(['RECIST 1.1']);
  });

  it('burden: one series per segment with every visit, zeros included; volume null where a mark had none', () => {
    const b = burdenSeries(f);
    expect(b.map((x) => x.segment)).toEqual(['III', 'V', 'VI', 'VIII']);
    expect(b.find((x) => x.segment === 'VI')!.points.map((p) => [p.visit, p.count, p.sumMm, p.volumeMl])).toEqual([
      ['v1', 0, 0, 0], ['v2', 0, 0, 0], ['v3', 1, 12, 0.86],
    ]);
    expect(b.find((x) => x.segment === 'V')!.points.map((p) => p.volumeMl)).toEqual([4.97, 1.76, null]);
    const rows = b.flatMap((x) => x.points);
    expect(rows).toHaveLength(f.burden.length);
    for (const row of f.burden) {
      expect(rows.find((p) => p.visit === row.visit && p.segment === row.segment)).toMatchObject({ count: row.count, sumMm: row.sumLongestAxialMm, volumeMl: row.volumeMl });
    }
  });

  it('time axis: ticks at the visits, a domain padded to hold treatments too', () => {
    const ticks = visitTicks(f);
    expect(ticks.map(isoDate)).toEqual(['2026-01-12', '2026-03-02', '2026-05-04']);
    const markers = treatmentMarkers([{ date: '2026-05-20', kind: 'resection', label: 'Right hepatectomy' }, { date: '2026-01-20', kind: 'therapy-start', label: 'Chemotherapy' }]);
    expect(markers.map((m) => m.date)).toEqual(['2026-01-20', '2026-05-20']);
    const [lo, hi] = timeDomain([...ticks, ...markers.map((m) => m.t)]);
    expect(lo).toBe(ticks[0] - 14 * DAY);
    expect(hi).toBe(markers[1].t + 14 * DAY);
    // Value axes from 0 with 1-2-2.5-5 steps, at most six intervals, 10% headroom over the largest value.
    expect(valueScale([39.2, 25.7, null])).toEqual({ max: 50, ticks: [0, 10, 20, 30, 40, 50] });
    expect(valueScale([8.34, 6.75])).toEqual({ max: 10, ticks: [0, 2, 4, 6, 8, 10] });
    expect(valueScale([23.7, 5])).toEqual({ max: 30, ticks: [0, 5, 10, 15, 20, 25, 30] });
    expect(valueScale([0.61])).toEqual({ max: 0.8, ticks: [0, 0.2, 0.4, 0.6, 0.8] });
    expect(valueScale([])).toEqual({ max: 1, ticks: [0, 0.2, 0.4, 0.6, 0.8, 1] });
  });

  it('margin alerts: lesions at or within the set margin, latest visit first, with track and neighbour', () => {
    const lr = (l: FollowupLesion, nearest: SegmentName | null): LesionResult =>
      ({ ...l, viableAxialMm: undefined, marginMm: l.marginMm ?? null, nearestOtherSegment: nearest, segmentFractions: {}, shortAxisMm: 0, source: 'mask', max3dMm: null, meanValue: null, longestAxialEndpointsMm: null, voxelCount: 0, segmentWarning: null });
    const visits = series.map((v) => ({ id: v.id, date: v.date, analysis: { lesions: v.lesions.map((l) => lr(l, l.segment === 'VI' ? 'V' : 'IVa')) } }));
    expect(alertRows(f, visits).map((r) => [r.visit, r.lesion, r.track, r.target, r.segment, r.nearestOtherSegment, r.marginMm])).toEqual([
      ['v3', 'L4', 'D', false, 'VI', 'V', 0],
      ['v2', 'L2', 'B', true, 'VIII', 'IVa', 4.2],
    ]);
    // The same lesions the follow-up lists as alerts, visit by visit (track ids).
    expect(f.visits.map((v) => v.marginAlerts)).toEqual([[], ['B'], ['D']]);
    // At the set margin is an alert (≤); just beyond it is not.
    expect(belowMargin({ marginMm: 10, marginAlert: false }, 10)).toBe(true);
    expect(belowMargin({ marginMm: 10.1, marginAlert: true }, 10)).toBe(false);
    expect(belowMargin({ marginAlert: true }, 10)).toBe(true);
    expect(trackOfLesion(f).get('v3/L4')).toBe('D');
  });
});

describe('segment drawing style', () => {
  it('uses the shared palette and outlines only the colour too light for white (Okabe-Ito yellow)', () => {
    // WCAG 2 relative luminance: white 1, black 0.
    expect(luminance('#FFFFFF')).toBeCloseTo(1, 6);
    expect(luminance('#000000')).toBe(0);
    const light = (['I', 'II', 'III', 'IVa', 'IVb', 'V', 'VI', 'VII', 'VIII'] as const).filter((s) => needsOutline(s));
    expect(light.map((s) => segmentColour(s).toUpperCase())).toEqual(['#F0E442']);
    expect(segmentColour(null)).toBe('#7f7f7f');
  });
});
