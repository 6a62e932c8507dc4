import { badInput } from '../errors.js';
import { roundTo } from '../rounding.js';

/**
 * RECIST 1.1 response rules (Eisenhauer et al., Eur J Cancer 2009;45:228-247; section numbers
 * below from memory) as small pure functions over numbers, so each rule can be checked on its own and reused for mRECIST, which
 * applies the same arithmetic to viable-tumour diameters.
 *
 * Choices where the guideline leaves room:
 * - Diameters are recorded to 0.1 mm before summing, and categories are decided on those recorded
 *   values; thresholds count as reached when met exactly ("at least 30%"), with a 1e-6 mm allowance
 *   for floating-point sums.
 * - Percent changes are shown truncated towards zero at 0.1%, so a shown value never crosses a
 *   threshold the category did not (−29.96% shows as −29.9%, not −30.0%).
 * - Non-target progression ("unequivocal progression") is a reader's judgement: it is only ever
 *   PD here when a reader says so.
 */

export type TargetCategory = 'CR' | 'PR' | 'SD' | 'PD' | 'NE';
/** 'none': no non-target lesion at baseline. */
export type NonTargetCategory = 'CR' | 'non-CR/non-PD' | 'PD' | 'NE' | 'none';
/** Overall response; 'non-CR/non-PD' only for a patient with non-target disease alone (RECIST 1.1 table 2). */
export type OverallCategory = 'CR' | 'PR' | 'SD' | 'PD' | 'NE' | 'non-CR/non-PD';

/** Smallest measurable longest diameter on CT/MR with slices of 5 mm or less. */
export const MEASURABLE_MIN_MM = 10;
/** Above this slice thickness the minimum becomes twice the thickness. */
export const THIN_SLICE_MAX_MM = 5;
/** At most this many targets per organ; the liver is one organ. */
export const MAX_TARGETS_PER_ORGAN = 2;
/** A target present but too small to measure is recorded as this. */
export const TOO_SMALL_RECORDED_MM = 5;
export const PR_DECREASE = 0.3;
export const PD_INCREASE = 0.2;
export const PD_MIN_INCREASE_MM = 5;
const EPS_MM = 1e-6;

/** Minimum longest diameter of a measurable lesion for a given slice thickness. */
export function measurableMinMm(sliceThicknessMm: number): number {
  return sliceThicknessMm > THIN_SLICE_MAX_MM ? Math.max(MEASURABLE_MIN_MM, 2 * sliceThicknessMm) : MEASURABLE_MIN_MM;
}

export function isMeasurable(longestMm: number, sliceThicknessMm: number): boolean {
  return longestMm >= measurableMinMm(sliceThicknessMm) - EPS_MM;
}

/**
 * The one target-count rule for the command line and the app: more than two named targets in the
 * liver is refused (section 4.2, at most two per organ, from memory; the liver is one organ).
 */
export function checkTargetCount(targets: readonly string[]): void {
  if (targets.length > MAX_TARGETS_PER_ORGAN) {
    throw badInput('targets', `${targets.length} named; RECIST 1.1 takes at most ${MAX_TARGETS_PER_ORGAN} per organ, and the liver is one organ`);
  }
  if (new Set(targets).size !== targets.length) throw badInput('targets', 'names a track more than once');
}

export interface TargetCandidate {
  id: string;
  longestMm: number;
  measurable: boolean;
}

/**
 * Default targets: measurable lesions, largest first, at most `max` (two per organ, and every
 * candidate here is in the liver). Ties go to the earlier id so the choice is reproducible.
 */
export function selectTargets(candidates: readonly TargetCandidate[], max = MAX_TARGETS_PER_ORGAN): string[] {
  return candidates
    .map((c, order) => ({ ...c, order }))
    .filter((c) => c.measurable)
    .sort((a, b) => b.longestMm - a.longestMm || a.order - b.order)
    .slice(0, max)
    .map((c) => c.id);
}

/** What is known about one target at one visit. */
export type TargetObservation =
  | { kind: 'measured'; longestMm: number }
  /** A reader marked it present but too small to measure. */
  | { kind: 'too-small' }
  | { kind: 'vanished' }
  | { kind: 'not-evaluable' };

/**
 * The diameter recorded for a target (section 4.3.2, "target lesions that become too small to
 * measure", from memory): a measurement is recorded as measured, even under 5 mm; 5 mm is the default
 * only for a lesion a reader judges present but too small to measure; a vanished one 0 mm; null when
 * not evaluable.
 */
export function recordedTargetMm(o: TargetObservation): number | null {
  if (o.kind === 'not-evaluable') return null;
  if (o.kind === 'vanished') return 0;
  if (o.kind === 'too-small') return TOO_SMALL_RECORDED_MM;
  return round1(o.longestMm);
}

/** Sum of the recorded diameters; `complete` is false when any target was not evaluable. */
export function targetSum(recorded: readonly (number | null)[]): { sumMm: number; complete: boolean } {
  let sum = 0;
  let complete = true;
  for (const r of recorded) {
    if (r === null) complete = false;
    else sum += r;
  }
  return { sumMm: round1(sum), complete };
}

/** Nadir: the smallest complete sum so far, baseline included (sums of earlier visits, baseline first). */
export function nadirMm(earlierCompleteSums: readonly number[]): number {
  if (earlierCompleteSums.length === 0) throw new Error('the nadir needs at least the baseline sum');
  return Math.min(...earlierCompleteSums);
}

/** Change from a reference sum in %, truncated towards zero at 0.1%; null when the reference is 0. */
export function percentChange(valueMm: number, referenceMm: number): number | null {
  if (referenceMm <= 0) return null;
  const pct = ((valueMm - referenceMm) / referenceMm) * 100;
  const t = Math.trunc(pct * 10 + Math.sign(pct) * 1e-6) / 10;
  return t === 0 ? 0 : t;
}

export interface TargetSums {
  /** This visit's sum of recorded diameters (of the evaluable targets when incomplete). */
  sumMm: number;
  baselineMm: number;
  nadirMm: number;
  /** Every target evaluable at this visit. */
  complete: boolean;
}

/**
 * Target response (section 4.3.1). PD first: at least 20% over the nadir and at least 5 mm more;
 * an incomplete sum can still prove PD, since the missing targets could only add (section 4.4.2,
 * missing assessments). Then NE when incomplete; CR when every target is at 0; PR at least 30%
 * under baseline; else SD.
 */
export function targetCategory(s: TargetSums, minIncreaseMm = PD_MIN_INCREASE_MM): TargetCategory {
  const increase = s.sumMm - s.nadirMm;
  if (increase >= PD_INCREASE * s.nadirMm - EPS_MM && increase >= minIncreaseMm - EPS_MM && increase > 0) return 'PD';
  if (!s.complete) return 'NE';
  if (s.sumMm <= EPS_MM) return 'CR';
  if (s.sumMm - s.baselineMm <= -PR_DECREASE * s.baselineMm + EPS_MM) return 'PR';
  return 'SD';
}

/** A reader's call on the non-target lesions at a visit (RECIST 1.1 section 4.3.3, from memory). */
export type NonTargetCall = 'present' | 'absent' | 'unequivocal-progression';
/** A reader's assessment of disease outside the liver at a visit; Falciform assesses only the liver. */
export type OutsideLiverCall = 'none' | 'not-assessed' | 'stable' | 'progression';
export const NON_TARGET_CALLS: readonly NonTargetCall[] = ['present', 'absent', 'unequivocal-progression'];
export const OUTSIDE_LIVER_CALLS: readonly OutsideLiverCall[] = ['none', 'not-assessed', 'stable', 'progression'];

export interface NonTargetState {
  /** Non-target liver lesions recorded at baseline. */
  total: number;
  /** Of those, seen at this visit. */
  present: number;
  /** Of those, not assessable at this visit (outside the scanned field, or missing and not confirmed gone). */
  notEvaluable: number;
  /** A reader has judged the non-target disease to have progressed unequivocally. */
  readerProgression?: boolean;
  /** The reader's call on the non-target lesions; it replaces the count above when given. */
  call?: NonTargetCall;
  /** Disease outside the liver; undefined counts as not assessed. */
  outsideLiver?: OutsideLiverCall;
}

const NON_TARGET_RANK: Record<NonTargetCategory, number> = { PD: 4, 'non-CR/non-PD': 3, NE: 2, CR: 1, none: 0 };

/**
 * Non-target response (sections 4.3.3 and 4.3.4): CR when all have gone; non-CR/non-PD while any
 * persists; PD only on a reader's judgement; NE when none is seen but some could not be assessed.
 * The liver's non-targets and the disease outside the liver (the reader's assessment: 'none' adds
 * nothing, 'not-assessed' is NE, 'stable' non-CR/non-PD, 'progression' PD) combine as the worse of
 * the two, in the order PD, non-CR/non-PD, NE, CR — so an unassessed body never allows a CR.
 */
export function nonTargetCategory(s: NonTargetState): NonTargetCategory {
  const outside: NonTargetCategory =
    s.outsideLiver === 'none' ? 'none' : s.outsideLiver === 'stable' ? 'non-CR/non-PD' : s.outsideLiver === 'progression' ? 'PD' : 'NE';
  const liver = liverNonTarget(s);
  return NON_TARGET_RANK[outside] > NON_TARGET_RANK[liver] ? outside : liver;
}

function liverNonTarget(s: NonTargetState): NonTargetCategory {
  if (s.readerProgression || s.call === 'unequivocal-progression') return 'PD';
  if (s.call === 'present') return 'non-CR/non-PD';
  if (s.total === 0) return 'none';
  if (s.call === 'absent') return 'CR';
  if (s.present > 0) return 'non-CR/non-PD';
  return s.notEvaluable > 0 ? 'NE' : 'CR';
}

/**
 * Overall response at a time point (RECIST 1.1 tables 1 and 2, section 4.4.1). `target` is 'none'
 * for a patient without target lesions.
 */
export function overallResponse(target: TargetCategory | 'none', nonTarget: NonTargetCategory, newLesion: boolean): OverallCategory {
  if (target === 'PD' || nonTarget === 'PD' || newLesion) return 'PD';
  if (target === 'none') {
    if (nonTarget === 'CR') return 'CR';
    if (nonTarget === 'non-CR/non-PD') return 'non-CR/non-PD';
    return 'NE';
  }
  if (target === 'NE') return 'NE';
  if (target === 'CR') return nonTarget === 'CR' || nonTarget === 'none' ? 'CR' : 'PR';
  return target;
}

/** A diameter as recorded: to 0.1 mm. */
export function round1(x: number): number {
  return roundTo(x, 1);
}
