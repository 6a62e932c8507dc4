import type { AlignmentMethod } from '../../src/followup/align.js';
import type { Vec3 } from '../../src/geometry/mat4.js';
import type { LandmarkSet } from '../../src/segments/landmarks.js';
import type { VoxelArray } from '../../src/volume/volume.js';
import type { ValueSummary } from './window-level.js';

/** One visit's volumes decoded for display, everything on the scan's grid (i fastest). */
export interface VisitVolumes {
  patientId: string;
  visitId: string;
  dims: [number, number, number];
  affine: number[];
  inverse: number[];
  spacingMm: [number, number, number];
  /** Stored scan values; the physical value is value × slope + inter. */
  scan: VoxelArray;
  slope: number;
  inter: number;
  values: ValueSummary;
  /** Default-scheme segment codes on the scan grid; null when the visit's map could not be made. */
  segments: { codes: Uint8Array; splitIV: boolean; source: 'imported' | 'built' } | null;
  /** Why there is no segment map, in words (a landmark set the plane rule cannot use, say). */
  segmentProblem: string | null;
  /** Lesion-mask lesions on the scan grid: value n is lesion ids[n − 1]. */
  lesions: { labels: Uint8Array | Uint16Array; ids: string[] } | null;
  /** The viable (enhancing) tumour mask on the scan grid, 1 where viable; null when the visit has none. */
  viable: Uint8Array | null;
  /**
   * Landmarks proposed for a visit that has a liver mask and no landmark set, from the nearest earlier
   * visit that has one, through the rigid alignment of the two livers; null when there is no such
   * visit or the livers could not be aligned. Shown as "proposed" until the reader confirms them.
   */
  proposal: LandmarkProposal | null;
  /** World bounding box of the liver mask, when the visit has one. */
  liverBoxMm: { min: Vec3; max: Vec3 } | null;
  warnings: string[];
  /** The scan alone, shown while its segment map and lesions are still being made. */
  overlaysPending: boolean;
}

export interface LandmarkProposal {
  fromVisit: string;
  set: LandmarkSet;
  /** The alignment (earlier visit → this one) that carried the points over, for the landmark QC. */
  method: AlignmentMethod;
  residualMm: number | null;
  rotationDeg: number;
  warnings: string[];
}

/** What the volumes worker sends first, as soon as the scan is decoded (its voxels handed over). */
export type VisitScan = Pick<VisitVolumes, 'patientId' | 'visitId' | 'dims' | 'affine' | 'inverse' | 'spacingMm' | 'scan' | 'slope' | 'inter' | 'values' | 'warnings'>;

/** The worker's result, sent after the scan: what is drawn over it. */
export type VisitOverlays = Pick<VisitVolumes, 'segments' | 'segmentProblem' | 'lesions' | 'viable' | 'liverBoxMm' | 'proposal' | 'warnings'>;

/**
 * How the worker's two replies make what the viewer shows (the viewer's `JobParts`): another visit's
 * scan is shown as soon as it is decoded, its overlays following; a reload of the visit on screen
 * (after an edit) keeps the old images until the new ones are whole. Nothing is copied.
 */
export const VISIT_VOLUME_PARTS = {
  early(part: unknown, shown: VisitVolumes | null): VisitVolumes | null {
    const scan = part as VisitScan;
    if (shown && shown.patientId === scan.patientId && shown.visitId === scan.visitId) return null;
    return { ...scan, segments: null, segmentProblem: null, lesions: null, viable: null, liverBoxMm: null, proposal: null, overlaysPending: true };
  },
  whole(part: unknown, result: unknown): VisitVolumes {
    const scan = part as VisitScan, overlays = result as VisitOverlays;
    return { ...scan, ...overlays, warnings: [...scan.warnings, ...overlays.warnings], overlaysPending: false };
  },
};

export type VolumesRequest = { type: 'load'; patientId: string; visitId: string };
