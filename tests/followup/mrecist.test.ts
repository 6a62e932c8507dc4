import { describe, expect, it } from 'vitest';
import { mrecistTargetCategory, selectViableTargets, viableFromComponents } from '../../src/followup/mrecist.js';
import { runFollowup, showsViable, type FollowupLesion, type FollowupVisit } from '../../src/followup/followup.js';

// mRECIST for HCC: Lencioni and Llovet, Semin Liver Dis 2010;30:52-60 (recalled from memory): the
// RECIST response categories measured on the longest diameter of viable tumour, i.e. tumour that
// enhances in the arterial phase. CR: disappearance of intratumoral arterial enhancement in all
// targets; PR: at least 30% decrease in the sum of viable diameters from baseline; PD: at least 20%
// increase over the smallest viable sum since treatment started, with no absolute floor (a protocol
// may add RECIST 1.1's 5 mm floor as a named departure).

function lesion(id: string, centre: [number, number, number], longestAxialMm: number, viableAxialMm: number | null): FollowupLesion {
  return { id, centroidMm: centre, segment: 'VI', longestAxialMm, volumeMl: null, marginAlert: false, viableAxialMm };
}

function visit(id: string, date: string, lesions: FollowupLesion[], extra: Partial<FollowupVisit> = {}): FollowupVisit {
  return { id, date, lesions, sliceThicknessMm: 2.5, ...extra };
}

describe('mRECIST target categories', () => {
  it('uses the 30% and 20% thresholds on viable sums, with no 5 mm floor unless the protocol adds one', () => {
    // Baseline viable 30 + 20 = 50 mm; 35 mm: −30% → PR.
    expect(mrecistTargetCategory({ sumMm: 35, baselineMm: 50, nadirMm: 50, complete: true })).toBe('PR');
    // Viable nadir 20 mm; 24 mm: +20% (+4 mm) → PD as published; SD with a 5 mm floor as a protocol option.
    expect(mrecistTargetCategory({ sumMm: 24, baselineMm: 30, nadirMm: 20, complete: true })).toBe('PD');
    expect(mrecistTargetCategory({ sumMm: 24, baselineMm: 30, nadirMm: 20, complete: true }, 5)).toBe('SD');
    expect(mrecistTargetCategory({ sumMm: 23.9, baselineMm: 30, nadirMm: 20, complete: true })).toBe('SD');
    // Nadir 25; 30: +20% and +5 mm → PD.
    expect(mrecistTargetCategory({ sumMm: 30, baselineMm: 30, nadirMm: 25, complete: true })).toBe('PD');
    // No viable tumour in any target → CR.
    expect(mrecistTargetCategory({ sumMm: 0, baselineMm: 30, nadirMm: 30, complete: true })).toBe('CR');
  });

  it('chooses measurable lesions that enhance, largest viable diameter first', () => {
    // Source: mRECIST target lesions must be RECIST-measurable and show intratumoral arterial enhancement.
    expect(
      selectViableTargets([
        { id: 'A', longestMm: 50, measurable: true, viableMm: 0 },
        { id: 'B', longestMm: 25, measurable: true, viableMm: 18 },
        { id: 'C', longestMm: 30, measurable: true, viableMm: 22 },
        { id: 'D', longestMm: 8, measurable: false, viableMm: 8 },
      ]),
    ).toEqual(['C', 'B']);
  });

  it('a tiny viable focus does not qualify a lesion as a target, however large the lesion', () => {
    // Source: mRECIST target lesions "can be accurately measured in at least one dimension as 1 cm or
    // more" and show intratumoral arterial enhancement (Lencioni and Llovet 2010, from memory); the
    // measure is the viable diameter, so a 60 mm lesion with a 6 mm enhancing focus is no target.
    expect(
      selectViableTargets([
        { id: 'T1', longestMm: 60, measurable: true, viableMm: 6 },
        { id: 'T2', longestMm: 45, measurable: true, viableMm: 9.9 },
        { id: 'T3', longestMm: 14, measurable: true, viableMm: 10 },
      ]),
    ).toEqual(['T3']);
    // Through the follow-up: the 60 mm lesion is left out, the 14 mm one with 10 mm viable is the target.
    const r = runFollowup(
      [
        visit('v1', '2026-01-10', [lesion('M1', [-60, 10, 0], 60, 6), lesion('M2', [40, 0, 0], 14, 10)]),
        visit('v2', '2026-03-10', [lesion('M1', [-60, 10, 0], 60, 6), lesion('M2', [40, 0, 0], 14, 10)]),
      ],
      { marginMm: 10, criteria: 'mRECIST' },
    );
    const target = r.tracks.filter((t) => t.target).map((t) => t.lesions.v1);
    expect(target).toEqual(['M2']);
    expect(r.visits[0].response.baselineSumMm).toBe(10);
  });

  it('gives viable-mask regions to the lesion that holds them, longest region per lesion', () => {
    const { viable, unassigned } = viableFromComponents(
      [
        { id: 'L1', centroidMm: [0, 0, 0], longestAxialMm: 40 },
        { id: 'L2', centroidMm: [100, 0, 0], longestAxialMm: 20 },
      ],
      [
        { centroidMm: [10, 0, 0], viableAxialMm: 12 },
        { centroidMm: [-8, 5, 0], viableAxialMm: 15 },
        { centroidMm: [200, 0, 0], viableAxialMm: 9 },
      ],
    );
    expect(viable.get('L1')).toBe(15);
    expect(viable.get('L2')).toBe(0);
    expect(unassigned).toBe(1);
  });
});

describe('mRECIST through the follow-up', () => {
  it('shows response to embolisation that RECIST 1.1 calls stable', () => {
    // A 40 mm HCC with 32 mm viable tumour; after embolisation the lesion still measures 38 mm
    // (RECIST: (38 − 40) / 40 = −5% → SD) but viable tumour is 12 mm ((12 − 32) / 32 = −62.5% → PR).
    // Next visit no enhancement remains: mRECIST CR while RECIST is still SD.
    const visits = [
      visit('v1', '2026-01-10', [lesion('M1', [-60, 10, 0], 40, 32)]),
      visit('v2', '2026-03-10', [lesion('M1', [-60, 10, 1], 38, 12)]),
      // The reader reports no disease outside the liver: without that, CR of the liver is PR (table 1).
      visit('v3', '2026-05-10', [lesion('M1', [-61, 10, 0], 37, 0)], { readerCalls: { outsideLiver: 'none' } }),
    ];
    const r = runFollowup(visits, { marginMm: 10, criteria: 'mRECIST' });
    expect(r.criteria).toBe('mRECIST');
    expect(r.visits[1].response).toMatchObject({ criteria: 'mRECIST', targetSumMm: 12, baselineSumMm: 32, changeFromBaselinePct: -62.5, category: 'PR' });
    expect(r.visits[2].response).toMatchObject({ targetSumMm: 0, category: 'CR' });
    const recist = r.visits.map((v) => v.otherResponses.find((x) => x.criteria === 'RECIST 1.1')!);
    expect(recist[1]).toMatchObject({ targetSumMm: 38, changeFromBaselinePct: -5, category: 'SD' });
    expect(recist[2].category).toBe('SD');
    expect(r.tracks[0].viableAxialMm).toEqual({ v1: 32, v2: 12, v3: 0 });
    // Per visit, per lesion, for the tables that list lesions.
    expect(r.visits.map((v) => v.viableAxialMm)).toEqual([{ M1: 32 }, { M1: 12 }, { M1: 0 }]);
    expect(showsViable(r)).toBe(true);
  });

  it('is not evaluable where a later visit gives no viable diameter', () => {
    const visits = [
      visit('v1', '2026-01-10', [lesion('M1', [0, 0, 0], 30, 25)]),
      visit('v2', '2026-03-10', [lesion('M1', [0, 0, 0], 30, null)]),
    ];
    const r = runFollowup(visits, { marginMm: 10, criteria: 'mRECIST' });
    expect(r.visits[1].response.category).toBe('NE');
    expect(r.visits[1].otherResponses[0]).toMatchObject({ criteria: 'RECIST 1.1', category: 'SD' });
  });

  it('falls back to RECIST 1.1, with a warning, when the baseline gives no viable tumour', () => {
    const visits = [visit('v1', '2026-01-10', [lesion('M1', [0, 0, 0], 30, null)]), visit('v2', '2026-02-10', [lesion('M1', [0, 0, 0], 30, null)])];
    const r = runFollowup(visits, { marginMm: 10, criteria: 'mRECIST' });
    expect(r.criteria).toBe('RECIST 1.1');
    expect(r.warnings.join(' ')).toMatch(/mRECIST/);
    // No viable measure anywhere and RECIST 1.1 in force: no viable column anywhere.
    expect(showsViable(r)).toBe(false);
    expect(r.visits.every((v) => v.viableAxialMm === undefined)).toBe(true);
    expect(r.visits[1].otherResponses).toHaveLength(0);
  });
});
