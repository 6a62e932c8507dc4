import type { Vec3 } from '../geometry/mat4.js';
import { applyRigid, invertRigid, type RigidTransform } from '../geometry/rigid.js';
import { badInput } from '../errors.js';
import { roundTo } from '../rounding.js';
import type { LandmarkSet } from '../segments/landmarks.js';
import type { SegmentName } from '../segments/segment-map.js';
import type { Volume } from '../volume/volume.js';
import { alignVisit, referenceAlignment, type Alignment, type AlignmentMethod } from './align.js';
import { burdenBySegment, type BurdenRow } from './burden.js';
import { compareIds, currentTrackRef } from './ids.js';
import { describeLiver, insideGrid, type LiverShape } from './liver-shape.js';
import { bestOverallResponse, type BestResponse } from './best-response.js';
import { mrecistNewLesionCounts, mrecistTargetCategory, selectViableTargets, viableFromComponents, type ViableComponent } from './mrecist.js';
import { protocolDepartures, withProtocolDefaults, type ResponseProtocol } from './protocol.js';
import { LIVER_SCOPE_STATEMENT, type NewLesionCall, type VisitReaderCalls } from './reader-calls.js';
import {
  isMeasurable,
  checkTargetCount,
  nonTargetCategory,
  round1,
  selectTargets,
  type NonTargetCategory,
  type OverallCategory,
  type TargetObservation,
} from './recist.js';
import { responseSeries, type Criteria, type VisitResponse } from './response.js';
import { isMarginAlert } from '../lesions/margin.js';
import { buildTracks, type LinkHow, type Override, type Track, type TrackStatus } from './tracks.js';

/**
 * A patient's visits followed together: alignment to the baseline, lesion tracks, response per
 * visit (RECIST 1.1, and mRECIST where viable-tumour diameters are given), burden per segment.
 * The shape of the result is the `followup --json` contract, with extra fields added, never changed.
 *
 * - The baseline is the first visit by date; it gets its sums and a null category.
 * - `newLesions`: tracks first seen at the visit; `goneLesions`: tracks seen before and absent now
 *   (merged ones excepted, they live on in the lesion they joined); `notEvaluable`: absent tracks
 *   whose last position lies outside the visit's scanned field. All are track ids.
 * - A track's `longestAxialMm` at a visit is the sum over its fragments as measured; the response's
 *   `targets` list the RECIST-recorded value (5 mm for too small, 0 for gone or merged).
 * - Matching allowance grows with the alignment residual, and by a fixed 20 mm for an unaligned visit.
 */

/** What follow-up needs of a lesion; an analysed visit's lesion results fit as they are. */
export interface FollowupLesion {
  id: string;
  centroidMm: Vec3;
  segment: SegmentName | null;
  longestAxialMm: number;
  volumeMl: number | null;
  marginAlert: boolean;
  /** When given, the alert is recomputed against the follow-up's margin. */
  marginMm?: number | null;
  /** Longest viable (arterially enhancing) diameter, from a mark; undefined or null when not given. */
  viableAxialMm?: number | null;
}

export interface FollowupVisit {
  id: string;
  /** ISO 8601 date. */
  date: string;
  lesions: readonly FollowupLesion[];
  landmarks?: LandmarkSet;
  /** Liver mask (or its shape, already described) for alignment and field-of-view checks. */
  liver?: Volume | LiverShape | null;
  /** Slice thickness for the measurability rule; the axial voxel step when nothing better is known. */
  sliceThicknessMm: number;
  /** Components of a viable-tumour mask, in this visit's world space, for mRECIST. */
  viable?: { components: readonly ViableComponent[] };
  /** A reader judged the non-target disease to have progressed unequivocally at this visit (as `reader.nonTarget`). */
  nonTargetProgression?: boolean;
  /** The reader's calls at this visit. */
  readerCalls?: VisitReaderCalls;
}

export interface FollowupOptions {
  /** Target tracks named by the user ("A", …; the old "T1" is read as "A"); default RECIST 1.1 selection otherwise. */
  targets?: readonly string[];
  overrides?: readonly Override[];
  marginMm: number;
  criteria?: Criteria;
  /** Protocol settings of the response rules; defaults follow the published text. */
  protocol?: Partial<ResponseProtocol>;
}

export interface VisitAlignmentSummary {
  method: AlignmentMethod;
  /** This visit's world mm → the baseline's world mm (identity for the baseline and an unaligned visit). */
  transform: RigidTransform;
  residualMm: number | null;
  rotationDeg: number;
  warnings: string[];
}

export interface VisitFollowup {
  id: string;
  date: string;
  /** Under the primary criteria. */
  response: VisitResponse;
  /** The same visit under the other criteria, where computed (mRECIST beside RECIST 1.1 or the reverse). */
  otherResponses: VisitResponse[];
  overall: OverallCategory | null;
  nonTarget: { category: NonTargetCategory | null; tracks: string[]; readerProgression: boolean };
  newLesions: string[];
  /** Tracks first seen after baseline, present here and unequivocally new (PD), with where the call came from. */
  unequivocalNewLesions: { track: string; from: 'reader' | 'size' }[];
  /** Tracks first seen after baseline, present here and still equivocal: followed, not PD. */
  equivocalNewLesions: string[];
  goneLesions: string[];
  /** Of `goneLesions`, those a reader has not confirmed gone: their targets are NE, not 0 mm. */
  unconfirmedGone: string[];
  /** The reader's calls at this visit, as given (outside the liver: 'not-assessed' when not given). */
  readerCalls: Required<Pick<VisitReaderCalls, 'outsideLiver'>> & VisitReaderCalls;
  notEvaluable: string[];
  marginAlerts: string[];
  alignment: VisitAlignmentSummary;
  /**
   * Viable (arterially enhancing) diameter per lesion id, mm, where the visit gives viable measures
   * (marks' `viableAxialMm` or a viable-tumour mask); null for a lesion without one.
   */
  viableAxialMm?: Record<string, number | null>;
}

export interface TrackSummary {
  id: string;
  lesions: Record<string, string>;
  segments: Record<string, SegmentName | null>;
  longestAxialMm: Record<string, number>;
  target: boolean;
  firstVisit: string;
  status: Record<string, TrackStatus>;
  how: Record<string, LinkHow>;
  volumeMl: Record<string, number | null>;
  fragments?: Record<string, string[]>;
  mergedInto?: Record<string, string>;
  viableAxialMm?: Record<string, number | null>;
  segmentChanged: boolean;
  segmentChanges: { visit: string; from: SegmentName | null; to: SegmentName | null }[];
}

export interface FollowupResult {
  criteria: Criteria;
  marginMm: number;
  targets: { tracks: string[]; source: 'named' | 'default' };
  /** Best overall response under the primary criteria, with confirmation and the date of progression. */
  bestResponse: BestResponse;
  protocol: ResponseProtocol;
  /** Protocol settings that differ from the published rules, in words. */
  departures: string[];
  /** What Falciform assesses and what it takes from the reader. */
  scope: string;
  visits: VisitFollowup[];
  tracks: TrackSummary[];
  burden: BurdenRow[];
  warnings: string[];
  notes: string[];
}

/** Matching allowance when a visit could not be aligned at all, mm. */
export const UNALIGNED_SLACK_MM = 20;
/** Matching allowance per mm of alignment residual. */
export const RESIDUAL_SLACK_FACTOR = 2;

export const FOLLOWUP_NOTES = [
  LIVER_SCOPE_STATEMENT,
  'Non-target progression ("unequivocal progression", RECIST 1.1) is a reader\'s judgement: it is PD here only when a reader flags it.',
  'A lesion first seen after baseline is a new lesion (PD) when unequivocal: by the reader\'s call, else by its size (protocol setting); an equivocal one is followed, and once confirmed progression dates from its first detection.',
  'Targets are recorded as measured, also under 5 mm; 5 mm only when a reader marks one present but too small to measure. A target missing from a mask is NE until a reader confirms it gone (then 0 mm).',
  'A target that coalesces with another lesion is recorded with the coalesced lesion\'s longest diameter.',
];

export function runFollowup(input: readonly FollowupVisit[], opts: FollowupOptions): FollowupResult {
  if (input.length === 0) throw badInput('follow-up', 'needs at least one visit');
  const seen = new Set<string>();
  for (const v of input) {
    if (seen.has(v.id)) throw badInput('follow-up', `visit id ${v.id} occurs twice`);
    seen.add(v.id);
  }
  const visits = [...input].sort((a, b) => a.date.localeCompare(b.date));
  const warnings: string[] = [];

  // Alignment of every visit to the baseline.
  const shapes = visits.map((v) => (v.liver ? ('dims' in v.liver && 'data' in v.liver ? describeLiver(v.liver) : v.liver) : null));
  const alignments: Alignment[] = visits.map((v, k) =>
    k === 0 ? referenceAlignment() : alignVisit({ landmarks: v.landmarks, liver: shapes[k] }, { landmarks: visits[0].landmarks, liver: shapes[0] }, v.id),
  );
  for (const a of alignments) warnings.push(...a.warnings);

  // Tracks.
  const lesionIndex = visits.map((v) => new Map(v.lesions.map((l) => [l.id, l])));
  const tracking = buildTracks(
    visits.map((v, k) => {
      const a = alignments[k];
      const shape = shapes[k];
      const back = invertRigid(a.transform);
      return {
        id: v.id,
        lesions: v.lesions.map((l) => ({ id: l.id, centreMm: applyRigid(a.transform, l.centroidMm), longestAxialMm: l.longestAxialMm })),
        slackMm: a.method === 'none' ? UNALIGNED_SLACK_MM : RESIDUAL_SLACK_FACTOR * (a.residualMm ?? 0),
        inView: shape ? (p: Vec3) => insideGrid(shape, applyRigid(back, p)) : undefined,
      };
    }),
    opts.overrides ?? [],
  );
  warnings.push(...tracking.warnings);
  const tracks = tracking.tracks;
  const trackById = new Map(tracks.map((t) => [t.id, t]));
  const lesionsAt = (t: Track, k: number): FollowupLesion[] => (t.visits[k]?.lesions ?? []).map((id) => lesionIndex[k].get(id)!);
  const measuredAt = (t: Track, k: number) => lesionsAt(t, k).reduce((s, l) => s + l.longestAxialMm, 0);
  const baselineTracks = tracks.filter((t) => t.firstVisit === 0);

  // Viable diameters per lesion, where a visit gives them.
  const viable = visits.map((v) => {
    if (v.viable) {
      const r = viableFromComponents(v.lesions, v.viable.components);
      if (r.unassigned > 0) warnings.push(`visit ${v.id}: ${r.unassigned} viable-tumour region(s) lie outside every lesion and are not counted`);
      return r.viable as Map<string, number | null>;
    }
    const m = new Map<string, number | null>();
    for (const l of v.lesions) if (l.viableAxialMm !== undefined && l.viableAxialMm !== null) m.set(l.id, l.viableAxialMm);
    return m.size > 0 ? m : null;
  });
  const viableAt = (t: Track, k: number): number | null => {
    const map = viable[k];
    if (!map) return null;
    let sum = 0;
    for (const id of t.visits[k]?.lesions ?? []) {
      const x = map.get(id);
      if (x === undefined || x === null) return null;
      sum += x;
    }
    return sum;
  };

  // Criteria and targets.
  let criteria: Criteria = opts.criteria ?? 'RECIST 1.1';
  const hasViableBaseline = viable[0] !== null;
  if (criteria === 'mRECIST' && !hasViableBaseline) {
    warnings.push('mRECIST asked for, but the baseline visit gives no viable-tumour diameters; RECIST 1.1 used instead');
    criteria = 'RECIST 1.1';
  }
  // A target named the old way ("T1") is read as its letter ("A").
  const named = opts.targets && opts.targets.length > 0 ? opts.targets.map(currentTrackRef) : null;
  if (named) validateNamedTargets(named, baselineTracks, (t) => measuredAt(t, 0), visits[0].sliceThicknessMm, warnings);
  const recistTargets =
    named ??
    selectTargets(
      baselineTracks.map((t) => ({ id: t.id, longestMm: measuredAt(t, 0), measurable: isMeasurable(measuredAt(t, 0), visits[0].sliceThicknessMm) })),
    );
  const mrecistTargets = hasViableBaseline
    ? named ??
      selectViableTargets(
        baselineTracks.map((t) => ({
          id: t.id,
          longestMm: measuredAt(t, 0),
          measurable: isMeasurable(measuredAt(t, 0), visits[0].sliceThicknessMm),
          viableMm: viableAt(t, 0),
        })),
      )
    : [];
  const primaryTargets = criteria === 'mRECIST' ? mrecistTargets : recistTargets;

  const protocol = withProtocolDefaults(opts.protocol);
  const visitIndex = new Map(visits.map((v, k) => [v.id, k]));
  const calls = visits.map((v) => v.readerCalls ?? {});
  // "C" (or the old "T3"), or "v1:L2" for the track holding L2 at v1.
  const resolveTrack = (ref: string): Track | undefined => {
    const colon = ref.indexOf(':');
    if (colon < 0) return trackById.get(currentTrackRef(ref));
    const k = visitIndex.get(ref.slice(0, colon));
    const lesion = ref.slice(colon + 1);
    return k === undefined ? undefined : tracks.find((t) => t.visits[k]?.lesions.includes(lesion));
  };
  const confirmedGone = calls.map((c, k) => {
    const set = new Set<string>();
    for (const ref of c.confirmedGone ?? []) {
      const t = resolveTrack(ref);
      if (t) set.add(t.id);
      else warnings.push(`visit ${visits[k].id}: the reader's "confirmed gone" names ${ref}, which is no lesion track; ignored`);
    }
    return set;
  });
  const tooSmall = calls.map((c) => new Set(c.tooSmall ?? []));
  // A track absent from a visit's mask inside the scanned field may be a missed segmentation: gone
  // only once a reader confirms it.
  const goneConfirmed = (t: Track, k: number) => t.visits[k]?.status === 'gone' && confirmedGone[k].has(t.id);

  // Non-target state per visit (shared by both criteria). Under mRECIST a non-target that no longer
  // enhances counts as gone (non-target CR is loss of enhancement in all of them).
  const nonTargetTracks = (targets: readonly string[]) => baselineTracks.filter((t) => !targets.includes(t.id));
  const nonTargetSeries = (targets: readonly string[], mrecistRule: boolean): NonTargetCategory[] =>
    visits.map((v, k) => {
      const nts = nonTargetTracks(targets);
      let present = 0, notEvaluable = 0;
      for (const t of nts) {
        const s = t.visits[k]!.status;
        // A non-target merged into another lesion persists inside it.
        if (s === 'merged' || (s === 'present' && !(mrecistRule && viableAt(t, k) === 0))) present++;
        else if (s === 'not-evaluable' || (s === 'gone' && !goneConfirmed(t, k))) notEvaluable++;
      }
      return nonTargetCategory({
        total: nts.length,
        present,
        notEvaluable,
        readerProgression: v.nonTargetProgression === true,
        call: calls[k].nonTarget,
        outsideLiver: calls[k].outsideLiver,
      });
    });

  // New lesions (RECIST 1.1 section 4.3.5, from memory): a lesion first seen after baseline is PD
  // when unequivocal. The reader's call at the visit decides; a call of "unequivocal" holds at later
  // visits; without a call, size decides (protocol `equivocalNewBelowMm`; under mRECIST also
  // enhancement). Once unequivocal, it stays a new lesion at every later visit where it is present.
  const newCall = (t: Track, k: number): { call: NewLesionCall; from: 'reader' | 'size' } => {
    const own = t.visits[k]?.lesions ?? [];
    const said = own.map((id) => calls[k].newLesions?.[id]).find((c) => c !== undefined);
    if (said) return { call: said, from: 'reader' };
    for (let j = k - 1; j >= t.firstVisit; j--) {
      const earlier = t.visits[j]?.lesions ?? [];
      if (earlier.some((id) => calls[j].newLesions?.[id] === 'unequivocal')) return { call: 'unequivocal', from: 'reader' };
    }
    const size = measuredAt(t, k);
    const big = size >= protocol.equivocalNewBelowMm - 1e-6;
    const counts = criteria === 'mRECIST' ? big && mrecistNewLesionCounts(size, viableAt(t, k)) : big;
    return { call: counts ? 'unequivocal' : 'equivocal', from: 'size' };
  };
  const newTracksAt = (k: number) => (k === 0 ? [] : tracks.filter((t) => t.firstVisit > 0 && t.firstVisit <= k && t.visits[k]?.status === 'present'));
  const unequivocalAt = visits.map((_, k) =>
    newTracksAt(k)
      .map((t) => ({ t, c: newCall(t, k) }))
      .filter((x) => x.c.call === 'unequivocal' || visits.slice(x.t.firstVisit, k).some((__, j) => newCall(x.t, x.t.firstVisit + j).call === 'unequivocal')),
  );
  const newLesion = unequivocalAt.map((u) => u.length > 0);

  // The diameter observed for a target. A target that has coalesced with a non-target is recorded
  // with the coalesced lesion's longest diameter (RECIST 1.1 section 4.3.2, lesions that coalesce,
  // from memory), by the first target of the group in target order; if the lesion it joined is
  // itself a target, that target carries it and this one is 0 mm.
  const observe = (targets: readonly string[], id: string, k: number, value: (t: Track, k: number) => number | null): TargetObservation => {
    const t = trackById.get(id)!;
    const at = t.visits[k]!;
    if (at.status === 'not-evaluable') return { kind: 'not-evaluable' };
    if (at.status === 'gone') return goneConfirmed(t, k) ? { kind: 'vanished' } : { kind: 'not-evaluable' };
    const holder = at.status === 'merged' ? trackById.get(at.mergedInto!)! : t;
    if (at.status === 'merged') {
      if (targets.includes(holder.id)) return { kind: 'vanished' };
      const first = targets.find((other) => {
        const o = trackById.get(other)!.visits[k];
        return o?.status === 'merged' && o.mergedInto === holder.id;
      });
      if (first !== id) return { kind: 'vanished' };
    }
    if ((holder.visits[k]?.lesions ?? []).some((l) => tooSmall[k].has(l))) return { kind: 'too-small' };
    const x = value(holder, k);
    if (x === null) return { kind: 'not-evaluable' };
    return { kind: 'measured', longestMm: x };
  };
  const recist = responseSeries({
    criteria: 'RECIST 1.1',
    targets: recistTargets,
    observations: visits.map((_, k) => recistTargets.map((id) => observe(recistTargets, id, k, measuredAt))),
    nonTarget: nonTargetSeries(recistTargets, false),
    newLesion,
  });
  const mrecist = hasViableBaseline
    ? responseSeries({
        criteria: 'mRECIST',
        targets: mrecistTargets,
        observations: visits.map((_, k) =>
          mrecistTargets.map((id) => {
            const o = observe(mrecistTargets, id, k, viableAt);
            // No viable tumour left in a present lesion is a vanished target for mRECIST.
            return o.kind === 'measured' && o.longestMm <= 0 ? { kind: 'vanished' } : o;
          }),
        ),
        nonTarget: nonTargetSeries(mrecistTargets, true),
        newLesion,
        categorise: (s) => mrecistTargetCategory(s, protocol.mrecistPdFloorMm),
      })
    : null;
  if (hasViableBaseline && mrecistTargets.length === 0) warnings.push('mRECIST: no measurable lesion with viable tumour at baseline to serve as target');

  // Per-visit summaries.
  const primaryNonTarget = nonTargetTracks(primaryTargets).map((t) => t.id);
  const outVisits: VisitFollowup[] = visits.map((v, k) => {
    const primary = criteria === 'mRECIST' && mrecist ? mrecist[k] : recist[k];
    const otherResponses = criteria === 'mRECIST' ? [recist[k]] : mrecist ? [mrecist[k]] : [];
    const withStatus = (s: TrackStatus) => tracks.filter((t) => t.visits[k]?.status === s).map((t) => t.id);
    const a = alignments[k];
    const unequivocal = unequivocalAt[k].map((x) => ({ track: x.t.id, from: x.c.from }));
    return {
      id: v.id,
      date: v.date,
      response: primary,
      otherResponses,
      overall: primary.category,
      nonTarget: { category: primary.nonTargetCategory, tracks: primaryNonTarget, readerProgression: v.nonTargetProgression === true || calls[k].nonTarget === 'unequivocal-progression' },
      newLesions: k > 0 ? tracks.filter((t) => t.firstVisit === k).map((t) => t.id) : [],
      unequivocalNewLesions: unequivocal,
      equivocalNewLesions: newTracksAt(k).map((t) => t.id).filter((id) => !unequivocal.some((u) => u.track === id)),
      goneLesions: withStatus('gone'),
      unconfirmedGone: tracks.filter((t) => t.visits[k]?.status === 'gone' && !goneConfirmed(t, k)).map((t) => t.id),
      readerCalls: { ...calls[k], outsideLiver: calls[k].outsideLiver ?? 'not-assessed' },
      notEvaluable: withStatus('not-evaluable'),
      marginAlerts: tracks.filter((t) => lesionsAt(t, k).some((l) => belowMargin(l, opts.marginMm))).map((t) => t.id),
      alignment: { method: a.method, transform: a.transform, residualMm: a.residualMm === null ? null : roundTo(a.residualMm, 2), rotationDeg: roundTo(a.rotationDeg, 2), warnings: a.warnings },
      ...(viable[k] ? { viableAxialMm: Object.fromEntries(v.lesions.map((l) => [l.id, viableOf(viable[k]!, l.id)])) } : {}),
    };
  });

  // Best overall response. A PD made by a new lesion that was equivocal when first seen dates from
  // that first detection.
  const bestResponse = bestOverallResponse(
    outVisits.map((v, k) => {
      const firsts = unequivocalAt[k].map((x) => x.t.firstVisit).filter((f) => f < k);
      const from = firsts.length > 0 && v.overall === 'PD' && newLesion[k] && (k === 0 || !newLesion[k - 1]) ? Math.min(...firsts) : null;
      return { visit: v.id, date: v.date, category: v.overall, ...(from !== null ? { progressionFrom: { visit: visits[from].id, date: visits[from].date } } : {}) };
    }),
    protocol,
  );

  const outTracks = tracks.map((t) => summariseTrack(t, visits, lesionsAt, viable.some((m) => m !== null) ? viableAt : null, primaryTargets));

  return {
    criteria,
    marginMm: opts.marginMm,
    targets: { tracks: primaryTargets, source: named ? 'named' : 'default' },
    bestResponse,
    protocol,
    departures: protocolDepartures(protocol),
    scope: LIVER_SCOPE_STATEMENT,
    visits: outVisits,
    tracks: outTracks,
    burden: burdenBySegment(visits.map((v) => ({ id: v.id, lesions: v.lesions }))),
    warnings,
    notes: FOLLOWUP_NOTES,
  };
}

function viableOf(map: ReadonlyMap<string, number | null>, id: string): number | null {
  const x = map.get(id);
  return x === undefined || x === null ? null : round1(x);
}

/**
 * Whether a follow-up's screens and reports show viable diameters: under mRECIST, or wherever a
 * visit gives a viable measure.
 */
export function showsViable(f: Pick<FollowupResult, 'criteria' | 'visits'>): boolean {
  return f.criteria === 'mRECIST' || f.visits.some((v) => v.viableAxialMm !== undefined);
}

/** A margin alert under the patient's margin (a lesion without a measured margin keeps its own flag). */
export function belowMargin(l: { marginMm?: number | null; marginAlert: boolean }, marginMm: number): boolean {
  if (l.marginMm === undefined) return l.marginAlert;
  return isMarginAlert(l.marginMm, marginMm);
}

function validateNamedTargets(
  named: readonly string[],
  baselineTracks: readonly Track[],
  measured: (t: Track) => number,
  sliceThicknessMm: number,
  warnings: string[],
): void {
  const known = baselineTracks.map((t) => t.id);
  for (const id of named) {
    const t = baselineTracks.find((x) => x.id === id);
    if (!t) {
      throw badInput('targets', `${id} is not a lesion track seen at the baseline visit (tracks there: ${known.join(', ') || 'none'})`);
    }
    if (!isMeasurable(measured(t), sliceThicknessMm)) {
      warnings.push(`target ${id} is not measurable at baseline (${round1(measured(t))} mm); RECIST 1.1 takes measurable lesions as targets`);
    }
  }
  checkTargetCount(named);
}

function summariseTrack(
  t: Track,
  visits: readonly FollowupVisit[],
  lesionsAt: (t: Track, k: number) => FollowupLesion[],
  viableAt: ((t: Track, k: number) => number | null) | null,
  targets: readonly string[],
): TrackSummary {
  const out: TrackSummary = {
    id: t.id,
    lesions: {},
    segments: {},
    longestAxialMm: {},
    target: targets.includes(t.id),
    firstVisit: visits[t.firstVisit].id,
    status: {},
    how: {},
    volumeMl: {},
    segmentChanged: false,
    segmentChanges: [],
  };
  let lastSegment: SegmentName | null | undefined;
  visits.forEach((v, k) => {
    const at = t.visits[k];
    if (!at) return;
    out.status[v.id] = at.status;
    if (at.mergedInto) (out.mergedInto ??= {})[v.id] = at.mergedInto;
    if (at.status === 'not-evaluable') return;
    const ls = lesionsAt(t, k);
    out.longestAxialMm[v.id] = round1(ls.reduce((s, l) => s + l.longestAxialMm, 0));
    if (at.status !== 'present') return;
    if (at.how) out.how[v.id] = at.how;
    out.lesions[v.id] = ls[0].id;
    out.segments[v.id] = ls[0].segment;
    if (ls.length > 1) (out.fragments ??= {})[v.id] = ls.map((l) => l.id).sort(compareIds);
    out.volumeMl[v.id] = ls.some((l) => l.volumeMl === null) ? null : roundTo(ls.reduce((s, l) => s + (l.volumeMl ?? 0), 0), 2);
    if (viableAt) {
      const x = viableAt(t, k);
      (out.viableAxialMm ??= {})[v.id] = x === null ? null : round1(x);
    }
    if (lastSegment !== undefined && ls[0].segment !== lastSegment) {
      out.segmentChanged = true;
      out.segmentChanges.push({ visit: v.id, from: lastSegment, to: ls[0].segment });
    }
    lastSegment = ls[0].segment;
  });
  return out;
}
