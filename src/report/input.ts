import type { FollowupResult, TrackSummary } from '../followup/followup.js';
import type { Manifest } from '../manifest/manifest.js';
import type { PatientRemnant } from '../remnant/for-patient.js';
import type { VisitAnalysis } from '../visit/analyze.js';
import type { KeyImage } from './key-image.js';

/**
 * What every output is made from: the manifest, each visit's analysis and the follow-up. The command
 * line's loaded patient and the app's patient analysis both fit this shape, so the board summary and
 * the case form come out the same from either.
 */
export interface ReportVisit {
  id: string;
  date: string;
  analysis: VisitAnalysis;
  warnings: readonly string[];
  /** The scan's voxel spacing along the axial normal, mm (the slice thickness the case form records). */
  sliceThicknessMm?: number;
  /** Key images by lesion id, where the visit was loaded with them (the board page shows some). */
  keyImages?: Readonly<Record<string, KeyImage>>;
}

/** A loaded visit (command line or app) as the outputs see it. */
export function reportVisit(v: {
  manifest: { id: string; date: string };
  analysis: VisitAnalysis;
  warnings: readonly string[];
  followup: { sliceThicknessMm?: number };
  keyImages?: Readonly<Record<string, KeyImage>>;
}): ReportVisit {
  return {
    id: v.manifest.id, date: v.manifest.date, analysis: v.analysis, warnings: v.warnings, sliceThicknessMm: v.followup.sliceThicknessMm,
    ...(v.keyImages ? { keyImages: v.keyImages } : {}),
  };
}

export interface ReportInput {
  manifest: Manifest;
  visits: readonly ReportVisit[];
  followup: FollowupResult;
  /** The proposed resection planned on one visit (usually the latest), for the remnant line. */
  remnant?: PatientRemnant | null;
}

/** The lesion ids a track holds at a visit: several for a split lesion, none when absent. */
export function lesionsOfTrack(t: TrackSummary, visit: string): string[] {
  const frags = t.fragments?.[visit];
  if (frags) return frags;
  const one = t.lesions[visit];
  return one === undefined ? [] : [one];
}

/** Whole days from one ISO date to another. */
export function daysBetween(from: string, to: string): number {
  return Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000);
}
