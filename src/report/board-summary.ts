import { bestResponseText } from '../followup/best-response.js';
import { CAUTION } from '../caution.js';
import { showsViable } from '../followup/followup.js';
import { compareTrackIds } from '../followup/ids.js';
import type { Criteria } from '../followup/response.js';
import type { TrackStatus } from '../followup/tracks.js';
import type { PatientRemnant } from '../remnant/for-patient.js';
import type { SegmentName } from '../segments/segment-map.js';
import { VERSION } from '../version.js';
import { placeLesions, type PlacedLesion } from './diagram-placement.js';
import { daysBetween, lesionsOfTrack, type ReportInput, type ReportVisit } from './input.js';
import { pseudonymNote, scrubId, type Pseudonym } from './pseudonym.js';

/**
 * The board summary as plain data: what the one printed page per patient says, before any markup.
 * Built from the same follow-up the screens show; capped so it always fits one page (what is left
 * out is named on the page, and the case-form export holds everything).
 */

/** Most visits in the response table; the baseline and the latest ones are kept. */
export const MAX_VISIT_ROWS = 5;
/** Most visits as columns of the lesion table. */
export const MAX_TABLE_VISITS = 5;
export const MAX_TRACK_ROWS = 6;
export const MAX_ALERT_LINES = 4;
export const MAX_WARNING_LINES = 2;

export interface BoardOptions {
  madeAt: Date;
  /** The reader's zone as minutes east of UTC; default the computer's own zone at `madeAt`. */
  utcOffsetMinutes?: number;
  pseudonym?: Pseudonym | null;
}

export interface BoardVisitRow {
  id: string;
  date: string;
  daysFromBaseline: number;
  segmentMap: 'imported' | 'built from landmarks';
  lesionSource: 'mask' | 'marks';
  lesionCount: number;
  targetSumMm: number;
  targetSumComplete: boolean;
  changeFromBaselinePct: number | null;
  changeFromNadirPct: number | null;
  /** 'baseline' at the first visit, else the overall category ('—' when none). */
  response: string;
  /** The same visit under the other criteria, e.g. "RECIST 1.1: PD". */
  otherResponses: string[];
  newTracks: string[];
  goneTracks: string[];
  alertTracks: string[];
}

export interface BoardTrackCell {
  status: TrackStatus;
  lesions: string[];
  longestAxialMm: number | null;
  /** Viable (enhancing) diameter, mm, when the table shows viable diameters (`lesionTable.viable`); null when not given. */
  viableAxialMm?: number | null;
  mergedInto: string | null;
  alert: boolean;
}

export interface BoardTrackRow {
  id: string;
  target: boolean;
  /** Visit where the track first appears, when after baseline (a new lesion). */
  newAt: string | null;
  /** Segment at the latest visit it was seen; null outside every segment. */
  segment: SegmentName | null;
  /** Segments in order of visits when they changed, e.g. ["V", "VIII"]. */
  segmentPath: (SegmentName | null)[];
  /** One per column visit; null before the track starts. */
  cells: (BoardTrackCell | null)[];
}

export interface BoardAlert {
  visit: string;
  date: string;
  track: string;
  lesions: string[];
  segment: SegmentName | null;
  marginMm: number | null;
  nearestOtherSegment: SegmentName | null;
  latest: boolean;
}

export interface ChartPoint {
  date: string;
  longestAxialMm: number;
  status: TrackStatus;
}

export interface ChartSeries {
  track: string;
  segment: SegmentName | null;
  target: boolean;
  points: ChartPoint[];
}

export interface SizeChart {
  visitDates: string[];
  series: ChartSeries[];
  treatments: { date: string; label: string }[];
}

export interface SegmentDiagram {
  visit: string;
  date: string;
  /** Segments the visit's map holds: IV whole or split as the map has it. */
  segments: SegmentName[];
  /** Placed as the app's Diagram tab places them, so the page and the screen agree. */
  lesions: PlacedLesion[];
  /** The visit's map was built from landmarks by the plane rule (a flat-plane approximation). */
  fromLandmarks: boolean;
}

export interface BoardRemnant {
  visit: string;
  date: string;
  resection: string;
  removedSegments: SegmentName[];
  remnantSegments: SegmentName[];
  remnantMl: number;
  tumourFreeLiverMl: number;
  remnantShare: number;
  compared: { kind: 'standardised' | 'measured'; value: number };
  minimums: { context: string; minimumShare: number; met: boolean }[];
  /** Why the compared share is over 100%, when it is. */
  overFull: string | null;
  lesionsInRemnant: string[];
  /** Lesions the cut runs through, by track, with the share that would stay. */
  lesionsCrossingCut: { label: string; keptShare: number }[];
  alertLesionsAtTransection: string[];
  estimated: boolean;
}

export interface BoardSummary {
  patient: {
    label: string;
    facts: { label: string; value: string }[];
    demo: boolean;
    pseudonymNote: string | null;
  };
  criteria: Criteria;
  marginMm: number;
  targets: { tracks: string[]; source: 'named' | 'default' };
  latest: BoardVisitRow;
  /** Best overall response in one line, what Falciform assesses, protocol settings, and what waits for a reader. */
  responseSummary: { best: string; scope: string; departures: string[]; pending: string[] };
  visits: BoardVisitRow[];
  visitsLeftOut: string[];
  lesionTable: {
    visits: { id: string; date: string }[];
    rows: BoardTrackRow[];
    /** Cells carry the viable diameter (mRECIST, or viable measures given). */
    viable: boolean;
    visitsLeftOut: string[];
    tracksLeftOut: string[];
  };
  chart: SizeChart;
  diagram: SegmentDiagram;
  alerts: BoardAlert[];
  alertsLeftOut: number;
  remnant: BoardRemnant | null;
  warnings: string[];
  warningsLeftOut: number;
  caution: string;
  madeAt: string;
  version: string;
}

/** The first visit and the latest ones, at most `max`, in date order. */
function keepEnds<T>(xs: readonly T[], max: number): { kept: T[]; left: T[] } {
  if (xs.length <= max) return { kept: [...xs], left: [] };
  return { kept: [xs[0], ...xs.slice(xs.length - (max - 1))], left: xs.slice(1, xs.length - (max - 1)) };
}

/**
 * "2026-06-29 16:05 +02:00": the moment the page was made in the reader's local time, with its offset
 * from UTC (ISO 8601) so it stays unambiguous on a page read elsewhere.
 */
export function madeAtText(d: Date, offsetMinutes = -d.getTimezoneOffset()): string {
  const local = new Date(d.getTime() + offsetMinutes * 60_000).toISOString().slice(0, 16).replace('T', ' ');
  const a = Math.abs(offsetMinutes);
  const zone = `${offsetMinutes < 0 ? '-' : '+'}${String(Math.floor(a / 60)).padStart(2, '0')}:${String(a % 60).padStart(2, '0')}`;
  return `${local} ${zone}`;
}

export function buildBoardSummary(input: ReportInput, opts: BoardOptions): BoardSummary {
  const { manifest, followup: f } = input;
  const p = opts.pseudonym ?? null;
  const realId = manifest.patient.id;
  const scrub = (s: string) => (p ? scrubId(s, realId, p.id) : s);
  const byId = new Map<string, ReportVisit>(input.visits.map((v) => [v.id, v]));
  const manifestVisit = new Map(manifest.visits.map((v) => [v.id, v]));
  const baselineDate = f.visits[0].date;
  const lesionAt = (visit: string, id: string) => byId.get(visit)?.analysis.lesions.find((l) => l.id === id);

  const visitRows: BoardVisitRow[] = f.visits.map((v, k) => {
    const mv = manifestVisit.get(v.id);
    const r = v.response;
    return {
      id: v.id,
      date: v.date,
      daysFromBaseline: daysBetween(baselineDate, v.date),
      segmentMap: mv?.segments !== undefined ? 'imported' : 'built from landmarks',
      lesionSource: mv?.lesions !== undefined ? 'mask' : 'marks',
      lesionCount: byId.get(v.id)?.analysis.lesions.length ?? 0,
      targetSumMm: r.targetSumMm,
      targetSumComplete: r.targetSumComplete,
      changeFromBaselinePct: k === 0 ? null : r.changeFromBaselinePct,
      changeFromNadirPct: k === 0 ? null : r.changeFromNadirPct,
      response: k === 0 ? 'baseline' : (v.overall ?? '—'),
      otherResponses: k === 0 ? [] : v.otherResponses.map((o) => `${o.criteria}: ${o.category ?? '—'}`),
      newTracks: v.newLesions,
      goneTracks: v.goneLesions,
      alertTracks: v.marginAlerts,
    };
  });
  const visitsKept = keepEnds(visitRows, MAX_VISIT_ROWS);

  // Lesion table: targets first, then the others, in track order.
  const ordered = [...f.tracks.filter((t) => t.target), ...f.tracks.filter((t) => !t.target)];
  const tracksKept = ordered.slice(0, MAX_TRACK_ROWS);
  const tableVisits = keepEnds(f.visits, MAX_TABLE_VISITS);
  const alertSet = new Set(f.visits.flatMap((v) => v.marginAlerts.map((t) => `${v.id}\u0000${t}`)));
  const viable = showsViable(f);
  const rows: BoardTrackRow[] = tracksKept.map((t) => {
    const seen = f.visits.filter((v) => t.status[v.id] === 'present');
    const lastSeen = seen[seen.length - 1];
    const segmentPath: (SegmentName | null)[] = [];
    for (const v of seen) {
      const s = t.segments[v.id] ?? null;
      if (segmentPath.length === 0 || segmentPath[segmentPath.length - 1] !== s) segmentPath.push(s);
    }
    return {
      id: t.id,
      target: t.target,
      newAt: t.firstVisit !== f.visits[0].id ? t.firstVisit : null,
      segment: lastSeen ? (t.segments[lastSeen.id] ?? null) : null,
      segmentPath,
      cells: tableVisits.kept.map((v) => {
        const status = t.status[v.id];
        if (!status) return null;
        return {
          status,
          lesions: lesionsOfTrack(t, v.id),
          longestAxialMm: t.longestAxialMm[v.id] ?? null,
          ...(viable && status === 'present' ? { viableAxialMm: t.viableAxialMm?.[v.id] ?? null } : {}),
          mergedInto: t.mergedInto?.[v.id] ?? null,
          alert: alertSet.has(`${v.id}\u0000${t.id}`),
        };
      }),
    };
  });

  // Margin alerts, the latest visit's first, then earlier ones from the most recent back.
  const latestVisit = f.visits[f.visits.length - 1];
  const alerts: BoardAlert[] = [];
  for (const v of [...f.visits].reverse()) {
    for (const trackId of v.marginAlerts) {
      const t = f.tracks.find((x) => x.id === trackId);
      if (!t) continue;
      const ids = lesionsOfTrack(t, v.id);
      const lesions = ids.map((id) => lesionAt(v.id, id)).filter((l) => l !== undefined);
      const closest = lesions.reduce<(typeof lesions)[number] | undefined>(
        (best, l) => (best === undefined || (l.marginMm ?? Infinity) < (best.marginMm ?? Infinity) ? l : best),
        undefined,
      );
      alerts.push({
        visit: v.id,
        date: v.date,
        track: trackId,
        lesions: ids,
        segment: t.segments[v.id] ?? null,
        marginMm: closest?.marginMm ?? null,
        nearestOtherSegment: closest?.nearestOtherSegment ?? null,
        latest: v.id === latestVisit.id,
      });
    }
  }

  const chart: SizeChart = {
    visitDates: f.visits.map((v) => v.date),
    series: f.tracks.map((t) => {
      const seen = f.visits.filter((v) => t.status[v.id] === 'present');
      const last = seen[seen.length - 1];
      return {
        track: t.id,
        segment: last ? (t.segments[last.id] ?? null) : null,
        target: t.target,
        points: f.visits
          .filter((v) => t.longestAxialMm[v.id] !== undefined)
          .map((v) => ({ date: v.date, longestAxialMm: t.longestAxialMm[v.id], status: t.status[v.id] })),
      };
    }),
    treatments: (manifest.treatments ?? []).map((x) => ({ date: x.date, label: x.label })),
  };

  const diagram: SegmentDiagram = {
    visit: latestVisit.id,
    date: latestVisit.date,
    segments: (byId.get(latestVisit.id)?.analysis.segments ?? []).map((s) => s.segment),
    lesions: placeLesions(f, input.visits.map((v) => ({ id: v.id, lesions: v.analysis.lesions })), latestVisit.id),
    fromLandmarks: manifestVisit.get(latestVisit.id)?.segments === undefined,
  };

  const warnings = [
    ...input.visits.flatMap((v) => v.warnings.map((w) => `visit ${v.id}: ${w}`)),
    ...f.warnings,
    ...(input.remnant?.warnings ?? []).map((w) => `remnant: ${w}`),
  ].map(scrub);

  const facts: { label: string; value: string }[] = [];
  const pt = manifest.patient;
  if (!p) {
    if (pt.birthYear !== undefined) facts.push({ label: 'Born', value: String(pt.birthYear) });
    if (pt.sex !== undefined) facts.push({ label: 'Sex', value: pt.sex });
    if (pt.heightCm !== undefined) facts.push({ label: 'Height', value: `${pt.heightCm} cm` });
    if (pt.weightKg !== undefined) facts.push({ label: 'Weight', value: `${pt.weightKg} kg` });
  }

  return {
    patient: { label: p ? p.id : realId, facts, demo: pt.demo === true, pseudonymNote: p ? pseudonymNote(p) : null },
    criteria: f.criteria,
    marginMm: f.marginMm,
    targets: f.targets,
    latest: visitRows[visitRows.length - 1],
    responseSummary: {
      best: bestResponseText(f.bestResponse),
      scope: f.scope,
      departures: f.departures,
      pending: f.visits.flatMap((v) => [
        ...(v.equivocalNewLesions.length ? [`${v.id}: equivocal new ${v.equivocalNewLesions.join(', ')} (followed, not PD)`] : []),
        ...(v.unconfirmedGone.length ? [`${v.id}: ${v.unconfirmedGone.join(', ')} missing, not confirmed gone (NE)`] : []),
      ]),
    },
    visits: visitsKept.kept,
    visitsLeftOut: visitsKept.left.map((v) => v.id),
    lesionTable: {
      visits: tableVisits.kept.map((v) => ({ id: v.id, date: v.date })),
      rows,
      viable,
      visitsLeftOut: tableVisits.left.map((v) => v.id),
      tracksLeftOut: ordered.slice(MAX_TRACK_ROWS).map((t) => t.id),
    },
    chart,
    diagram,
    alerts: alerts.slice(0, MAX_ALERT_LINES),
    alertsLeftOut: Math.max(0, alerts.length - MAX_ALERT_LINES),
    remnant: input.remnant ? boardRemnant(input.remnant) : null,
    warnings: warnings.slice(0, MAX_WARNING_LINES),
    warningsLeftOut: Math.max(0, warnings.length - MAX_WARNING_LINES),
    caution: CAUTION,
    madeAt: madeAtText(opts.madeAt, opts.utcOffsetMinutes),
    version: VERSION,
  };
}

function boardRemnant(r: PatientRemnant): BoardRemnant {
  // Lesions are named by their track where follow-up linked one, as everywhere else on the page.
  const label = (ids: readonly string[]) => [...new Set(ids.map((id) => r.lesionTracks[id] ?? id))].sort(compareTrackIds);
  return {
    visit: r.visitId,
    date: r.visitDate,
    resection: r.resection?.name ?? 'Chosen segments',
    removedSegments: r.removedSegments,
    remnantSegments: r.remnantSegments,
    remnantMl: r.remnantMl,
    tumourFreeLiverMl: r.tumourFreeLiverMl,
    remnantShare: r.remnantShare,
    compared: { kind: r.comparedShare.kind, value: r.comparedShare.value },
    minimums: r.cautions.map((c) => ({ context: c.context, minimumShare: c.minimumShare, met: c.met })),
    overFull: r.overFull,
    lesionsInRemnant: label(r.lesionsInRemnant),
    lesionsCrossingCut: r.lesionsCrossingCut.map((c) => ({ label: r.lesionTracks[c.id] ?? c.id, keptShare: c.keptShare })),
    alertLesionsAtTransection: label(r.alertLesionsAtTransection),
    estimated: r.estimated,
  };
}
