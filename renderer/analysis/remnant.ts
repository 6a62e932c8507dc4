import type { ProposedResection } from '../../src/manifest/manifest';
import type { PatientRecord } from '../../src/model/records';
import { remnantForPatient, type PatientRemnant } from '../../src/remnant/for-patient';
import type { PatientAnalysis, VisitResult } from './types';

/**
 * The remnant a resection leaves on one analysed visit (null without a resection). Height and weight
 * come from the stored record, which may be newer than the analysed manifest; lesions are named by
 * the follow-up's tracks.
 */
export function visitRemnant(
  analysis: PatientAnalysis,
  visit: VisitResult,
  patient: PatientRecord,
  resection: ProposedResection | undefined,
): PatientRemnant | null {
  return remnantForPatient(
    analysis.manifest,
    { id: visit.id, date: visit.date, volumetry: visit.volumetry, lesions: visit.analysis.lesions },
    {
      ...(resection ? { resection } : {}),
      body: { heightCm: patient.heightCm ?? null, weightKg: patient.weightKg ?? null },
      tracks: analysis.followup.tracks,
    },
  );
}
