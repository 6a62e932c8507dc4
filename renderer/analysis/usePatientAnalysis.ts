import { useJob, type JobState } from '../workers/job-client';
import { keepAnalysisOf, keptAnalysis } from './analysis-cache';
import type { AnalysisRequest, PatientAnalysis } from './types';

/**
 * Runs the patient's analysis in a worker and follows its progress; a patient analysed earlier in
 * this session, with nothing it reads written since, is shown from memory at once. Bump `revision`
 * after an edit (a mark, a landmark, a link) to run it again; the previous result stays on screen
 * meanwhile.
 */
export function usePatientAnalysis(patientId: string, revision = 0): { state: JobState; last: PatientAnalysis | null } {
  const request: AnalysisRequest = { type: 'analyse', patientId };
  return useJob<PatientAnalysis>(
    () => new Worker(new URL('../workers/analysis.worker.ts', import.meta.url), { type: 'module' }),
    request,
    'the analysis stopped unexpectedly',
    [patientId, revision],
    // A rerun asked for after an edit never takes the kept result, even before the edit's write is reported.
    { kept: () => (revision === 0 ? keptAnalysis(patientId) : null), keep: () => keepAnalysisOf(patientId) },
  );
}
