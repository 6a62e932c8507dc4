import { useEffect, useState } from 'react';
import type { AnalysisMessage, PatientAnalysis } from './types';

export type AnalysisState =
  | { status: 'running'; done: number; total: number; step: string }
  | { status: 'ready'; result: PatientAnalysis }
  | { status: 'failed'; message: string };

/**
 * Runs the patient's analysis in a worker and follows its progress. Bump `revision` after an edit
 * (a mark, a landmark, a link) to run it again; the previous result stays on screen meanwhile.
 */
export function usePatientAnalysis(patientId: string, revision = 0): { state: AnalysisState; last: PatientAnalysis | null } {
  const [state, setState] = useState<AnalysisState>({ status: 'running', done: 0, total: 1, step: 'starting' });
  const [last, setLast] = useState<PatientAnalysis | null>(null);
  useEffect(() => {
    const worker = new Worker(new URL('../workers/analysis.worker.ts', import.meta.url), { type: 'module' });
    worker.onmessage = (e: MessageEvent<AnalysisMessage>) => {
      const m = e.data;
      if (m.type === 'progress') setState({ status: 'running', done: m.done, total: m.total, step: m.step });
      else if (m.type === 'result') {
        setState({ status: 'ready', result: m.result });
        setLast(m.result);
      } else setState({ status: 'failed', message: m.message });
    };
    worker.onerror = (e) => setState({ status: 'failed', message: e.message || 'the analysis stopped unexpectedly' });
    worker.postMessage({ type: 'analyse', patientId });
    return () => worker.terminate();
  }, [patientId, revision]);
  return { state, last };
}
