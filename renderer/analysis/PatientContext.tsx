import { createContext, useContext } from 'react';
import type { PatientRecord } from '../../src/model/records';
import type { JobState } from '../workers/job-client';
import type { PatientAnalysis } from './types';

/** What every patient screen shares: the stored patient, the latest analysis, and a way to rerun it. */
export interface PatientContextValue {
  patient: PatientRecord;
  state: JobState;
  /** The latest complete analysis (kept on screen while a rerun is under way). */
  analysis: PatientAnalysis | null;
  /** Call after an edit that changes the analysis (marks, landmarks, links, targets, margin). */
  reanalyse(): void;
  /** Call after an edit that changes only stored records shown on screen (treatments, notes). */
  reload(): void;
}

export const PatientContext = createContext<PatientContextValue | null>(null);

export function usePatient(): PatientContextValue {
  const value = useContext(PatientContext);
  if (!value) throw new Error('usePatient outside a patient screen');
  return value;
}
