import { badInput, badLandmarks } from '../errors.js';
import { distance } from '../geometry/vec3.js';
import { isJsonObject, parseJsonFile } from '../json-file.js';
import { LANDMARK_NAMES, landmarkSetFromJson, type LandmarkName, type LandmarkSet } from './landmarks.js';

/**
 * Landmark QC by spatial configuration. Pairwise distances between landmarks do not change when the
 * patient moves rigidly, so a visit's 15 distances should match those of the patient's earlier visits;
 * reference configurations (other people) match after one size factor.
 *
 * Method: the comparison configuration is the mean distance vector of the compared sets, earlier
 * visits as they are and each reference set scaled by its least-squares size factor against this
 * visit. Agreement is the Pearson correlation of this visit's distances with it, and the largest
 * absolute difference in mm. Each landmark is dropped in turn (its five distances left out, size
 * factors refitted); the one whose removal raises the correlation most is named when the largest
 * difference is at least `QC_MIN_CHANGE_MM` and its removal at least halves the disagreement 1 − r.
 */
export interface LandmarkQc {
  /** Pearson correlation of the 15 pairwise distances with the comparison configuration. */
  correlation: number;
  /** Largest absolute difference of one pairwise distance, mm. */
  maxChangeMm: number;
  /** The two landmarks whose distance changed most. */
  maxChangePair: [LandmarkName, LandmarkName];
  /** Landmark whose removal improves agreement most, when the improvement is meaningful. */
  worstLandmark: LandmarkName | null;
  /** Correlation without `worstLandmark`; null when none is named. */
  correlationWithout: number | null;
  /** Correlation with each landmark left out in turn. */
  correlationWithoutEach: Record<LandmarkName, number>;
  /** Number of configurations compared (earlier visits + reference sets). */
  comparedWith: number;
  earlierVisits: number;
  referenceSets: number;
}

/** Below this largest change no landmark is named: within what careful manual placement varies (our choice). */
export const QC_MIN_CHANGE_MM = 5;

const PAIRS: readonly (readonly [number, number])[] = LANDMARK_NAMES.flatMap((_, a) =>
  LANDMARK_NAMES.slice(a + 1).map((__, n) => [a, a + 1 + n] as const),
);

/** Compares a set with earlier visits of the same patient and optional reference configurations. */
export function landmarkQc(set: LandmarkSet, earlier: LandmarkSet[], reference: LandmarkSet[] = []): LandmarkQc {
  const comparedWith = earlier.length + reference.length;
  if (comparedWith === 0) throw badInput('landmark QC', 'nothing to compare with: no earlier visit and no reference configuration');
  const d = distances(set);
  const others = [...earlier.map((s) => ({ d: distances(s), rescale: false })), ...reference.map((s) => ({ d: distances(s), rescale: true }))];
  const all = PAIRS.map(() => true);
  const full = agreement(d, others, all);
  const correlationWithoutEach = {} as Record<LandmarkName, number>;
  let worst = -1;
  let best = -Infinity;
  LANDMARK_NAMES.forEach((name, l) => {
    const keep = PAIRS.map(([a, b]) => a !== l && b !== l);
    const r = agreement(d, others, keep).correlation;
    correlationWithoutEach[name] = r;
    if (r > best) {
      best = r;
      worst = l;
    }
  });
  const meaningful = full.maxChangeMm >= QC_MIN_CHANGE_MM && 1 - best <= 0.5 * (1 - full.correlation) && best > full.correlation;
  const [pa, pb] = PAIRS[full.maxPair];
  return {
    correlation: full.correlation,
    maxChangeMm: full.maxChangeMm,
    maxChangePair: [LANDMARK_NAMES[pa], LANDMARK_NAMES[pb]],
    worstLandmark: meaningful ? LANDMARK_NAMES[worst] : null,
    correlationWithout: meaningful ? best : null,
    correlationWithoutEach,
    comparedWith,
    earlierVisits: earlier.length,
    referenceSets: reference.length,
  };
}

/** A reference file: a JSON array of landmark sets, or `{"sets": [...]}`. */
export function parseReferenceSets(text: string, file: string): LandmarkSet[] {
  const json = parseJsonFile(text, file, badLandmarks);
  const list = Array.isArray(json) ? json : isJsonObject(json) ? json.sets : undefined;
  if (!Array.isArray(list)) throw badLandmarks(file, 'expected an array of landmark sets, or an object with an array "sets"');
  if (list.length === 0) throw badLandmarks(file, 'the reference file holds no landmark set');
  return list.map((entry, n) => landmarkSetFromJson(entry, file, `set ${n + 1}`));
}

function distances(set: LandmarkSet): Float64Array {
  const pts = LANDMARK_NAMES.map((n) => set.points[n]);
  const d = new Float64Array(PAIRS.length);
  PAIRS.forEach(([a, b], n) => {
    d[n] = distance(pts[a], pts[b]);
  });
  return d;
}

function agreement(
  d: Float64Array,
  others: { d: Float64Array; rescale: boolean }[],
  keep: readonly boolean[],
): { correlation: number; maxChangeMm: number; maxPair: number } {
  const target = new Float64Array(d.length);
  for (const o of others) {
    let s = 1;
    if (o.rescale) {
      let num = 0, den = 0;
      for (let n = 0; n < d.length; n++) if (keep[n]) { num += d[n] * o.d[n]; den += o.d[n] * o.d[n]; }
      s = den > 0 ? num / den : 1;
    }
    for (let n = 0; n < d.length; n++) target[n] += (s * o.d[n]) / others.length;
  }
  let maxChangeMm = 0, maxPair = 0;
  for (let n = 0; n < d.length; n++) {
    if (keep[n] && Math.abs(d[n] - target[n]) > maxChangeMm) {
      maxChangeMm = Math.abs(d[n] - target[n]);
      maxPair = n;
    }
  }
  return { correlation: pearson(d, target, keep), maxChangeMm, maxPair };
}

function pearson(x: Float64Array, y: Float64Array, keep: readonly boolean[]): number {
  let n = 0, mx = 0, my = 0;
  for (let q = 0; q < x.length; q++) if (keep[q]) { n++; mx += x[q]; my += y[q]; }
  mx /= n;
  my /= n;
  let sxy = 0, sxx = 0, syy = 0;
  for (let q = 0; q < x.length; q++) {
    if (!keep[q]) continue;
    const a = x[q] - mx, b = y[q] - my;
    sxy += a * b;
    sxx += a * a;
    syy += b * b;
  }
  if (sxx === 0 || syy === 0) return sxx === syy ? 1 : 0;
  return Math.min(1, sxy / Math.sqrt(sxx * syy));
}
