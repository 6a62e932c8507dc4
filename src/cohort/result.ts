import type { OverallCategory } from '../followup/recist.js';
import type { VisitResponse } from '../followup/response.js';
import { caseFormRows, CASE_FORM_COLUMNS, type CaseFormRow } from '../report/case-form.js';
import type { ReportInput } from '../report/input.js';

/**
 * One patient's outcome in a batch, kept as one JSON file per patient (written whole or not at all),
 * so a killed batch knows which patients are finished and the merge needs nothing else.
 */
export interface VisitResponseRecord extends Pick<VisitResponse, 'criteria' | 'newLesion' | 'targets'> {
  visit: string;
  date: string;
  /** null at baseline. */
  overall: OverallCategory | null;
  target: VisitResponse['targetCategory'];
  nonTarget: VisitResponse['nonTargetCategory'];
}

export interface PatientResult {
  format: typeof RESULT_FORMAT;
  /** The manifest's path relative to the cohort folder, "/" separators. */
  manifest: string;
  /** Hash of the software version, the manifest and every file it names (see the batch command). */
  inputsSha256: string;
  /** The patient id from the manifest; null when the manifest could not be read. */
  patient: string | null;
  status: 'done' | 'failed';
  /** Why it failed; empty when done. */
  reason: string;
  /** Whether the run that last saw this patient computed it or found its inputs unchanged. */
  lastRun: 'computed' | 'unchanged';
  caseForm: CaseFormRow[];
  responses: VisitResponseRecord[];
}

export const RESULT_FORMAT = 1;

/** The patient's case-form rows exactly as `falciform report` writes them, and its responses per visit. */
export function donePatientResult(manifest: string, inputsSha256: string, input: ReportInput): PatientResult {
  return {
    format: RESULT_FORMAT,
    manifest,
    inputsSha256,
    patient: input.manifest.patient.id,
    status: 'done',
    reason: '',
    lastRun: 'computed',
    caseForm: caseFormRows(input, input.manifest.patient.id),
    responses: input.followup.visits.map((v) => ({
      visit: v.id,
      date: v.date,
      criteria: v.response.criteria,
      overall: v.overall,
      target: v.response.targetCategory,
      nonTarget: v.response.nonTargetCategory,
      newLesion: v.response.newLesion,
      targets: v.response.targets,
    })),
  };
}

export function failedPatientResult(manifest: string, inputsSha256: string, patient: string | null, reason: string): PatientResult {
  return { format: RESULT_FORMAT, manifest, inputsSha256, patient, status: 'failed', reason, lastRun: 'computed', caseForm: [], responses: [] };
}

/**
 * A stored result, or null when the text is not one this version wrote (then the patient is simply
 * computed again): a result file is our own cache, not user input.
 */
export function parsePatientResult(text: string): PatientResult | null {
  let v: unknown;
  try {
    v = JSON.parse(text);
  } catch {
    return null;
  }
  if (typeof v !== 'object' || v === null) return null;
  const r = v as Partial<PatientResult>;
  const rowsOk = Array.isArray(r.caseForm) && r.caseForm.every((row) => CASE_FORM_COLUMNS.every((c) => typeof (row as Record<string, unknown>)[c] === 'string'));
  if (r.format !== RESULT_FORMAT || typeof r.manifest !== 'string' || typeof r.inputsSha256 !== 'string') return null;
  if ((r.status !== 'done' && r.status !== 'failed') || !rowsOk || !Array.isArray(r.responses)) return null;
  return r as PatientResult;
}

/** The result file's name in the batch's patients/ folder: the manifest path, percent-encoded. */
export function resultFileName(manifest: string): string {
  return `${encodeURIComponent(manifest)}.json`;
}
