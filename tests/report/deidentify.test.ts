import { describe, expect, it } from 'vitest';
import { boardSheetHtml } from '../../src/report/board-html.js';
import { buildBoardSummary } from '../../src/report/board-summary.js';
import { caseFormCsv, caseFormRows } from '../../src/report/case-form.js';
import { dateShiftDays, deidentifyReport } from '../../src/report/deidentify.js';
import { keyedPseudonym } from '../../src/report/pseudonym.js';
import { segmentMapNifti } from '../../src/report/segment-map-export.js';
import { makeVolume } from '../../src/volume/volume.js';
import { syntheticPatient } from './fixtures.js';

// DICOM PS3.15 Annex E (basic de-identification profile) as the reference: ids, dates and paths
// must not survive into a pseudonymised board page or case form.
const days = (a: string, b: string) => (Date.parse(b) - Date.parse(a)) / 86_400_000;

describe('pseudonymised reports', () => {
  it('shift every date by one per-patient offset, keep intervals, and cut paths to the study', async () => {
    const plain = syntheticPatient({ visits: 3, lesions: 4, id: 'HOSP-123456' });
    const study = '/home/clinic/studies/HOSP-123456';
    const extra = [`${study}/v1/lesions.nii.gz: holds no lesion voxels`, '/mnt/other/HOSP-123456/scan.nii.gz: odd header'];
    const input = { ...plain, visits: plain.visits.map((v, k) => (k === 0 ? { ...v, warnings: [...v.warnings, ...extra] } : v)) };
    const p = await keyedPseudonym('HOSP-123456', 'k');
    const shiftDays = await dateShiftDays(p.id);
    expect(await dateShiftDays(p.id)).toBe(shiftDays);
    expect(shiftDays).not.toBe(0);
    const { input: out, note } = deidentifyReport(input, { patientId: 'HOSP-123456', pseudonymId: p.id, studyFolder: study, shiftDays });
    const before = input.visits.map((v) => v.date);
    const after = out.visits.map((v) => v.date);
    expect(after.map((d, k) => days(before[k], d))).toEqual(before.map(() => shiftDays));
    expect(days(after[0], after[2])).toBe(days(before[0], before[2]));
    expect(out.visits[0].warnings.slice(-2)).toEqual([`v1/lesions.nii.gz: holds no lesion voxels`, `scan.nii.gz: odd header`]);
    expect(note).toMatch(/days between visits and from baseline are kept/);

    const summary = buildBoardSummary(out, { madeAt: new Date(Date.UTC(2026, 11, 2)), pseudonym: p });
    const page = boardSheetHtml(summary);
    const csv = caseFormCsv(caseFormRows(out, p.id));
    for (const text of [page, csv]) {
      expect(text).not.toContain('HOSP-123456');
      expect(text).not.toContain('/home/clinic');
      for (const d of before) expect(text).not.toContain(d);
    }
  });

  it('keeps the demo marker, and a demo patient\'s exported segment map says so in its header', () => {
    const input = syntheticPatient({ visits: 2, lesions: 2, id: 'DEMO-0009' });
    input.manifest.patient.demo = true;
    const { input: out } = deidentifyReport(input, { patientId: 'DEMO-0009', pseudonymId: 'PS-1', studyFolder: '/x', shiftDays: 10 });
    expect(out.manifest.patient.demo).toBe(true);
    const labels = makeVolume([2, 1, 1], Uint8Array.from([1, 2]), [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1], 'uint8');
    const nifti = segmentMapNifti({ labels, scheme: new Map([[1, 'I'], [2, 'II']]) }, 'v1', true);
    // NIfTI-1 descrip: 80 bytes at offset 148 (nifti1.h).
    const descrip = new TextDecoder().decode(nifti.subarray(148, 228));
    expect(descrip).toMatch(/segment map v1 DEMO/);
  });
});
