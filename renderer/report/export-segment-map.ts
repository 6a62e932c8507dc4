import type { ExportMessage, ExportRequest } from './export-messages';

/**
 * One visit's segment map as .nii.gz bytes, made in a worker from the stored files (the map is
 * imported or built exactly as the analysis does it). A worker per export, ended when it answers.
 */
export function exportSegmentMap(patientId: string, visitId: string): Promise<Uint8Array> {
  return new Promise((resolve, reject) => {
    const worker = new Worker(new URL('../workers/export.worker.ts', import.meta.url), { type: 'module' });
    const done = () => worker.terminate();
    worker.onmessage = (e: MessageEvent<ExportMessage>) => {
      done();
      if (e.data.type === 'segment-map') resolve(e.data.bytes);
      else reject(new Error(e.data.message));
    };
    worker.onerror = (e) => {
      done();
      reject(new Error(e.message || 'the export stopped unexpectedly'));
    };
    const request: ExportRequest = { type: 'segment-map', patientId, visitId };
    worker.postMessage(request);
  });
}
