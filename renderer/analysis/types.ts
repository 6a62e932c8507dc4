import type { FollowupResult } from '../../src/followup/followup';
import type { Manifest } from '../../src/manifest/manifest';
import type { VisitVolumetry } from '../../src/remnant/volumetry';
import type { KeyImage } from '../../src/report/key-image';
import type { VisitAnalysis } from '../../src/visit/analyze';

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
  /** Each lesion's key image by lesion id, for the board page. */
  keyImages?: Record<string, KeyImage>;
}

/** Everything the patient screens show: each visit's analysis and the follow-up across visits. */
export interface PatientAnalysis {
  manifest: Manifest;
  visits: VisitResult[];
  followup: FollowupResult;
}

export type AnalysisRequest = { type: 'analyse'; patientId: string };
