import { isFalciformError } from '../errors.js';
import type { Manifest, ProposedResection } from '../manifest/manifest.js';
import type { SegmentName } from '../segments/segment-map.js';
import { bodySurfaceAreaM2, standardisedLiverVolumeMl } from './body.js';
import { planRemnant, type BodySize, type PlannerLesion, type RemnantPlan } from './planner.js';
import type { VisitVolumetry } from './volumetry.js';

/** The visit a remnant is planned on (usually the latest) with what the planner needs of it. */
export interface RemnantVisit {
  id: string;
  date: string;
  volumetry: VisitVolumetry;
  /** The visit's lesions; `LesionResult` records from the analysis fit. */
  lesions: readonly (PlannerLesion & { marginMm?: number | null })[];
}

/** What the plan needs of a lesion track: which lesion it is at each visit (follow-up's `LesionTrack`). */
export interface TrackOfLesions {
  id: string;
  lesions: Readonly<Record<string, string>>;
}

/** A lesion with a margin alert that the resection would leave in the liver or cut close to. */
export interface RemnantAlertLesion {
  lesion: string;
  /** Its lesion track, when follow-up linked it; reports name lesions by track. */
  track: string | null;
  segment: SegmentName | null;
  marginMm: number | null;
  nearestOtherSegment: SegmentName | null;
  where: 'in remnant' | 'crosses the cut' | 'at transection';
}

export interface PatientRemnant extends RemnantPlan {
  visitId: string;
  visitDate: string;
  /** The resection planned: the manifest's, or the one chosen in the app. */
  proposed: ProposedResection;
  /** e.g. "Right hemihepatectomy (removes V, VI, VII, VIII)". */
  label: string;
  alertLesions: RemnantAlertLesion[];
  /** Lesion track of each of the visit's lesions that follow-up linked (lesion id → track id). */
  lesionTracks: Record<string, string>;
}

export interface RemnantOptions {
  /** Replaces the manifest's `resection` (the app's own choice). */
  resection?: ProposedResection;
  /** Replaces the manifest's height and weight (edited in the app after import). */
  body?: BodySize;
  /** Follow-up's lesion tracks, to name alert lesions by track. */
  tracks?: readonly TrackOfLesions[];
}

/**
 * The remnant of the patient's proposed resection on one visit, or null when no resection is
 * proposed (neither in the manifest nor in `opts`) or there is no visit. A height or weight the
 * body-size formulas refuse does not stop the plan: the measured share is used, with a warning.
 */
export function remnantForPatient(
  manifest: Pick<Manifest, 'patient' | 'resection'>,
  visit: RemnantVisit | null | undefined,
  opts: RemnantOptions = {},
): PatientRemnant | null {
  const proposed = opts.resection ?? manifest.resection;
  if (!proposed || !visit) return null;
  const warnings: string[] = [];
  const body = usableBody(opts.body ?? manifest.patient, warnings);
  const plan = planRemnant(visit.volumetry, proposed.preset ?? proposed.segments ?? [], body, visit.lesions);

  const trackOf = new Map<string, string>();
  for (const t of opts.tracks ?? []) {
    const lesion = t.lesions[visit.id];
    if (lesion !== undefined) trackOf.set(lesion, t.id);
  }
  const byId = new Map(visit.lesions.map((l) => [l.id, l]));
  const alert = (id: string, where: RemnantAlertLesion['where']): RemnantAlertLesion => {
    const l = byId.get(id);
    return {
      lesion: id,
      track: trackOf.get(id) ?? null,
      segment: l?.segment ?? null,
      marginMm: l?.marginMm ?? null,
      nearestOtherSegment: l?.nearestOtherSegment ?? null,
      where,
    };
  };
  const crossing = new Set(plan.lesionsCrossingCut.map((c) => c.id));
  const removes = plan.removedSegments.length ? `removes ${plan.removedSegments.join(', ')}` : 'removes nothing';
  return {
    ...plan,
    warnings: [...warnings, ...plan.warnings],
    visitId: visit.id,
    visitDate: visit.date,
    proposed,
    label: `${plan.resection?.name ?? 'Chosen segments'} (${removes})`,
    alertLesions: [
      ...plan.alertLesionsInRemnant.map((id) => alert(id, crossing.has(id) ? 'crosses the cut' : 'in remnant')),
      ...plan.alertLesionsAtTransection.map((id) => alert(id, 'at transection')),
    ],
    lesionTracks: Object.fromEntries(trackOf),
  };
}

/** The body size if both formulas accept it; otherwise none, with the reason as a warning. */
function usableBody(body: BodySize | undefined, warnings: string[]): BodySize | undefined {
  const h = body?.heightCm ?? null;
  const w = body?.weightKg ?? null;
  if (h === null || w === null) return body;
  try {
    standardisedLiverVolumeMl(bodySurfaceAreaM2(h, w));
    return { heightCm: h, weightKg: w };
  } catch (e) {
    if (!isFalciformError(e)) throw e;
    warnings.push(`Height ${h} cm and weight ${w} kg are not used (${e.message}); the measured share is used.`);
    return undefined;
  }
}
