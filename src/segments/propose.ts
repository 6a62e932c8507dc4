import { alignVisit, type Alignment } from '../followup/align.js';
import type { LiverShape } from '../followup/liver-shape.js';
import { applyRigid } from '../geometry/rigid.js';
import { LANDMARK_NAMES, OPTIONAL_LANDMARK, type LandmarkSet } from './landmarks.js';

export interface ProposedLandmarks {
  /**
   * The earlier visit's six points (and its optional umbilical point) carried into this visit's world mm;
   * "proposed" until a reader confirms them.
   */
  set: LandmarkSet;
  /** The rigid alignment used (earlier visit → this visit), with its residual and warnings, for the landmark QC. */
  alignment: Alignment;
}

/**
 * Landmarks for a visit that has none, from an earlier visit of the patient that has: the follow-up's
 * own rigid alignment of the two livers (surface fit) carries each point over. Null when the livers
 * could not be aligned (then a reader places the points by hand).
 */
export function proposeLandmarks(earlier: { landmarks: LandmarkSet; liver: LiverShape }, current: { liver: LiverShape }, label: string): ProposedLandmarks | null {
  const alignment = alignVisit({ liver: earlier.liver }, { liver: current.liver }, label);
  if (alignment.method !== 'liver') return null;
  const points = {} as LandmarkSet['points'];
  for (const name of LANDMARK_NAMES) points[name] = applyRigid(alignment.transform, earlier.landmarks.points[name]);
  const extra = earlier.landmarks.points[OPTIONAL_LANDMARK];
  if (extra) points[OPTIONAL_LANDMARK] = applyRigid(alignment.transform, extra);
  return { set: { points }, alignment };
}
