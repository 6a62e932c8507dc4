import type { Vec3 } from '../geometry/mat4.js';
import { fitRigid, IDENTITY_RIGID, rotationAngleDeg, type RigidTransform } from '../geometry/rigid.js';
import { LANDMARK_NAMES, type LandmarkSet } from '../segments/landmarks.js';
import type { LiverShape } from './liver-shape.js';
import { fitLiverSurfaces } from './surface-fit.js';

/**
 * Brings a visit into the reference (baseline) visit's world space before its lesions are matched.
 * Every visit is aligned to the baseline directly rather than to the visit before, so errors do
 * not accumulate along the series. Methods, best first:
 *
 * 1. landmarks — both visits have a landmark set: least-squares rigid fit of the six named points;
 *    the residual is their RMS distance after the fit.
 * 2. liver — both visits have a liver mask (or a segment map, whose labelled voxels are the liver):
 *    principal axes then trimmed surface ICP; the residual is the RMS surface distance.
 * 3. none — world coordinates are taken as they are, with a warning; matching then allows more slack.
 */
export type AlignmentMethod = 'reference' | 'landmarks' | 'liver' | 'none';

export interface Alignment {
  method: AlignmentMethod;
  /** This visit's world mm → the reference visit's world mm. */
  transform: RigidTransform;
  /** RMS fit residual in mm; null when nothing was fitted. */
  residualMm: number | null;
  /** Rotation of the fitted transform, degrees; shown so a reader can judge a surprising fit. */
  rotationDeg: number;
  warnings: string[];
}

export interface AlignInput {
  landmarks?: LandmarkSet;
  liver?: LiverShape | null;
}

/** Landmark residuals above this suggest a misplaced point rather than liver deformation. */
export const LANDMARK_RESIDUAL_WARN_MM = 5;
/** Surface residuals above this suggest a changed liver (resection, growth) or a segmentation difference. */
export const SURFACE_RESIDUAL_WARN_MM = 5;
/** Serial scans in the same position rarely differ by more than this; beyond it the fit deserves a look. */
export const LARGE_ROTATION_DEG = 20;

export function referenceAlignment(): Alignment {
  return { method: 'reference', transform: IDENTITY_RIGID, residualMm: 0, rotationDeg: 0, warnings: [] };
}

/** Aligns visit `label` (moving) to the reference visit (fixed). */
export function alignVisit(moving: AlignInput, fixed: AlignInput, label: string): Alignment {
  const warnings: string[] = [];
  if (moving.landmarks && fixed.landmarks) {
    try {
      const a = landmarkPoints(moving.landmarks), b = landmarkPoints(fixed.landmarks);
      const fit = fitRigid(a, b);
      if (fit.residualMm > LANDMARK_RESIDUAL_WARN_MM) {
        warnings.push(
          `visit ${label}: landmark sets differ by ${fit.residualMm.toFixed(1)} mm RMS after rigid alignment; check the landmark placement`,
        );
      }
      return finish('landmarks', fit.transform, fit.residualMm, warnings, label);
    } catch (e) {
      warnings.push(`visit ${label}: landmark alignment failed (${(e as Error).message}); trying the liver masks`);
    }
  }
  if (moving.liver && fixed.liver) {
    try {
      const fit = fitLiverSurfaces(moving.liver, fixed.liver);
      if (fit.residualMm > SURFACE_RESIDUAL_WARN_MM) {
        warnings.push(
          `visit ${label}: liver surfaces differ by ${fit.residualMm.toFixed(1)} mm RMS after alignment (resection, growth or a different segmentation?); lesion matching may need checking`,
        );
      }
      return finish('liver', fit.transform, fit.residualMm, warnings, label);
    } catch (e) {
      // Only a degenerate mask (a few voxels, a line) gets here.
      warnings.push(`visit ${label}: liver-mask alignment failed (${(e as Error).message})`);
    }
  }
  warnings.push(
    `visit ${label}: not aligned to the baseline (that needs landmark sets or liver masks on both visits); world coordinates used unaligned, check lesion links`,
  );
  return { method: 'none', transform: IDENTITY_RIGID, residualMm: null, rotationDeg: 0, warnings };
}

function finish(method: AlignmentMethod, transform: RigidTransform, residualMm: number, warnings: string[], label: string): Alignment {
  const rotationDeg = rotationAngleDeg(transform.rotation);
  if (rotationDeg > LARGE_ROTATION_DEG) {
    warnings.push(`visit ${label}: alignment rotates by ${rotationDeg.toFixed(1)}°, unusual for serial scans; check lesion links`);
  }
  return { method, transform, residualMm, rotationDeg, warnings };
}

function landmarkPoints(set: LandmarkSet): Vec3[] {
  return LANDMARK_NAMES.map((name) => set.points[name]);
}
