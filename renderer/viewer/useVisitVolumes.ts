import { useEffect, useState } from 'react';
import type { VisitVolumes, VolumesMessage } from './volume-messages';

export type VolumesState =
  | { status: 'loading'; done: number; total: number; step: string }
  | { status: 'ready' }
  | { status: 'failed'; message: string };

/**
 * Decodes a visit's volumes in a worker. The decoded arrays arrive by transfer and are held once per
 * load, never copied into React state piece by piece; bump `revision` after an edit that changes the
 * segment map. The previous visit's volumes stay on screen until the new ones are ready.
 */
export function useVisitVolumes(patientId: string, visitId: string, revision: number): { state: VolumesState; volumes: VisitVolumes | null } {
  const [state, setState] = useState<VolumesState>({ status: 'loading', done: 0, total: 1, step: 'starting' });
  const [volumes, setVolumes] = useState<VisitVolumes | null>(null);
  useEffect(() => {
    const worker = new Worker(new URL('../workers/volumes.worker.ts', import.meta.url), { type: 'module' });
    worker.onmessage = (e: MessageEvent<VolumesMessage>) => {
      const m = e.data;
      if (m.type === 'progress') setState({ status: 'loading', done: m.done, total: m.total, step: m.step });
      else if (m.type === 'result') {
        setVolumes(m.volumes);
        setState({ status: 'ready' });
        worker.terminate();
      } else setState({ status: 'failed', message: m.message });
    };
    worker.onerror = (e) => setState({ status: 'failed', message: e.message || 'reading the images stopped unexpectedly' });
    worker.postMessage({ type: 'load', patientId, visitId });
    return () => worker.terminate();
  }, [patientId, visitId, revision]);
  return { state, volumes };
}
