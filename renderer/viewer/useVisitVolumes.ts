import { useJob, type JobParts, type JobState } from '../workers/job-client';
import type { VisitOverlays, VisitScan, VisitVolumes, VolumesRequest } from './volume-messages';

/**
 * Another visit's scan is shown as soon as it is decoded, its overlays following; a reload of the
 * visit on screen (after an edit) keeps the old images until the new ones are whole.
 */
export const VISIT_VOLUME_PARTS: JobParts<VisitVolumes> = {
  early(part, shown) {
    const scan = part as VisitScan;
    if (shown && shown.patientId === scan.patientId && shown.visitId === scan.visitId) return null;
    return { ...scan, segments: null, segmentProblem: null, lesions: null, liverBoxMm: null, overlaysPending: true };
  },
  whole(part, result) {
    const scan = part as VisitScan, overlays = result as VisitOverlays;
    return { ...scan, ...overlays, warnings: [...scan.warnings, ...overlays.warnings], overlaysPending: false };
  },
};

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
