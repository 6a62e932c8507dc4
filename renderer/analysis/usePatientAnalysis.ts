import { useJob, type JobState } from '../workers/job-client';
import type { AnalysisRequest, PatientAnalysis } from './types';

/**
 * Runs the patient's analysis in a worker and follows its progress. Bump `revision` after an edit
 * (a mark, a landmark, a link) to run it again; the previous result stays on screen meanwhile.
 */
export function usePatientAnalysis(patientId: string, revision = 0): { state: JobState; last: PatientAnalysis | null } {
  const request: AnalysisRequest = { type: 'analyse', patientId };
  return useJob<PatientAnalysis>(
    () => new Worker(new URL('../workers/analysis.worker.ts', import.meta.url), { type: 'module' }),
    request,
    'the analysis stopped unexpectedly',
    [patientId, revision],
  );
}
