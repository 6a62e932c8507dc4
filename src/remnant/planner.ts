import { badInput } from '../errors.js';
import { isSegmentName, type SegmentName } from '../segments/segment-map.js';
import { bodySurfaceAreaM2, standardisedLiverVolumeMl } from './body.js';
import { expandRemoved, resectionPreset, RESECTION_PRESETS } from './resections.js';
import type { VisitVolumetry } from './volumetry.js';

export type LiverContext = 'normal liver' | 'after extensive chemotherapy' | 'cirrhosis';

/**
 * Minimum remnant shares commonly quoted for each state of the liver. Common practice, from
 * memory: no document was at hand to cite, and local protocols decide.
 */
export const REMNANT_MINIMUMS: readonly { context: LiverContext; minimumShare: number }[] = [
  { context: 'normal liver', minimumShare: 0.2 },
  { context: 'after extensive chemotherapy', minimumShare: 0.3 },
  { context: 'cirrhosis', minimumShare: 0.4 },
];
const MINIMUMS_SOURCE =
  'Commonly quoted minimum share of the future liver remnant, by the state of the liver; common practice, from memory ' +
  '(no guideline document at hand). Local protocols decide.';

/**
 * What the plan is and is not, said wherever its figures are shown: removal of whole segments as the
 * segment map labels them, by volume only.
 */
export const REMNANT_SCOPE =
  'Whole segments of the segment map are taken away: this is a volume estimate, not a transection plan. ' +
  'Liver function is not assessed.';

/** What the planner needs of a lesion; `Lesion` records from the analysis carry these fields. */
export interface PlannerLesion {
  id: string;
  /** Segment holding the centroid; null when the lesion lies outside the liver. */
  segment: SegmentName | null;
  marginAlert: boolean;
  segmentFractions?: Partial<Record<SegmentName, number>>;
  nearestOtherSegment?: SegmentName | null;
}

export interface BodySize {
  heightCm?: number | null;
  weightKg?: number | null;
}

export interface RemnantCaution {
  context: LiverContext;
  minimumShare: number;
  /** The compared share is at or above this minimum (shown as "above"/"below", never as a verdict). */
  met: boolean;
  source: string;
}

export interface RemnantPlan {
  resection: { id: string; name: string } | null;
  /** The map's segments taken away (IV expanded to IVa and IVb on a split map). */
  removedSegments: SegmentName[];
  remnantSegments: SegmentName[];
  tumourFreeLiverMl: number;
  /** Tumour-free volume of the segments that stay. */
  remnantMl: number;
  /** remnantMl / tumour-free liver volume. */
  remnantShare: number;
  bsaM2: number | null;
  standardisedLiverMl: number | null;
  /** remnantMl / standardised total liver volume (Vauthey 2002). */
  standardisedRemnantShare: number | null;
  /** The share held against the minimums: the standardised one when height and weight are known. */
  comparedShare: { kind: 'standardised' | 'measured'; value: number; description: string };
  /**
   * Set when the compared share is over 100%: the standardised remnant exceeds the liver volume the
   * body size predicts, so the measured liver is larger than predicted. Says what to check.
   */
  overFull: string | null;
  cautionsNote: string;
  cautions: RemnantCaution[];
  /** Lesions lying wholly in segments that stay. */
  lesionsInRemnant: string[];
  /** Lesions with parts both in removed segments and in segments that stay: the cut runs through them. */
  lesionsCrossingCut: { id: string; keptShare: number }[];
  /** Margin-alert lesions in the remnant or crossing the cut. */
  alertLesionsInRemnant: string[];
  /** Lesions taken out whole but with a margin alert towards a segment that stays: the cut runs close. */
  alertLesionsAtTransection: string[];
  estimated: boolean;
  warnings: string[];
}

/**
 * The liver left after removing `removed` (segment names, or a resection preset's id), its share
 * of the tumour-free liver and, with height and weight, of the standardised liver volume; the
 * commonly quoted minimums as cautions; the lesions that would stay.
 */
export function planRemnant(
  volumetry: VisitVolumetry,
  removed: readonly SegmentName[] | string,
  body?: BodySize,
  lesions: readonly PlannerLesion[] = [],
): RemnantPlan {
  const warnings: string[] = [];
  const { chosen, resection } = resolveChoice(removed);
  const present = volumetry.segments.map((s) => s.segment);
  const { removed: removedSegments, notFound } = expandRemoved(chosen, present);
  for (const s of notFound) warnings.push(`Segment ${s} is not in this visit's segment map; nothing is removed for it.`);
  if (chosen.length === 0) warnings.push('No segments are chosen for removal; the remnant is the whole liver.');

  const gone = new Set(removedSegments);
  const remnantSegments = present.filter((s) => !gone.has(s));
  if (remnantSegments.length === 0) warnings.push('Every segment in the map is removed; nothing would remain.');
  if (!present.includes('I') && volumetry.caudateInPlaneSegments) {
    warnings.push(
      "Segment I is not separated in this visit's segment map (built from landmarks without a caudate mask): its tissue is counted in the plane segments around it, so their volumes include it; give a caudate mask to separate it.",
    );
  } else if (!present.includes('I')) {
    warnings.push("Segment I is not in this visit's segment map: the liver and remnant volumes leave it out, so a remnant that keeps it is understated.");
  }
  if (volumetry.estimated) {
    warnings.push('Tumour volumes are estimates from marked diameters, so the tumour-free volumes and shares below are estimates too.');
  }

  const tumourFreeLiverMl = volumetry.tumourFreeLiverMl;
  if (!(tumourFreeLiverMl > 0)) throw badInput('segment map', 'has no tumour-free liver volume to plan a remnant from');
  const remnantMl = volumetry.segments.filter((s) => !gone.has(s.segment)).reduce((a, s) => a + s.tumourFreeMl, 0);
  const remnantShare = remnantMl / tumourFreeLiverMl;

  const standard = standardised(remnantMl, body, warnings);
  if (standard) checkAgainstBodySize(volumetry.liverVolumeMl, standard.liverMl, warnings);
  const comparedShare = standard
    ? { kind: 'standardised' as const, value: standard.share, description: 'standardised remnant: remnant volume / standardised total liver volume from body surface area (Vauthey 2002)' }
    : { kind: 'measured' as const, value: remnantShare, description: 'measured share: remnant volume / tumour-free liver volume (height and weight not known)' };
  // A hair of tolerance so a share that is the minimum up to rounding counts as meeting it.
  const cautions = REMNANT_MINIMUMS.map(({ context, minimumShare }) => ({
    context, minimumShare, met: comparedShare.value >= minimumShare - 1e-9, source: MINIMUMS_SOURCE,
  }));

  return {
    resection,
    removedSegments,
    remnantSegments,
    tumourFreeLiverMl,
    remnantMl,
    remnantShare,
    bsaM2: standard?.bsaM2 ?? null,
    standardisedLiverMl: standard?.liverMl ?? null,
    standardisedRemnantShare: standard?.share ?? null,
    comparedShare,
    overFull: comparedShare.value > 1 ? overFullNote(comparedShare.value, remnantShare) : null,
    cautionsNote: `Commonly quoted minimums; local protocols decide. Compared with the ${comparedShare.description}. ${REMNANT_SCOPE}`,
    cautions,
    ...lesionsLeft(lesions, chosen),
    estimated: volumetry.estimated,
    warnings,
  };
}

function resolveChoice(removed: readonly SegmentName[] | string): {
  chosen: SegmentName[];
  resection: { id: string; name: string } | null;
} {
  if (typeof removed === 'string') {
    const preset = resectionPreset(removed);
    if (!preset) {
      throw badInput('resection', `unknown resection "${removed}"; known: ${RESECTION_PRESETS.map((p) => p.id).join(', ')}`);
    }
    return { chosen: [...preset.removes], resection: { id: preset.id, name: preset.name } };
  }
  for (const s of removed) {
    if (!isSegmentName(s)) {
      throw badInput('removed segments', `unknown segment name ${JSON.stringify(s)} (expected one of I, II, III, IV, IVa, IVb, V, VI, VII, VIII)`);
    }
  }
  return { chosen: [...new Set(removed)], resection: null };
}

function standardised(
  remnantMl: number,
  body: BodySize | undefined,
  warnings: string[],
): { bsaM2: number; liverMl: number; share: number } | null {
  const h = body?.heightCm ?? null;
  const w = body?.weightKg ?? null;
  if (h === null || w === null) {
    if (h !== null || w !== null) warnings.push('Both height and weight are needed for the standardised remnant; the measured share is used.');
    return null;
  }
  const bsaM2 = bodySurfaceAreaM2(h, w);
  const liverMl = standardisedLiverVolumeMl(bsaM2);
  return { bsaM2, liverMl, share: remnantMl / liverMl };
}

/** Why a standardised remnant can exceed 100%, and what to read instead. */
function overFullNote(compared: number, measuredShare: number): string {
  return (
    `The standardised remnant is ${(compared * 100).toFixed(1)}%, over 100%: the remnant alone is larger than the total liver ` +
    'volume predicted from height and weight (Vauthey 2002). The formula predicts an average liver; this one is larger, or the ' +
    'outline, voxel size, height or weight is wrong. Check them; the measured share of the tumour-free liver is ' +
    `${(measuredShare * 100).toFixed(1)}%.`
  );
}

// A measured liver this far from the one the body size predicts points more often to a wrong
// outline, voxel size, height or weight than to the liver itself; a generous band, not a clinical limit.
const PLAUSIBLE_LIVER_RATIO = { min: 0.5, max: 1.5 };

function checkAgainstBodySize(liverMl: number, standardisedMl: number, warnings: string[]): void {
  const ratio = liverMl / standardisedMl;
  if (ratio >= PLAUSIBLE_LIVER_RATIO.min && ratio <= PLAUSIBLE_LIVER_RATIO.max) return;
  warnings.push(
    `The measured liver (${liverMl.toFixed(1)} mL) is ${(ratio * 100).toFixed(0)}% of the standardised total liver volume ` +
    `for this height and weight (${standardisedMl.toFixed(1)} mL): check the segment map's liver outline, the scan's voxel size ` +
    'and the height and weight before relying on the standardised remnant.',
  );
}

/**
 * Lesions that would stay, judged by name so it holds whichever way IV is labelled: removing IV
 * takes IVa and IVb, and removing both IVa and IVb takes IV. A lesion with parts on both sides of the
 * cut is neither kept nor removed: it is named as crossing it, with the share that would stay.
 */
function lesionsLeft(
  lesions: readonly PlannerLesion[],
  chosen: readonly SegmentName[],
): Pick<RemnantPlan, 'lesionsInRemnant' | 'lesionsCrossingCut' | 'alertLesionsInRemnant' | 'alertLesionsAtTransection'> {
  const gone = new Set<SegmentName>(chosen);
  if (gone.has('IV')) { gone.add('IVa'); gone.add('IVb'); }
  if (gone.has('IVa') && gone.has('IVb')) gone.add('IV');
  const stays = (s: SegmentName) => !gone.has(s);

  const lesionsInRemnant: string[] = [];
  const lesionsCrossingCut: { id: string; keptShare: number }[] = [];
  const alertLesionsInRemnant: string[] = [];
  const alertLesionsAtTransection: string[] = [];
  for (const l of lesions) {
    if (l.segment === null) continue;
    const parts = Object.entries(l.segmentFractions ?? {}).filter(([, f]) => (f ?? 0) > 0) as [SegmentName, number][];
    // A manual mark has no fractions: it lies wholly in its centroid's segment.
    const shares: [SegmentName, number][] = parts.length ? parts : [[l.segment, 1]];
    const kept = shares.filter(([s]) => stays(s)).reduce((a, [, f]) => a + f, 0);
    const removedPart = shares.some(([s]) => !stays(s));
    if (kept > 0 && removedPart) lesionsCrossingCut.push({ id: l.id, keptShare: kept });
    else if (kept > 0) lesionsInRemnant.push(l.id);
    if (kept > 0) {
      if (l.marginAlert) alertLesionsInRemnant.push(l.id);
    } else if (l.marginAlert && l.nearestOtherSegment && stays(l.nearestOtherSegment)) {
      alertLesionsAtTransection.push(l.id);
    }
  }
  return { lesionsInRemnant, lesionsCrossingCut, alertLesionsInRemnant, alertLesionsAtTransection };
}
