import { buildBoardSummary, type BoardSummary } from './board-summary.js';
import { caseFormRows, type CaseFormOptions, type CaseFormRow } from './case-form.js';
import type { ReportInput } from './input.js';
import { scrubId, type Pseudonym } from './pseudonym.js';

/**
 * What a pseudonymised report keeps, after DICOM PS3.15 Annex E (basic profile) as the reference for
 * what identifies a patient: names and ids (replaced by the pseudonym), dates (shifted), free text
 * and file paths (paths cut to the file's name within the study folder). Lesion measures, segments,
 * responses, visit ids and the demo marker are kept.
 */
export interface Deidentified {
  input: ReportInput;
  /** The sentence the outputs carry about dates and paths. */
  note: string;
}

const DATE = /^(\d{4})-(\d{2})-(\d{2})$/;
const DAY_MS = 86_400_000;
/** Dates move by up to this many days either way. */
const MAX_SHIFT_DAYS = 365;

/**
 * A per-patient date shift in whole days, from the pseudonym's own digest: the same key and patient
 * give the same shift in every export, and days between visits are kept.
 */
export async function dateShiftDays(pseudonymId: string): Promise<number> {
  const digest = new Uint8Array(await crypto.subtle.digest('SHA-256', new TextEncoder().encode(`date shift:${pseudonymId}`)));
  const x = (digest[0] << 8) | digest[1];
  const days = (x % (2 * MAX_SHIFT_DAYS)) - MAX_SHIFT_DAYS;
  return days === 0 ? MAX_SHIFT_DAYS : days;
}

/**
 * The report input with every calendar date (a "YYYY-MM-DD" string anywhere in it) shifted by
 * `shiftDays`, every mention of the study folder cut so paths are relative to the study, and the
 * patient id replaced by the pseudonym in all free text.
 */
export function deidentifyReport(input: ReportInput, opts: { patientId: string; pseudonymId: string; studyFolder: string; shiftDays: number }): Deidentified {
  const folder = opts.studyFolder.replace(/[/\\]+$/, '');
  const text = (s: string): string => {
    const m = DATE.exec(s);
    if (m) return new Date(Date.UTC(+m[1], +m[2] - 1, +m[3]) + opts.shiftDays * DAY_MS).toISOString().slice(0, 10);
    let out = folder ? s.split(`${folder}/`).join('').split(`${folder}\\`).join('').split(folder).join('.') : s;
    // Whatever absolute path is left (outside the study folder) keeps only its file name.
    out = out.replace(/(?:[A-Za-z]:)?(?:[/\\][^\s/\\:"']+)+[/\\]([^\s/\\:"']+)/g, '$1');
    return scrubId(out, opts.patientId, opts.pseudonymId);
  };
  const walk = (x: unknown): unknown => {
    if (typeof x === 'string') return text(x);
    if (Array.isArray(x)) return x.map(walk);
    if (x !== null && typeof x === 'object' && Object.getPrototypeOf(x) === Object.prototype) {
      return Object.fromEntries(Object.entries(x).map(([k, v]) => [k, walk(v)]));
    }
    return x;
  };
  const shifted = walk(input) as ReportInput;
  // The patient's id in the manifest stays as the caller's key for the pseudonym; the summary shows the pseudonym.
  shifted.manifest = { ...shifted.manifest, patient: { ...shifted.manifest.patient, id: opts.patientId } };
  const dir = opts.shiftDays > 0 ? 'later' : 'earlier';
  return {
    input: shifted,
    note: `Dates are shifted ${Math.abs(opts.shiftDays)} days ${dir} by a per-patient offset derived from the pseudonym ` +
      '(days between visits and from baseline are kept; the real dates are not shown); ' +
      (folder ? 'file paths are cut to names within the study folder.' : 'file paths are cut to file names.'),
  };
}

/** A report ready to export: its input (de-identified when pseudonymised), its board summary and its case-form rows. */
export interface ReportExport {
  input: ReportInput;
  summary: BoardSummary;
  caseForm: CaseFormRow[];
  /** What a pseudonymised export keeps and shifted; null for an export under the real id. */
  note: string | null;
}

/**
 * The one way an export is prepared, by the command line and the app alike: with a pseudonym, dates
 * are shifted by `shiftDays` (the pseudonym's `dateShiftDays`), paths cut to names within `studyFolder` (or to bare file
 * names when it is empty), the id replaced everywhere, and the page and case form say so.
 */
export function prepareReportExport(
  whole: ReportInput,
  opts: { pseudonym: Pseudonym | null; shiftDays: number; studyFolder: string; madeAt: Date; caseForm?: CaseFormOptions },
): ReportExport {
  const { pseudonym } = opts;
  const patientId = whole.manifest.patient.id;
  const deidentified = pseudonym
    ? deidentifyReport(whole, { patientId, pseudonymId: pseudonym.id, studyFolder: opts.studyFolder, shiftDays: opts.shiftDays })
    : null;
  const input = deidentified?.input ?? whole;
  const built = buildBoardSummary(input, { madeAt: opts.madeAt, pseudonym });
  // The page states what a pseudonymised copy keeps: the dates are shifted, paths cut.
  const summary = deidentified && built.patient.pseudonymNote
    ? { ...built, patient: { ...built.patient, pseudonymNote: `${built.patient.pseudonymNote} ${deidentified.note}` } }
    : built;
  const caseForm = caseFormRows(input, pseudonym?.id ?? patientId, { ...opts.caseForm, datesShifted: deidentified !== null });
  return { input, summary, caseForm, note: deidentified?.note ?? null };
}
