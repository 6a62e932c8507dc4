import { CASE_FORM_COLUMNS, type CaseFormColumn } from '../report/case-form.js';

/**
 * The cohort case form's data dictionary as a table (variable, type, unit, meaning), written beside
 * the CSV so the file a data manager receives explains itself. docs/case-form.md says the same at
 * length; keep the two together.
 */
type Entry = [type: 'text' | 'number' | 'integer' | 'date' | 'yes/no', unit: string, meaning: string];

const ENTRIES: Record<CaseFormColumn, Entry> = {
  patient: ['text', '', 'Patient id from the manifest, or the pseudonym of a pseudonymised export'],
  visit: ['text', '', 'Visit id from the manifest'],
  date: ['date', '', 'Visit date, ISO 8601 (YYYY-MM-DD)'],
  days_from_baseline: ['integer', 'days', 'Whole days from the first (baseline) visit; 0 at baseline'],
  track: ['text', '', 'Lesion track id (A, B, ... Z, AA, AB, ... in order of first appearance): the same lesion followed over visits; not a target number, see target'],
  lesion: ['text', '', "The lesion's id at this visit; empty on a row for an absent track"],
  status: ['text', '', 'present, or for an absent track gone, merged or not-evaluable'],
  source: ['text', '', 'mask (measured from a lesion mask) or mark (a manual mark)'],
  segment: ['text', '', "Couinaud segment holding the lesion's centroid (I-VIII, IVa/IVb), or outside"],
  segment_fractions: ['text', '', "Share of the lesion's voxels per segment, segment:share pairs joined by ;"],
  longest_axial_mm: ['number', 'mm', 'Longest axial diameter (RECIST longest diameter); 0 for a gone or merged track; empty when not evaluable'],
  short_axis_mm: ['number', 'mm', 'Extent perpendicular to the longest diameter in the same slice'],
  volume_ml: ['number', 'mL', 'Lesion volume (voxel count x voxel volume); empty for a mark'],
  margin_mm: ['number', 'mm', "Shortest distance from the lesion's edge to the border surface of another segment (face to face); 0 when touching or spanning; empty beyond three times the set margin"],
  nearest_other_segment: ['text', '', 'The segment margin_mm is measured to'],
  margin_alert: ['yes/no', '', 'yes when margin_mm is at or within the set margin'],
  set_margin_mm: ['number', 'mm', "The patient's set margin (default 10)"],
  target: ['yes/no', '', "yes when the lesion's track is a target lesion under criteria"],
  new_lesion: ['yes/no', '', 'yes at the visit where a track first appears after baseline'],
  response: ['text', '', 'Overall response at the visit: CR, PR, SD, PD, NE or non-CR/non-PD; empty at baseline'],
  criteria: ['text', '', 'RECIST 1.1 or mRECIST'],
  target_sum_mm: ['number', 'mm', "Sum of the target lesions' recorded diameters at the visit"],
  change_from_baseline_pct: ['number', '%', 'Change of the target sum from baseline; empty at baseline'],
  change_from_nadir_pct: ['number', '%', 'Change of the target sum from its smallest value so far; empty at baseline'],
  software: ['text', '', 'Falciform and its version'],
  caution: ['text', '', 'The clinical caution, on every row'],
  row_type: ['text', '', "visit for the visit's summary row, lesion for a lesion row"],
  evaluation: ['text', '', 'Lesion row: measured, absent (recorded as 0 mm) or NE; summary row: NE when a target was not evaluable, else measured'],
  response_basis: ['text', '', 'computed wherever response holds a category: worked out from the diameters, to be confirmed by a qualified reader'],
  modality: ['text', '', 'CT or MR, from the manifest visit; empty when not given'],
  contrast_phase: ['text', '', 'Contrast phase as the manifest visit names it; empty when not given'],
  slice_thickness_mm: ['number', 'mm', "The scan's voxel spacing along the axial normal"],
  reader: ['text', '', 'Who read the visit (manifest reader, else the reader name set in the app)'],
  reading_date: ['date', '', 'Date the visit was read, from the manifest; empty when not given'],
  viable_axial_mm: ['number', 'mm', 'Longest diameter of the viable (enhancing) tumour, not crossing necrosis (mRECIST); empty when not given'],
  new_lesion_call: ['text', '', 'For a lesion first seen after baseline: unequivocal (PD) or equivocal (followed), by the reader or the size rule'],
  non_target_call: ['text', '', "The reader's call on the non-targets: present, absent or unequivocal-progression"],
  outside_liver: ['text', '', "The reader's assessment outside the liver: none, not-assessed, stable or progression"],
  best_response: ['text', '', "On the latest visit's rows: best overall response with its confirmation and the date of progression"],
  progression_date: ['date', '', 'Date of progression; empty while there is none'],
  dates_shifted: ['yes/no', '', 'yes in a pseudonymised export: every date is moved by one per-patient offset (days between visits kept), not the real date'],
};

export const DICTIONARY_COLUMNS = ['variable', 'type', 'unit', 'meaning'] as const;

export function caseFormDictionary(): Record<(typeof DICTIONARY_COLUMNS)[number], string>[] {
  return CASE_FORM_COLUMNS.map((c) => {
    const [type, unit, meaning] = ENTRIES[c];
    return { variable: c, type, unit, meaning };
  });
}
