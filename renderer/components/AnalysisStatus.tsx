import type { JobState } from '../workers/job-client';

/** The analysis progress or failure, in one line above the patient's screens. */
export function AnalysisStatus({ state }: { state: JobState }) {
  if (state.status === 'ready') return null;
  if (state.status === 'failed') {
    return (
      <p className="notice error" role="alert" data-testid="analysis-error">
        The analysis stopped: {state.message}
      </p>
    );
  }
  return (
    <div className="analysis-progress" role="status" data-testid="analysis-progress">
      <progress max={state.total} value={state.done} />
      <span>Analysing {state.step}… ({state.done} of {state.total})</span>
    </div>
  );
}
