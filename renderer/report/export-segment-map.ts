import { runJob } from '../workers/job-client';

export type ExportRequest = { type: 'segment-map'; patientId: string; visitId: string };

/**
 * One visit's segment map as .nii.gz bytes, made in a worker from the stored files (the map is
 * imported or built exactly as the analysis does it). A worker per export, ended when it answers.
 */
export function exportSegmentMap(patientId: string, visitId: string): Promise<Uint8Array> {
  const request: ExportRequest = { type: 'segment-map', patientId, visitId };
  return runJob<Uint8Array>(new Worker(new URL('../workers/export.worker.ts', import.meta.url), { type: 'module' }), request, {
    crashed: 'the export stopped unexpectedly',
  });
}
