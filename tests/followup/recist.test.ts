import { describe, expect, it } from 'vitest';
import {
  isMeasurable,
  measurableMinMm,
  nonTargetCategory,
  overallResponse,
  percentChange,
  recordedTargetMm,
  selectTargets,
  targetCategory,
  targetSum,
} from '../../src/followup/recist.js';
import { trackId } from '../../src/followup/ids.js';
import { responseSeries } from '../../src/followup/response.js';
import type { TargetObservation } from '../../src/followup/recist.js';

// Worked scenarios for RECIST 1.1: Eisenhauer et al., Eur J Cancer 2009;45:228-247. Section numbers
// and the tables' rows are quoted from memory.

const measured = (longestMm: number): TargetObservation => ({ kind: 'measured', longestMm });
const vanished: TargetObservation = { kind: 'vanished' };
const notEvaluable: TargetObservation = { kind: 'not-evaluable' };

/** Runs a series of target diameters (one row per visit) with no non-targets and no new lesions. */
function series(rows: TargetObservation[][], newLesion: boolean[] = rows.map(() => false)) {
  return responseSeries({
    criteria: 'RECIST 1.1',
    targets: rows[0].map((_, n) => trackId(n)),
    observations: rows,
    nonTarget: rows.map(() => 'none'),
    newLesion,
  });
}

describe('measurability and target selection', () => {
  it('needs 10 mm on slices up to 5 mm, twice the slice thickness above', () => {
    // Source: RECIST 1.1 section 3.1.1: measurable ≥10 mm by CT (slice thickness no greater than
    // 5 mm); with thicker slices the minimum is twice the slice thickness.
    expect(measurableMinMm(5)).toBe(10);
    expect(isMeasurable(10, 5)).toBe(true);
    expect(isMeasurable(9.9, 5)).toBe(false);
    // 7 mm slices: 2 × 7 = 14 mm.
    expect(measurableMinMm(7)).toBe(14);
    expect(isMeasurable(14, 7)).toBe(true);
    expect(isMeasurable(13.9, 7)).toBe(false);
    // 5.5 mm slices: 2 × 5.5 = 11 mm.
    expect(isMeasurable(10.5, 5.5)).toBe(false);
  });

  it('takes measurable lesions, largest first, at most two in the liver', () => {
    // Source: RECIST 1.1 section 3.3.1: at most 5 targets, at most 2 per organ, chosen by size.
    const picked = selectTargets([
      { id: 'A', longestMm: 12, measurable: true },
      { id: 'B', longestMm: 31, measurable: true },
      { id: 'C', longestMm: 8, measurable: false },
      { id: 'D', longestMm: 24, measurable: true },
    ]);
    expect(picked).toEqual(['B', 'D']);
    expect(selectTargets([{ id: 'A', longestMm: 9, measurable: false }])).toEqual([]);
    // A tie goes to the earlier track so the choice is reproducible.
    expect(selectTargets([{ id: 'A', longestMm: 20, measurable: true }, { id: 'B', longestMm: 20, measurable: true }, { id: 'C', longestMm: 20, measurable: true }])).toEqual(['A', 'B']);
  });
});

describe('recorded diameters and sums', () => {
  it('records a measurement as measured (also under 5 mm), 5 mm only for "too small to measure", 0 mm when gone', () => {
    // Source: RECIST 1.1 section 4.3.2, target lesions that become too small to measure (from
    // memory): an actual measurement is recorded even when under 5 mm; the 5 mm default is for a
    // lesion the reader believes present but too small to measure; a disappeared lesion is 0 mm.
    expect(recordedTargetMm(measured(3.2))).toBe(3.2);
    expect(recordedTargetMm(measured(4.99))).toBe(5);
    expect(recordedTargetMm(measured(4.94))).toBe(4.9);
    expect(recordedTargetMm({ kind: 'too-small' })).toBe(5);
    expect(recordedTargetMm(measured(5))).toBe(5);
    expect(recordedTargetMm(measured(17.26))).toBe(17.3);
    expect(recordedTargetMm(vanished)).toBe(0);
    expect(recordedTargetMm(notEvaluable)).toBeNull();
    expect(targetSum([12.1, 5, 0])).toEqual({ sumMm: 17.1, complete: true });
    expect(targetSum([12.1, null])).toEqual({ sumMm: 12.1, complete: false });
  });

  it('shows percent changes truncated towards zero', () => {
    // (35.99 − 51.4) / 51.4 = −29.98% would round to −30.0% yet is not a 30% decrease.
    expect(percentChange(35.99, 51.4)).toBe(-29.9);
    expect(percentChange(35, 50)).toBe(-30);
    expect(percentChange(25.7, 39.2)).toBe(-34.4);
    expect(percentChange(10, 0)).toBeNull();
  });
});

describe('target response at the threshold edges', () => {
  it('PR at exactly −30% from baseline, SD just short of it', () => {
    // Source: RECIST 1.1 section 4.3.1: PR is at least a 30% decrease in the sum of diameters,
    // taking the baseline sum as reference.
    // Baseline 30 + 20 = 50 mm; follow-up 21 + 14 = 35 mm: (35 − 50) / 50 = −30.0% → PR.
    const r = series([[measured(30), measured(20)], [measured(21), measured(14)]]);
    expect(r[1].targetSumMm).toBe(35);
    expect(r[1].changeFromBaselinePct).toBe(-30);
    expect(r[1].targetCategory).toBe('PR');
    // Follow-up 21 + 14.1 = 35.1 mm: −29.8% → SD.
    const s = series([[measured(30), measured(20)], [measured(21), measured(14.1)]]);
    expect(s[1].changeFromBaselinePct).toBe(-29.8);
    expect(s[1].targetCategory).toBe('SD');
  });

  it('+20% over the nadir but under 5 mm is not PD; +20% and +5 mm is', () => {
    // Source: RECIST 1.1 section 4.3.1: PD is at least a 20% increase over the smallest sum on
    // study and, in addition, an absolute increase of at least 5 mm.
    // Nadir = baseline = 12 + 8 = 20 mm; 14.4 + 9.6 = 24 mm: +20%, +4 mm → SD.
    const a = series([[measured(12), measured(8)], [measured(14.4), measured(9.6)]]);
    expect(a[1].changeFromNadirPct).toBe(20);
    expect(a[1].targetCategory).toBe('SD');
    // Nadir 25 mm (15 + 10); 18 + 12 = 30 mm: exactly +20% and exactly +5 mm → PD.
    const b = series([[measured(15), measured(10)], [measured(18), measured(12)]]);
    expect(b[1].changeFromNadirPct).toBe(20);
    expect(b[1].targetCategory).toBe('PD');
    // Nadir 50 mm; 59.9 mm: +19.8%, +9.9 mm → SD (the relative rule fails).
    const c = series([[measured(30), measured(20)], [measured(35.9), measured(24)]]);
    expect(c[1].targetCategory).toBe('SD');
  });

  it('measures progression from a nadir below baseline', () => {
    // Source: RECIST 1.1 section 4.3.1: the reference for PD is the smallest sum on study, which
    // includes the baseline only when that is the smallest.
    // Baseline 60; v2 40 (−33.3% → PR, new nadir 40); v3 48: −20% from baseline (no longer PR)
    // but +20% and +8 mm over the nadir 40 → PD.
    const r = series([[measured(40), measured(20)], [measured(25), measured(15)], [measured(30), measured(18)]]);
    expect(r[1].targetCategory).toBe('PR');
    expect(r[2].nadirSumMm).toBe(40);
    expect(r[2].changeFromBaselinePct).toBe(-20);
    expect(r[2].changeFromNadirPct).toBe(20);
    expect(r[2].targetCategory).toBe('PD');
    // The nadir reported at v2 is the smallest sum before v2: the baseline (contract example).
    expect(r[1].nadirSumMm).toBe(60);
  });

  it('CR when every target has gone; a faint remnant is not CR', () => {
    // Source: RECIST 1.1 section 4.3.1: CR is the disappearance of all target lesions.
    const r = series([[measured(22), measured(11)], [vanished, vanished]]);
    expect(r[1].targetSumMm).toBe(0);
    expect(r[1].changeFromBaselinePct).toBe(-100);
    expect(r[1].targetCategory).toBe('CR');
    // 22 + 11 = 33 → 0 + 2 (measured) = 2: −93.9% → PR, not CR.
    const s = series([[measured(22), measured(11)], [vanished, measured(2)]]);
    expect(s[1].targetSumMm).toBe(2);
    expect(s[1].changeFromBaselinePct).toBe(-93.9);
    expect(s[1].targetCategory).toBe('PR');
    // Marked present but too small to measure: 0 + 5 = 5: −84.8% → PR.
    const t = series([[measured(22), measured(11)], [vanished, { kind: 'too-small' }]]);
    expect(t[1].targetSumMm).toBe(5);
    expect(t[1].changeFromBaselinePct).toBe(-84.8);
  });

  it('a target reappearing after CR is PD once it is 5 mm over the nadir of 0', () => {
    // Source: RECIST 1.1 section 4.3.1 (PD: +20% and +5 mm over the nadir). Nadir 0 after CR; a
    // reappearance marked too small to measure is 5 mm: +5 mm and ≥ 20% of 0 → PD.
    const r = series([[measured(20)], [vanished], [{ kind: 'too-small' }]]);
    expect(r[1].targetCategory).toBe('CR');
    expect(r[2].nadirSumMm).toBe(0);
    expect(r[2].changeFromNadirPct).toBeNull();
    expect(r[2].targetCategory).toBe('PD');
    // Measured at 3 mm it is +3 mm only: not PD by the targets (PR against the 20 mm baseline).
    const s = series([[measured(20)], [vanished], [measured(3)]]);
    expect(s[2].targetSumMm).toBe(3);
    expect(s[2].targetCategory).toBe('PR');
  });

  it('NE when a target cannot be assessed, unless the others already prove PD', () => {
    // Source: RECIST 1.1 section 4.4.2 (missing assessments): NE unless the missing lesion could
    // not change the result, as when the measured ones already show PD.
    const r = series([[measured(20), measured(20)], [measured(12), notEvaluable]]);
    expect(r[1].targetSumComplete).toBe(false);
    expect(r[1].targetCategory).toBe('NE');
    // Nadir 40; the one measured target alone is 50 mm: +25%, +10 mm → PD regardless.
    const s = series([[measured(20), measured(20)], [measured(50), notEvaluable]]);
    expect(s[1].targetCategory).toBe('PD');
    // An incomplete visit does not set the nadir.
    const t = series([[measured(20), measured(20)], [measured(5), notEvaluable], [measured(20), measured(16)]]);
    expect(t[2].nadirSumMm).toBe(40);
  });

  it('targetCategory works on numbers alone', () => {
    expect(targetCategory({ sumMm: 35, baselineMm: 50, nadirMm: 50, complete: true })).toBe('PR');
    expect(targetCategory({ sumMm: 0, baselineMm: 50, nadirMm: 50, complete: true })).toBe('CR');
    expect(targetCategory({ sumMm: 30, baselineMm: 30, nadirMm: 25, complete: true })).toBe('PD');
  });
});

describe('non-target and overall response', () => {
  it('non-target CR when all have gone, non-CR/non-PD while any persists, PD only by a reader', () => {
    // Source: RECIST 1.1 sections 4.3.3 and 4.3.4: non-target PD is unequivocal progression, a
    // reader's judgement; it is never inferred here from measurements.
    const liverOnly = { outsideLiver: 'none' } as const;
    expect(nonTargetCategory({ total: 3, present: 0, notEvaluable: 0, ...liverOnly })).toBe('CR');
    expect(nonTargetCategory({ total: 3, present: 1, notEvaluable: 0, ...liverOnly })).toBe('non-CR/non-PD');
    expect(nonTargetCategory({ total: 3, present: 3, notEvaluable: 0, readerProgression: true, ...liverOnly })).toBe('PD');
    expect(nonTargetCategory({ total: 3, present: 0, notEvaluable: 1, ...liverOnly })).toBe('NE');
    expect(nonTargetCategory({ total: 0, present: 0, notEvaluable: 0, ...liverOnly })).toBe('none');
  });

  it("takes the reader's non-target call and the disease outside the liver into the non-target category", () => {
    // Source: RECIST 1.1 sections 4.3.3–4.3.4 and tables 1–2 (from memory): non-target CR needs every
    // non-target lesion gone, in every organ; an organ not assessed makes the non-target response
    // "not evaluated" (NE); unequivocal progression anywhere is PD.
    const gone = { total: 2, present: 0, notEvaluable: 0 };
    // The reader's call replaces what the liver masks show.
    expect(nonTargetCategory({ ...gone, call: 'present', outsideLiver: 'none' })).toBe('non-CR/non-PD');
    expect(nonTargetCategory({ total: 2, present: 2, notEvaluable: 0, call: 'absent', outsideLiver: 'none' })).toBe('CR');
    expect(nonTargetCategory({ ...gone, call: 'unequivocal-progression', outsideLiver: 'none' })).toBe('PD');
    // Outside the liver: not assessed (the default) never allows CR; stable disease there is non-CR/non-PD.
    expect(nonTargetCategory(gone)).toBe('NE');
    expect(nonTargetCategory({ ...gone, outsideLiver: 'not-assessed' })).toBe('NE');
    expect(nonTargetCategory({ ...gone, outsideLiver: 'stable' })).toBe('non-CR/non-PD');
    expect(nonTargetCategory({ ...gone, outsideLiver: 'progression' })).toBe('PD');
    expect(nonTargetCategory({ total: 0, present: 0, notEvaluable: 0, outsideLiver: 'stable' })).toBe('non-CR/non-PD');
    // Table 1: all targets gone with non-targets not all evaluated is PR, not CR.
    expect(overallResponse('CR', nonTargetCategory(gone), false)).toBe('PR');
    expect(overallResponse('CR', nonTargetCategory({ ...gone, outsideLiver: 'none' }), false)).toBe('CR');
    // Table 2: no targets, liver non-targets persisting, nothing outside → non-CR/non-PD.
    expect(overallResponse('none', nonTargetCategory({ total: 1, present: 1, notEvaluable: 0, outsideLiver: 'none' }), false)).toBe('non-CR/non-PD');
  });

  it('follows the time-point table for targets, non-targets and new lesions', () => {
    // Source: RECIST 1.1 section 4.4.1, table 1 (targets ± non-targets) and table 2 (non-targets only).
    expect(overallResponse('CR', 'CR', false)).toBe('CR');
    expect(overallResponse('CR', 'none', false)).toBe('CR');
    expect(overallResponse('CR', 'non-CR/non-PD', false)).toBe('PR');
    expect(overallResponse('CR', 'NE', false)).toBe('PR');
    expect(overallResponse('PR', 'non-CR/non-PD', false)).toBe('PR');
    expect(overallResponse('PR', 'NE', false)).toBe('PR');
    expect(overallResponse('SD', 'non-CR/non-PD', false)).toBe('SD');
    expect(overallResponse('NE', 'non-CR/non-PD', false)).toBe('NE');
    expect(overallResponse('PD', 'CR', false)).toBe('PD');
    expect(overallResponse('SD', 'PD', false)).toBe('PD');
    expect(overallResponse('CR', 'CR', true)).toBe('PD');
    expect(overallResponse('none', 'CR', false)).toBe('CR');
    expect(overallResponse('none', 'non-CR/non-PD', false)).toBe('non-CR/non-PD');
    expect(overallResponse('none', 'NE', false)).toBe('NE');
    expect(overallResponse('none', 'non-CR/non-PD', true)).toBe('PD');
  });

  it('a new lesion makes the visit PD even while the targets respond', () => {
    // Source: RECIST 1.1 section 4.3.5 and table 1: the appearance of a new lesion is PD.
    // Baseline 50 → 30 (−40%, PR by targets) with a new lesion → overall PD.
    const r = series([[measured(30), measured(20)], [measured(18), measured(12)]], [false, true]);
    expect(r[1].targetCategory).toBe('PR');
    expect(r[1].newLesion).toBe(true);
    expect(r[1].category).toBe('PD');
  });

  it('gives the baseline its sums and no category', () => {
    const r = series([[measured(21.5), measured(17.7)], [measured(15.2), measured(10.5)]]);
    // Contract example: 21.5 + 17.7 = 39.2; 15.2 + 10.5 = 25.7; (25.7 − 39.2) / 39.2 = −34.4% → PR.
    expect(r[0]).toMatchObject({ targetSumMm: 39.2, baselineSumMm: 39.2, nadirSumMm: 39.2, category: null });
    expect(r[1]).toMatchObject({ targetSumMm: 25.7, baselineSumMm: 39.2, nadirSumMm: 39.2, changeFromBaselinePct: -34.4, changeFromNadirPct: -34.4, category: 'PR' });
  });
});
