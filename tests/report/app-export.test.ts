import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { boardSheetHtml } from '../../src/report/board-html.js';
import { caseFormCsv } from '../../src/report/case-form.js';
import { dateShiftDays, prepareReportExport } from '../../src/report/deidentify.js';
import { keyedPseudonym, randomPseudonym } from '../../src/report/pseudonym.js';
import { syntheticPatient } from './fixtures.js';

// The app's exports (Board summary tab): prepared with no study folder, as the app has none.
// DICOM PS3.15 Annex E (basic profile) as the reference: no id, no exact date, no path may survive.
const ID = 'HOSP-778899';
/** An absolute path of two or more parts, POSIX or Windows, not inside a URL ("http://…"). */
const ABSOLUTE_PATH = /(?:^|[\s"'(=,;])(?:[A-Za-z]:)?[/\\](?:[^\s/\\"'<>]+[/\\])+[^\s/\\"'<>]+/;

function inputWithPaths() {
  const plain = syntheticPatient({ visits: 3, lesions: 3, id: ID });
  const extra = [
    `/home/clinic/import/${ID}/v1/lesions.nii.gz: holds no lesion voxels`,
    `C:\\Users\\reader\\${ID}\\scan.nii.gz: odd header`,
  ];
  return { ...plain, visits: plain.visits.map((v, k) => (k === 0 ? { ...v, warnings: [...v.warnings, ...extra] } : v)) };
}

describe('pseudonymised exports of the app', () => {
  for (const keyed of [true, false]) {
    it(`board page and case form carry no input path, no exact date and no id (${keyed ? 'keyed' : 'random'} pseudonym)`, async () => {
      const input = inputWithPaths();
      const realDates = input.visits.map((v) => v.date);
      const pseudonym = keyed ? await keyedPseudonym(ID, 'clinic key') : randomPseudonym();
      const shiftDays = await dateShiftDays(pseudonym.id);
      const out = prepareReportExport(input, { pseudonym, shiftDays, studyFolder: '', madeAt: new Date(Date.UTC(2026, 11, 2)) });
      const page = boardSheetHtml(out.summary);
      const csv = caseFormCsv(out.caseForm);
      // The warnings are still there, as bare file names.
      expect(out.input.visits[0].warnings.slice(-2)).toEqual(['lesions.nii.gz: holds no lesion voxels', 'scan.nii.gz: odd header']);
      for (const text of [page, csv]) {
        expect(text).not.toContain(ID);
        expect(text).not.toMatch(ABSOLUTE_PATH);
        for (const d of realDates) expect(text).not.toContain(d);
        expect(text).toContain(pseudonym.id);
      }
      // The page says what it keeps and what it shifted.
      expect(out.note).toMatch(new RegExp(`Dates are shifted ${Math.abs(shiftDays)} days (later|earlier)`));
      expect(out.note).toMatch(/file paths are cut to file names\.$/);
      expect(out.summary.patient.pseudonymNote).toContain(out.note);
      expect(page).toContain(`Dates are shifted ${Math.abs(shiftDays)} days`);
      expect(out.caseForm.every((r) => r.dates_shifted === 'yes')).toBe(true);
    });
  }

  it('the check above does see a path and a date in an export under the real id', () => {
    const input = inputWithPaths();
    const out = prepareReportExport(input, { pseudonym: null, shiftDays: 0, studyFolder: '', madeAt: new Date(Date.UTC(2026, 11, 2)) });
    const csv = caseFormCsv(out.caseForm);
    expect(csv).toContain(input.visits[1].date);
    expect(boardSheetHtml(out.summary)).toMatch(ABSOLUTE_PATH);
    expect(out.note).toBeNull();
    expect(out.caseForm.every((r) => r.dates_shifted === 'no')).toBe(true);
  });

  it('pandas reads the shifted case form with no extra options, dates_shifted yes on every row, intervals kept', async () => {
    const input = inputWithPaths();
    const pseudonym = await keyedPseudonym(ID, 'k');
    const out = prepareReportExport(input, { pseudonym, shiftDays: await dateShiftDays(pseudonym.id), studyFolder: '', madeAt: new Date() });
    // pandas (outside the project) as the reader a data manager would use.
    const script = [
      'import sys, io, json, pandas as pd',
      'df = pd.read_csv(io.StringIO(sys.stdin.read()), dtype=str, keep_default_na=False)',
      'v = df[df.row_type == "visit"]',
      'd = pd.to_datetime(v.date)',
      'print(json.dumps({"rows": len(df), "shifted": sorted(set(df.dates_shifted)), "days": [int(x) for x in (d - d.iloc[0]).dt.days], "fromBaseline": [int(x) for x in v.days_from_baseline]}))',
    ].join('\n');
    const got = JSON.parse(execFileSync('/usr/bin/python3', ['-c', script], { input: caseFormCsv(out.caseForm) }).toString()) as {
      rows: number; shifted: string[]; days: number[]; fromBaseline: number[];
    };
    expect(got.rows).toBe(out.caseForm.length);
    expect(got.shifted).toEqual(['yes']);
    const realDays = input.visits.map((v) => (Date.parse(v.date) - Date.parse(input.visits[0].date)) / 86_400_000);
    expect(got.days).toEqual(realDays);
    expect(got.fromBaseline).toEqual(realDays);
  });
});
