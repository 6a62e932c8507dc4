import { CAUTION } from '../caution.js';
import { CASE_FORM_COLUMNS, type CaseFormRow } from '../report/case-form.js';
import { toCsv, utf8 } from '../report/csv.js';
import { caseFormDictionary, DICTIONARY_COLUMNS } from './dictionary.js';
import type { PatientResult } from './result.js';
import { VERSION } from '../version.js';
import { addPatientSdtm, emptySdtm, SDTM_DATASETS, SDTM_LABELS, SDTM_NUMERIC } from './sdtm.js';
import { xportFile } from './xport.js';

/**
 * The cohort tables from every patient's stored result: the case form, its data dictionary, the
 * status table and the SDTM tables. Patients come in the order of their manifest paths, so the
 * tables do not depend on how the batch was split or in which order workers finished.
 */
export interface CohortEntry {
  /** Manifest path relative to the cohort folder, "/" separators. */
  manifest: string;
  /** The stored result, or null when there is none. */
  result: PatientResult | null;
  /** Hash of the inputs as they are now; a result made from other inputs is stale. */
  currentSha256: string;
}

export const STATUS_COLUMNS = ['manifest', 'patient', 'status', 'reason', 'visits', 'case_form_rows', 'inputs_sha256'] as const;
export type StatusRow = Record<(typeof STATUS_COLUMNS)[number], string>;

/**
 * done: computed by the run that last saw it; unchanged: found finished with the same inputs and not
 * recomputed; failed: bad input or an error, with the reason; not-run: no result for these inputs yet
 * (its shard has not run, or its inputs changed since).
 */
export type PatientStatus = 'done' | 'unchanged' | 'failed' | 'not-run';

export interface CohortFile {
  /** Relative to the batch's output folder. */
  name: string;
  bytes: Uint8Array;
}

/** `made` stamps the XPORT files' headers; every other file depends on the results alone. */
export function mergeCohort(entries: readonly CohortEntry[], studyId: string, made: Date): { files: CohortFile[]; status: StatusRow[] } {
  const sorted = [...entries].sort((a, b) => (a.manifest < b.manifest ? -1 : a.manifest > b.manifest ? 1 : 0));
  const status: StatusRow[] = [];
  const caseForm: CaseFormRow[] = [];
  const sdtm = emptySdtm();
  const idOwner = new Map<string, string>();
  for (const e of sorted) {
    const r = e.result && e.result.inputsSha256 === e.currentSha256 ? e.result : null;
    const row = (s: PatientStatus, reason: string, rows = 0): StatusRow => ({
      manifest: e.manifest, patient: r?.patient ?? '', status: s, reason, visits: r && s !== 'failed' ? String(r.responses.length) : '',
      case_form_rows: s === 'done' || s === 'unchanged' ? String(rows) : '', inputs_sha256: e.currentSha256,
    });
    if (!r) {
      status.push(row('not-run', e.result ? 'its inputs changed after its result was made' : 'no result yet (its share of the batch has not run)'));
      continue;
    }
    if (r.status === 'failed') {
      status.push(row('failed', r.reason));
      continue;
    }
    // Two manifests for one patient would mix two series under one subject id: keep the first.
    const owner = r.patient === null ? undefined : idOwner.get(r.patient);
    if (owner !== undefined) {
      status.push(row('failed', `patient id ${r.patient} is also given by ${owner}; left out of the cohort tables`));
      continue;
    }
    if (r.patient !== null) idOwner.set(r.patient, e.manifest);
    caseForm.push(...r.caseForm);
    addPatientSdtm(sdtm, studyId, r);
    status.push(row(r.lastRun === 'unchanged' ? 'unchanged' : 'done', '', r.caseForm.length));
  }
  const csv = (name: string, text: string): CohortFile => ({ name, bytes: utf8(text) });
  const files: CohortFile[] = [
    csv('case-form.csv', toCsv(CASE_FORM_COLUMNS, caseForm)),
    csv('case-form-dictionary.csv', toCsv(DICTIONARY_COLUMNS, caseFormDictionary())),
    csv('status.csv', toCsv(STATUS_COLUMNS, status)),
  ];
  for (const d of SDTM_DATASETS) {
    const rows: readonly Record<string, string>[] = sdtm[d.key];
    files.push(csv(`sdtm/${d.key}.csv`, toCsv<string>(d.columns, rows)));
    const variables = d.columns.map((c) => ({ name: c, label: SDTM_LABELS[c] ?? '', type: SDTM_NUMERIC.has(c) ? ('num' as const) : ('char' as const) }));
    files.push({ name: `sdtm/${d.key}.xpt`, bytes: xportFile({ name: d.name, label: d.label, variables, rows }, made, { version: VERSION, os: 'FALCIFRM' }) });
  }
  files.push(csv('README.txt', readme(studyId, status)));
  return { files, status };
}

function readme(studyId: string, status: readonly StatusRow[]): string {
  const count = (s: PatientStatus) => status.filter((r) => r.status === s).length;
  return [
    `Falciform cohort tables, study ${studyId}: ${status.length} patient(s), ${count('done')} done, ${count('unchanged')} unchanged,`,
    `${count('failed')} failed, ${count('not-run')} not run (status.csv says which and why).`,
    '',
    'case-form.csv             one row per lesion per visit, as falciform report writes it per patient',
    'case-form-dictionary.csv  what each case-form column holds',
    'status.csv                one row per patient: done, unchanged, failed (with the reason) or not-run',
    'sdtm/tu, tr, rs, supptu   the same data in the CDISC SDTM tumour domains (SDTMIG v3.4, from memory),',
    '                          each as CSV and as SAS XPORT version 5 (.xpt)',
    '',
    CAUTION,
    '',
  ].join('\r\n');
}
