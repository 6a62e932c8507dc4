import { useJob, type JobState } from '../workers/job-client';
import { VISIT_VOLUME_PARTS, type VisitVolumes, type VolumesRequest } from './volume-messages';

/**
 * Decodes a visit's volumes in a worker. The decoded arrays arrive by transfer and are held once per
 * load, never copied into React state piece by piece; bump `revision` after an edit that changes the
 * segment map. The previous visit's volumes stay on screen until the new scan is ready.
 */
export function useVisitVolumes(patientId: string, visitId: string, revision: number): { state: JobState; volumes: VisitVolumes | null } {
  const request: VolumesRequest = { type: 'load', patientId, visitId };
  const { state, last } = useJob<VisitVolumes>(
    () => new Worker(new URL('../workers/volumes.worker.ts', import.meta.url), { type: 'module' }),
    request,
    'reading the images stopped unexpectedly',
    [patientId, visitId, revision],
    undefined,
    VISIT_VOLUME_PARTS,
  );
  return { state, volumes: last };
}
