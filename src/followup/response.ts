import {
  nadirMm,
  overallResponse,
  percentChange,
  recordedTargetMm,
  targetCategory,
  targetSum,
  type NonTargetCategory,
  type OverallCategory,
  type TargetCategory,
  type TargetObservation,
  type TargetSums,
} from './recist.js';

/**
 * The response at every visit of a series under one set of criteria, from per-visit observations of
 * the targets. The baseline visit gets its sums and no category. The nadir is the smallest complete
 * sum before the visit (baseline included); a visit with a target not evaluable does not set it.
 */
export type Criteria = 'RECIST 1.1' | 'mRECIST';

export interface VisitResponse {
  criteria: Criteria;
  /** Sum of recorded target diameters (of the evaluable ones when `targetSumComplete` is false: show it as NE, see `targetSumText`). */
  targetSumMm: number;
  targetSumComplete: boolean;
  baselineSumMm: number;
  nadirSumMm: number;
  changeFromBaselinePct: number | null;
  changeFromNadirPct: number | null;
  /** Overall response at this visit; null at baseline. */
  category: OverallCategory | null;
  /** Target lesions alone; 'none' without targets; null at baseline. */
  targetCategory: TargetCategory | 'none' | null;
  nonTargetCategory: NonTargetCategory | null;
  newLesion: boolean;
  /** Each target with the diameter recorded for it (null: not evaluable). */
  targets: { track: string; recordedMm: number | null }[];
}

export interface SeriesInput {
  criteria: Criteria;
  targets: readonly string[];
  /** [visit][target] observations, targets in the order of `targets`. */
  observations: readonly (readonly TargetObservation[])[];
  nonTarget: readonly NonTargetCategory[];
  newLesion: readonly boolean[];
  /** Target category rule (RECIST 1.1's or mRECIST's). */
  categorise?: (s: TargetSums) => TargetCategory;
}

export function responseSeries(input: SeriesInput): VisitResponse[] {
  const categorise = input.categorise ?? ((s) => targetCategory(s));
  const completeSums: number[] = [];
  let baselineMm = 0;
  return input.observations.map((obs, k) => {
    const recorded = obs.map(recordedTargetMm);
    const { sumMm, complete } = targetSum(recorded);
    if (k === 0) baselineMm = sumMm;
    const nadir = k === 0 ? sumMm : completeSums.length > 0 ? nadirMm(completeSums) : baselineMm;
    const hasTargets = input.targets.length > 0;
    let target: TargetCategory | 'none' | null = null;
    let category: OverallCategory | null = null;
    if (k > 0) {
      target = hasTargets ? categorise({ sumMm, baselineMm, nadirMm: nadir, complete }) : 'none';
      category = overallResponse(target, input.nonTarget[k], input.newLesion[k]);
    }
    if (complete) completeSums.push(sumMm);
    return {
      criteria: input.criteria,
      targetSumMm: sumMm,
      targetSumComplete: complete,
      baselineSumMm: baselineMm,
      nadirSumMm: nadir,
      // An incomplete sum is not a change: a missing target would otherwise read as shrinkage (−100%).
      changeFromBaselinePct: hasTargets && complete ? percentChange(sumMm, baselineMm) : null,
      changeFromNadirPct: hasTargets && complete ? percentChange(sumMm, nadir) : null,
      category,
      targetCategory: target,
      nonTargetCategory: k > 0 ? input.nonTarget[k] : null,
      newLesion: input.newLesion[k],
      targets: input.targets.map((track, n) => ({ track, recordedMm: recorded[n] })),
    };
  });
}

/** The target sum as shown on screens and in exports: NE when a target was not evaluable. */
export function targetSumText(r: Pick<VisitResponse, 'targetSumMm' | 'targetSumComplete'>): string {
  return r.targetSumComplete ? `${r.targetSumMm.toFixed(1)} mm` : 'NE';
}
