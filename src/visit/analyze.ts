import { badInput } from '../errors.js';
import type { Vec3 } from '../geometry/mat4.js';
import { lesionsFromMask, type LesionVoxels } from '../lesions/components.js';
import { checkLiverVolume, checkOverlap, checkSpacing, gridOf } from '../segments/import-checks.js';
import type { Lesion } from '../lesions/lesion.js';
import { isMarginAlert, markMargin, maskLesionMargin, type MarginResult } from '../lesions/margin.js';
import { lesionFromMark, type Mark } from '../lesions/marks.js';
import { maskLesionMeanValue, measureMaskLesion } from '../lesions/measures.js';
import { placeMaskLesion, placePoint, type SegmentFractions } from '../lesions/placement.js';
import { BACKGROUND, segmentIndexOf } from '../lesions/segment-lookup.js';
import type { SegmentMap, SegmentName } from '../segments/segment-map.js';
import { segmentVolumes } from '../segments/volumes.js';
import type { Volume, VolumeGrid } from '../volume/volume.js';

/** The set margin when none is given: 10 mm, a common surgical rule of thumb (brief). */
export const DEFAULT_MARGIN_MM = 10;

/** Margins are exact up to this many times the set margin (contracts, analyze output). */
export const MARGIN_SEARCH_FACTOR = 3;

export interface VisitInput {
  scan: Volume;
  segments: SegmentMap;
  lesionMask?: Volume;
  marks?: Mark[];
  /** The set margin in mm (default 10). */
  marginMm?: number;
  /** File names for messages. */
  lesionFile?: string;
  scanFile?: string;
  segmentsFile?: string;
  /** Lesions per visit above which the mask is refused (default DEFAULT_MAX_LESIONS). */
  maxLesions?: number;
}

/** One lesion of a visit: the contract's fields first, then extras. */
export interface LesionResult {
  id: string;
  centroidMm: Vec3;
  segment: SegmentName | null;
  segmentFractions: SegmentFractions;
  volumeMl: number | null;
  longestAxialMm: number;
  shortAxisMm: number;
  marginMm: number | null;
  nearestOtherSegment: SegmentName | null;
  marginAlert: boolean;
  source: 'mask' | 'mark';
  max3dMm: number | null;
  meanValue: number | null;
  longestAxialEndpointsMm: [Vec3, Vec3] | null;
  voxelCount: number;
  /** Why the segment is a fallback or missing; null when the centroid fell on a segment. */
  segmentWarning: string | null;
  /** From a mark that gives it (mRECIST). */
  viableAxialMm?: number;
}

export interface VisitAnalysis {
  segments: { segment: SegmentName; volumeMl: number }[];
  liverVolumeMl: number;
  lesions: LesionResult[];
  warnings: string[];
}

/** A visit analysed from its label volumes, its mask lesions' mean scan values still to come. */
export interface LabelAnalysis {
  analysis: VisitAnalysis;
  /** The lesion mask's grid (not its voxels, which the caller may then let go). */
  maskGrid?: VolumeGrid;
  /** The mask's lesions, in the order of the first entries of analysis.lesions. */
  maskLesions: LesionVoxels[];
}

/**
 * One visit: segment volumes, and for each lesion (from the mask, then from the marks) its measures,
 * segment, margin to the nearest other segment and margin alert. Volumes of a visit may lie on
 * different grids; everything meets in world mm.
 */
export function analyzeVisit(input: VisitInput): VisitAnalysis {
  return addMeanValues(analyzeVisitLabels(input), input.scan);
}

/**
 * Everything of analyzeVisit that needs only the scan's grid; addMeanValues then reads the scan's
 * voxels once. The command line runs this while the scan is still inflating.
 */
export function analyzeVisitLabels(input: Omit<VisitInput, 'scan'> & { scan: VolumeGrid }): LabelAnalysis {
  const setMarginMm = input.marginMm ?? DEFAULT_MARGIN_MM;
  if (!Number.isFinite(setMarginMm) || setMarginMm < 0) throw badInput('margin', `the set margin must be a length in mm ≥ 0, got ${setMarginMm}`);
  // Margins stay exact past the alert threshold so a reader sees how far a lesion is; a floor keeps
  // that true for a margin of 0 too.
  const capMm = MARGIN_SEARCH_FACTOR * Math.max(setMarginMm, DEFAULT_MARGIN_MM);
  const map = input.segments;
  const warnings: string[] = [];
  const lesions: LesionResult[] = [];
  // The import checks the app's import makes, so the command line accepts no less sound input.
  const scanName = input.scanFile ?? 'scan';
  const mapName = input.segmentsFile ?? 'segment map';
  warnings.push(...checkSpacing(input.scan, scanName), ...checkSpacing(map.labels, mapName));
  checkOverlap(gridOf(map.labels, mapName), gridOf(input.scan, scanName));
  if (input.lesionMask) {
    const maskName = input.lesionFile ?? 'lesion mask';
    warnings.push(...checkSpacing(input.lesionMask, maskName));
    checkOverlap(gridOf(input.lesionMask, maskName), gridOf(input.scan, scanName));
  }

  let maskLesions: LesionVoxels[] = [];
  if (input.lesionMask) {
    const mask = input.lesionMask;
    const found = lesionsFromMask(mask, input.lesionFile, input.maxLesions);
    maskLesions = found.lesions;
    if (found.kind === 'empty') warnings.push(`${input.lesionFile ?? 'lesion mask'}: holds no lesion voxels`);
    found.lesions.forEach((lv, n) => {
      const id = `L${n + 1}`;
      const lesion = measureMaskLesion(id, mask, lv, null);
      const placed = placeMaskLesion(id, mask, lv.voxels, lesion.centroidMm, map);
      const own = placed.segment ? segmentIndexOf(placed.segment) : BACKGROUND;
      // A lesion with voxels in another segment spans the border: margin 0 by definition.
      const margin: MarginResult = placed.segment && placed.otherSegments.length > 0
        ? { marginMm: 0, nearestOtherSegment: placed.otherSegments[0] }
        : maskLesionMargin(mask, lv, map, own, capMm);
      if (placed.warning) warnings.push(placed.warning);
      lesions.push(result(lesion, placed.segment, placed.fractions, margin, setMarginMm, placed.warning));
    });
  }
  const maskIds = new Set(lesions.map((l) => l.id));
  for (const mark of input.marks ?? []) {
    if (maskIds.has(mark.id)) throw badInput('marks', `mark "${mark.id}" has the id of a lesion from the lesion mask; give marks other ids`);
    const lesion = lesionFromMark(mark);
    const placed = placePoint(mark.id, mark.centreMm, map);
    const own = placed.segment ? segmentIndexOf(placed.segment) : BACKGROUND;
    const margin = markMargin(map, mark.centreMm, mark.longestAxialMm, own, capMm);
    if (placed.warning) warnings.push(placed.warning);
    const r = result(lesion, placed.segment, placed.fractions, margin, setMarginMm, placed.warning);
    if (mark.viableAxialMm !== undefined) r.viableAxialMm = mark.viableAxialMm;
    lesions.push(r);
  }
  const segments = segmentVolumes(map);
  // Every labelled voxel belongs to exactly one segment, so the liver is their sum; this spares a
  // second pass over the whole map.
  const liverMl = segments.reduce((sum, s) => sum + s.volumeMl, 0);
  warnings.push(...checkLiverVolume(liverMl, mapName));
  const mask = input.lesionMask;
  const maskGrid = mask && { dims: mask.dims, affine: mask.affine, spacingMm: mask.spacingMm };
  return { analysis: { segments, liverVolumeMl: liverMl, lesions, warnings }, maskGrid, maskLesions };
}

/** The mask lesions' mean scan values (measureMaskLesion's), filled into the label analysis. */
export function addMeanValues(labels: LabelAnalysis, scan: Volume): VisitAnalysis {
  const { analysis, maskGrid, maskLesions } = labels;
  if (maskGrid) maskLesions.forEach((lv, n) => { analysis.lesions[n].meanValue = maskLesionMeanValue(maskGrid, lv, scan); });
  return analysis;
}

function result(
  lesion: Lesion,
  segment: SegmentName | null,
  fractions: SegmentFractions,
  margin: MarginResult,
  setMarginMm: number,
  segmentWarning: string | null,
): LesionResult {
  return {
    id: lesion.id,
    centroidMm: lesion.centroidMm,
    segment,
    segmentFractions: fractions,
    volumeMl: lesion.volumeMl,
    longestAxialMm: lesion.longestAxialMm,
    shortAxisMm: lesion.shortAxisMm,
    marginMm: margin.marginMm,
    nearestOtherSegment: margin.nearestOtherSegment,
    marginAlert: isMarginAlert(margin.marginMm, setMarginMm),
    source: lesion.source,
    max3dMm: lesion.max3dMm,
    meanValue: lesion.meanValue,
    longestAxialEndpointsMm: lesion.longestAxialEndpointsMm,
    voxelCount: lesion.voxelCount,
    segmentWarning,
  };
}
