import { CAUTION } from '../caution.js';
import type { FollowupResult, TrackSummary } from '../followup/followup.js';
import { bestResponseText } from '../followup/best-response.js';
import { isMarginAlert } from '../lesions/margin.js';
import { roundTo } from '../rounding.js';
import { SEGMENT_NAMES } from '../segments/segment-map.js';
import type { LesionResult } from '../visit/analyze.js';
import { VERSION } from '../version.js';
import { toCsv } from './csv.js';
import { daysBetween, lesionsOfTrack, type ReportInput } from './input.js';

/**
 * The case-form export: one row per lesion per visit, plus one row per lesion track that is absent at
 * a visit (gone, merged or not evaluable), so a vanished target is a row and not a silence. Numbers
 * are rounded as `falciform analyze --json` rounds them; a missing value is an empty field. The
 * columns are described in docs/case-form.md; keep the two together.
 */
export const CASE_FORM_COLUMNS = [
  'patient', 'visit', 'date', 'days_from_baseline', 'track', 'lesion', 'status', 'source', 'segment',
  'segment_fractions', 'longest_axial_mm', 'short_axis_mm', 'volume_ml', 'margin_mm', 'nearest_other_segment',
  'margin_alert', 'set_margin_mm', 'target', 'new_lesion', 'response', 'criteria', 'target_sum_mm',
  'change_from_baseline_pct', 'change_from_nadir_pct', 'software', 'caution',
  'row_type', 'evaluation', 'response_basis', 'modality', 'contrast_phase', 'slice_thickness_mm', 'reader', 'reading_date',
  'viable_axial_mm', 'new_lesion_call', 'non_target_call', 'outside_liver', 'best_response', 'progression_date',
  'dates_shifted',
] as const;

/** On every row beside `response`: the category is worked out from the measurements, not read. */
export const RESPONSE_BASIS = 'computed';

export interface CaseFormOptions {
  /** The reader's name for visits whose manifest names none (the app's reader name). */
  reader?: string;
  /** The dates are a pseudonymised export's shifted ones (the `dates_shifted` column says so on every row). */
  datesShifted?: boolean;
}

export type CaseFormColumn = (typeof CASE_FORM_COLUMNS)[number];
export type CaseFormRow = Record<CaseFormColumn, string>;

/** Shortest decimal of x rounded to `digits` places: 24.67, 14, 0.4 (as the JSON outputs give them). */
export function decimal(x: number | null | undefined, digits: number): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '';
  return String(roundTo(x, digits));
}

const yesNo = (b: boolean) => (b ? 'yes' : 'no');

/** "V:0.47;VIII:0.53", segments in anatomical order. */
export function fractionsText(fractions: LesionResult['segmentFractions']): string {
  const f = fractions as Partial<Record<string, number>>;
  return SEGMENT_NAMES.filter((s) => (f[s] ?? 0) > 0).map((s) => `${s}:${decimal(f[s], 4)}`).join(';');
}

/** Every lesion column empty, for a visit's summary row. */
const NO_LESION = {
  track: '', lesion: '', status: '', source: '', segment: '', segment_fractions: '', longest_axial_mm: '', short_axis_mm: '',
  volume_ml: '', margin_mm: '', nearest_other_segment: '', target: '', viable_axial_mm: '', new_lesion_call: '',
} as const;

/**
 * `patientLabel` is the id to write: the real one, or a pseudonym. Each visit starts with its summary
 * row (`row_type` visit), then its lesion rows.
 */
export function caseFormRows(input: ReportInput, patientLabel: string, opts: CaseFormOptions = {}): CaseFormRow[] {
  const manifestVisit = new Map(input.manifest.visits.map((v) => [v.id, v]));
  const f: FollowupResult = input.followup;
  const baseline = f.visits[0];
  const rows: CaseFormRow[] = [];
  const byVisit = new Map(input.visits.map((v) => [v.id, v]));
  f.visits.forEach((v, k) => {
    const lesions = byVisit.get(v.id)?.analysis.lesions ?? [];
    const trackOf = new Map<string, TrackSummary>();
    for (const t of f.tracks) for (const id of lesionsOfTrack(t, v.id)) trackOf.set(id, t);
    const r = v.response;
    const visitFields = {
      patient: patientLabel,
      visit: v.id,
      date: v.date,
      days_from_baseline: String(daysBetween(baseline.date, v.date)),
      set_margin_mm: decimal(f.marginMm, 2),
      response: k === 0 ? '' : (v.overall ?? ''),
      criteria: f.criteria,
      // A sum with a target not evaluable is no sum (RECIST 1.1 section 4.4.2): NE, never a smaller number.
      target_sum_mm: r.targetSumComplete ? decimal(r.targetSumMm, 2) : 'NE',
      change_from_baseline_pct: k === 0 ? '' : decimal(r.changeFromBaselinePct, 1),
      change_from_nadir_pct: k === 0 ? '' : decimal(r.changeFromNadirPct, 1),
      software: `Falciform ${VERSION}`,
      caution: CAUTION,
      response_basis: k === 0 ? '' : RESPONSE_BASIS,
      ...readingFields(manifestVisit.get(v.id), byVisit.get(v.id)?.sliceThicknessMm, opts),
      non_target_call: k === 0 ? '' : (v.readerCalls.nonTarget ?? ''),
      outside_liver: k === 0 ? '' : v.readerCalls.outsideLiver,
      best_response: k === f.visits.length - 1 ? bestResponseText(f.bestResponse) : '',
      progression_date: f.bestResponse.progression?.date ?? '',
      dates_shifted: yesNo(opts.datesShifted === true),
    };
    const newCall = (t: TrackSummary | undefined) => {
      if (!t || k === 0 || t.firstVisit === baseline.id) return '';
      if (v.unequivocalNewLesions.some((u) => u.track === t.id)) return 'unequivocal';
      return v.equivocalNewLesions.includes(t.id) ? 'equivocal' : '';
    };
    rows.push({
      ...visitFields,
      ...NO_LESION,
      row_type: 'visit',
      // NE when a target could not be evaluated at this visit: its sum covers the others only.
      evaluation: r.targetSumComplete ? 'measured' : 'NE',
      margin_alert: yesNo(v.marginAlerts.length > 0),
      new_lesion: yesNo(k > 0 && v.newLesions.length > 0),
    });
    for (const l of lesions) {
      const t = trackOf.get(l.id);
      rows.push({
        ...visitFields,
        track: t?.id ?? '',
        lesion: l.id,
        status: 'present',
        source: l.source,
        segment: l.segment ?? 'outside',
        segment_fractions: fractionsText(l.segmentFractions),
        longest_axial_mm: decimal(l.longestAxialMm, 2),
        short_axis_mm: decimal(l.shortAxisMm, 2),
        volume_ml: decimal(l.volumeMl, 3),
        margin_mm: decimal(l.marginMm, 2),
        nearest_other_segment: l.nearestOtherSegment ?? '',
        // Against the follow-up's set margin, as the follow-up's own alerts are.
        margin_alert: yesNo(isMarginAlert(l.marginMm, f.marginMm)),
        target: yesNo(t?.target ?? false),
        new_lesion: yesNo(t !== undefined && k > 0 && t.firstVisit === v.id),
        row_type: 'lesion',
        evaluation: 'measured',
        viable_axial_mm: decimal(t?.viableAxialMm?.[v.id], 1),
        new_lesion_call: newCall(t),
      });
    }
    for (const t of f.tracks) {
      const status = t.status[v.id];
      if (!status || status === 'present') continue;
      rows.push({
        ...visitFields,
        track: t.id,
        lesion: '',
        status,
        source: '',
        segment: '',
        segment_fractions: '',
        // Missing from the mask but not confirmed gone by a reader: not evaluable, not 0 mm.
        longest_axial_mm: status === 'not-evaluable' || v.unconfirmedGone.includes(t.id) ? 'NE' : '0',
        short_axis_mm: '',
        volume_ml: '',
        margin_mm: '',
        nearest_other_segment: '',
        margin_alert: 'no',
        target: yesNo(t.target),
        new_lesion: 'no',
        row_type: 'lesion',
        // RECIST 1.1 records a vanished lesion as 0 mm and one that cannot be assessed as NE.
        evaluation: status === 'not-evaluable' || v.unconfirmedGone.includes(t.id) ? 'NE' : 'absent',
        viable_axial_mm: '',
        new_lesion_call: '',
      });
    }
  });
  return rows;
}

/** The reading's own columns: from the manifest's visit, else the app's reader name; thickness from the scan. */
function readingFields(
  mv: ReportInput['manifest']['visits'][number] | undefined,
  sliceThicknessMm: number | undefined,
  opts: CaseFormOptions,
): Pick<CaseFormRow, 'modality' | 'contrast_phase' | 'slice_thickness_mm' | 'reader' | 'reading_date'> {
  return {
    modality: mv?.modality ?? '',
    contrast_phase: mv?.contrastPhase ?? '',
    slice_thickness_mm: decimal(sliceThicknessMm, 2),
    reader: mv?.reader ?? opts.reader ?? '',
    reading_date: mv?.readDate ?? '',
  };
}

export function caseFormCsv(rows: readonly CaseFormRow[]): string {
  return toCsv(CASE_FORM_COLUMNS, rows);
}
