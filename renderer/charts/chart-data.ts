import type { FollowupResult } from '../../src/followup/followup.js';
import { compareTrackIds } from '../../src/followup/ids.js';
import type { OverallCategory } from '../../src/followup/recist.js';
import type { Criteria, VisitResponse } from '../../src/followup/response.js';
import type { TrackStatus } from '../../src/followup/tracks.js';
import { SEGMENT_NAMES, type SegmentName } from '../../src/segments/segment-map.js';

/**
 * The follow-up result turned into chart series. Values are passed through exactly as the follow-up
 * gives them (no rounding, no interpolation), so what a chart plots is what the command line prints.
 * Time is epoch milliseconds of the visit's date at 00:00 UTC, so a date never shifts with the
 * computer's time zone.
 */

const DAY_MS = 86_400_000;

export function dateMs(isoDate: string): number {
  const t = Date.parse(`${isoDate}T00:00:00Z`);
  if (!Number.isFinite(t)) throw new Error(`not an ISO date: ${isoDate}`);
  return t;
}

/** Epoch milliseconds back to YYYY-MM-DD (UTC, the inverse of dateMs). */
export function isoDate(t: number): string {
  return new Date(t).toISOString().slice(0, 10);
}

export interface TimePoint {
  visit: string;
  date: string;
  t: number;
}

export interface LesionPoint extends TimePoint {
  track: string;
  /** Longest axial diameter, mm (the sum over fragments; 0 when gone or merged). */
  mm: number;
  segment: SegmentName | null;
  status: TrackStatus;
}

export interface LesionSeries {
  track: string;
  /** The segment where the track was last seen. */
  segment: SegmentName | null;
  target: boolean;
  points: LesionPoint[];
}

/** Segment order for grouping: Couinaud order, outside last. */
export function segmentRank(s: SegmentName | null): number {
  return s === null ? SEGMENT_NAMES.length : SEGMENT_NAMES.indexOf(s);
}

/** Every lesion track's longest axial diameter over time, grouped by segment, then track id. */
export function lesionSeries(f: FollowupResult): LesionSeries[] {
  const series = f.tracks.map((track) => {
    const points: LesionPoint[] = [];
    let segment: SegmentName | null = null;
    for (const v of f.visits) {
      const mm = track.longestAxialMm[v.id];
      if (mm === undefined) continue;
      // A gone or merged track has no segment at the visit: it keeps the one where it was last seen.
      if (v.id in track.segments) segment = track.segments[v.id];
      points.push({ visit: v.id, date: v.date, t: dateMs(v.date), track: track.id, mm, segment, status: track.status[v.id] ?? 'present' });
    }
    return { track: track.id, segment, target: track.target, points };
  });
  return series.sort((a, b) => segmentRank(a.segment) - segmentRank(b.segment) || compareTrackIds(a.track, b.track));
}

export interface BurdenPoint extends TimePoint {
  segment: SegmentName | null;
  count: number;
  sumMm: number;
  /** Null where a lesion of the segment was a manual mark without a volume. */
  volumeMl: number | null;
}

export interface BurdenSeries {
  segment: SegmentName | null;
  points: BurdenPoint[];
}

/** Per-segment sum of diameters and volume over time, one series per segment in Couinaud order. */
export function burdenSeries(f: FollowupResult): BurdenSeries[] {
  const dates = new Map(f.visits.map((v) => [v.id, v.date]));
  const bySegment = new Map<SegmentName | null, BurdenPoint[]>();
  for (const row of f.burden) {
    const date = dates.get(row.visit);
    if (date === undefined) continue;
    const list = bySegment.get(row.segment) ?? [];
    list.push({ visit: row.visit, date, t: dateMs(date), segment: row.segment, count: row.count, sumMm: row.sumLongestAxialMm, volumeMl: row.volumeMl });
    bySegment.set(row.segment, list);
  }
  return [...bySegment.entries()]
    .map(([segment, points]) => ({ segment, points: points.sort((a, b) => a.t - b.t) }))
    .sort((a, b) => segmentRank(a.segment) - segmentRank(b.segment));
}

/** Criteria with a response at every visit: the primary first, then any computed beside it. */
export function availableCriteria(f: FollowupResult): Criteria[] {
  const out: Criteria[] = [f.criteria];
  for (const r of f.visits[0]?.otherResponses ?? []) if (!out.includes(r.criteria)) out.push(r.criteria);
  return out;
}

export interface ResponsePoint extends TimePoint {
  sumMm: number;
  /** False when a target was not evaluable: the sum covers the evaluable ones only. */
  complete: boolean;
  /** Null at baseline. */
  category: OverallCategory | null;
  changeFromBaselinePct: number | null;
  changeFromNadirPct: number | null;
  /** The smallest earlier sum this visit was compared with, mm. */
  nadirSumMm: number;
}

export interface ResponseChartData {
  criteria: Criteria;
  targets: string[];
  points: ResponsePoint[];
  baselineMm: number;
  /** Where the sum of diameters was smallest so far (complete sums only; the earliest on a tie). */
  nadir: ResponsePoint | null;
}

function responseOf(v: FollowupResult['visits'][number], criteria: Criteria): VisitResponse | undefined {
  return v.response.criteria === criteria ? v.response : v.otherResponses.find((r) => r.criteria === criteria);
}

/** The sum of target diameters at each visit with the category, baseline and nadir. */
export function responseData(f: FollowupResult, criteria: Criteria = f.criteria): ResponseChartData {
  const points: ResponsePoint[] = [];
  let targets: string[] = [];
  for (const v of f.visits) {
    const r = responseOf(v, criteria);
    if (!r) continue;
    targets = r.targets.map((x) => x.track).sort(compareTrackIds);
    points.push({
      visit: v.id, date: v.date, t: dateMs(v.date), sumMm: r.targetSumMm, complete: r.targetSumComplete, category: r.category,
      changeFromBaselinePct: r.changeFromBaselinePct, changeFromNadirPct: r.changeFromNadirPct, nadirSumMm: r.nadirSumMm,
    });
  }
  let nadir: ResponsePoint | null = null;
  for (const p of points) if (p.complete && (nadir === null || p.sumMm < nadir.sumMm)) nadir = p;
  return { criteria, targets, points, baselineMm: points[0]?.sumMm ?? 0, nadir };
}

export interface TreatmentMarker {
  t: number;
  date: string;
  kind: string;
  label: string;
}

export function treatmentMarkers(treatments: readonly { date: string; kind: string; label: string }[]): TreatmentMarker[] {
  return treatments
    .map((x) => ({ t: dateMs(x.date), date: x.date, kind: x.kind, label: x.label }))
    .sort((a, b) => a.t - b.t || a.label.localeCompare(b.label));
}

/**
 * The time axis's extent over visits and treatments, padded so the first and last points do not
 * sit on the chart's frame: 6% of the span, at least two weeks on either side.
 */
export function timeDomain(times: readonly number[]): [number, number] {
  if (times.length === 0) return [0, DAY_MS];
  const lo = Math.min(...times), hi = Math.max(...times);
  const pad = Math.max(14 * DAY_MS, 0.06 * (hi - lo));
  return [lo - pad, hi + pad];
}

/** Ticks at the visit dates themselves: the dates a reader looks for. */
export function visitTicks(f: FollowupResult): number[] {
  return [...new Set(f.visits.map((v) => dateMs(v.date)))].sort((a, b) => a - b);
}

/**
 * A value axis from 0: a readable tick step (1, 2, 2.5 or 5 times a power of ten) giving at most six
 * intervals, and the top at the first tick holding the largest value with 10% headroom.
 */
export function valueScale(values: readonly (number | null)[]): { max: number; ticks: number[] } {
  const finite = values.filter((x): x is number => x !== null && Number.isFinite(x));
  const top = Math.max(...finite, 0) * 1.1 || 1;
  const power = 10 ** Math.floor(Math.log10(top / 6));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * power).find((st) => top / st <= 6) ?? 10 * power;
  const n = Math.ceil(top / step - 1e-9);
  return { max: n * step, ticks: Array.from({ length: n + 1 }, (_, k) => +(k * step).toPrecision(12)) };
}

/** Which track holds each lesion: `${visit}/${lesion}` → track id (fragments of a split included). */
export function trackOfLesion(f: FollowupResult): Map<string, string> {
  const out = new Map<string, string>();
  for (const t of f.tracks) {
    for (const [visit, lesion] of Object.entries(t.lesions)) out.set(`${visit}/${lesion}`, t.id);
    for (const [visit, ids] of Object.entries(t.fragments ?? {})) for (const lesion of ids) out.set(`${visit}/${lesion}`, t.id);
  }
  return out;
}

export { belowMargin } from '../../src/followup/followup.js';
