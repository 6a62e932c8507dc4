import type { FollowupResult } from '../../src/followup/followup.js';
import type { Manifest } from '../../src/manifest/manifest.js';
import type { VisitVolumetry } from '../../src/remnant/volumetry.js';
import type { VisitAnalysis } from '../../src/visit/analyze.js';

/** One visit's analysis as the app shows it. */
export interface VisitResult {
  id: string;
  date: string;
  analysis: VisitAnalysis;
  /** Liver, tumour and tumour-free volume per segment (tumour estimated when the visit has only marks). */
  volumetry: VisitVolumetry;
  /** Reading and analysis warnings, each naming its file. */
  warnings: string[];
  /** The scan's voxel spacing along the axial normal, mm. */
  sliceThicknessMm?: number;
}

/** Everything the patient screens show: each visit's analysis and the follow-up across visits. */
export interface PatientAnalysis {
  manifest: Manifest;
  visits: VisitResult[];
  followup: FollowupResult;
  /** Stored visits without a segment map yet, left out of `manifest` and the analysis. */
  waitingVisits: { id: string; date: string }[];
}

/** Why a stored visit is left out of the analysis. */
export const WAITING_FOR_MAP = 'no segment map yet (no map imported, no landmark set placed); left out of the analysis until it has one';

export type AnalysisRequest = { type: 'analyse'; patientId: string };
