import { describe, expect, it } from 'vitest';
import { bestOverallResponse, type TimePoint } from '../../src/followup/best-response.js';
import { runFollowup, type FollowupLesion, type FollowupVisit } from '../../src/followup/followup.js';
import { DEFAULT_PROTOCOL, protocolDepartures } from '../../src/followup/protocol.js';
import { targetSumText } from '../../src/followup/response.js';

// RECIST 1.1: Eisenhauer et al., Eur J Cancer 2009;45:228-247. Section and table numbers, and the
// rules' wording, are recalled from memory unless quoted.

function lesion(id: string, centre: [number, number, number], longestAxialMm: number): FollowupLesion {
  return { id, centroidMm: centre, segment: 'V', longestAxialMm, volumeMl: null, marginAlert: false };
}
function visit(id: string, date: string, lesions: FollowupLesion[], extra: Partial<FollowupVisit> = {}): FollowupVisit {
  return { id, date, lesions, sliceThicknessMm: 2.5, readerCalls: { outsideLiver: 'none' }, ...extra };
}

describe('a target that coalesces with a non-target (RECIST 1.1 section 4.3.2, lesions that coalesce)', () => {
  // The coalesced lesion's longest diameter is recorded for the target, whichever track keeps the
  // lesion. Baseline: L1 40 mm (target), a 15 mm target and an 8 mm non-target (not measurable) 18 mm
  // apart; at v2 the two have coalesced into one 30 mm lesion and L1 is unchanged. Sum 40 + 15 = 55 →
  // 40 + 30 = 70: +27.2%, +15 mm → PD, in both numbering orders. Scoring the merged target 0 mm would
  // give 40 mm, −27.2% (a false SD).
  const run = (targetFirst: boolean) =>
    runFollowup(
      [
        visit('v1', '2026-01-01', [lesion('L1', [0, 0, 0], 40), lesion('L2', [100, 0, 0], targetFirst ? 15 : 8), lesion('L3', [118, 0, 0], targetFirst ? 8 : 15)]),
        visit('v2', '2026-02-01', [lesion('L1', [0, 0, 0], 40), lesion('L2', [109, 0, 0], 30)]),
      ],
      { marginMm: 10 },
    );

  it('target lower-numbered than the non-target: the target keeps the lesion', () => {
    const r = run(true);
    expect(r.targets.tracks).toEqual(['A', 'B']);
    expect(r.tracks[2].status.v2).toBe('merged');
    expect(r.visits[1].response.targets).toEqual([{ track: 'A', recordedMm: 40 }, { track: 'B', recordedMm: 30 }]);
    expect(r.visits[1].response).toMatchObject({ targetSumMm: 70, changeFromBaselinePct: 27.2, targetCategory: 'PD' });
  });

  it('target higher-numbered: merged into the non-target, still recorded with the whole lesion', () => {
    const r = run(false);
    expect(r.targets.tracks).toEqual(['A', 'C']);
    expect(r.tracks[2]).toMatchObject({ status: { v2: 'merged' }, mergedInto: { v2: 'B' } });
    expect(r.visits[1].response.targets).toEqual([{ track: 'A', recordedMm: 40 }, { track: 'C', recordedMm: 30 }]);
    expect(r.visits[1].response).toMatchObject({ targetSumMm: 70, changeFromBaselinePct: 27.2, targetCategory: 'PD' });
  });
});

describe('a target missing from a mask inside the scanned field', () => {
  const visits = (extra: Partial<FollowupVisit> = {}) => [
    visit('v1', '2026-01-01', [lesion('L1', [0, 0, 0], 30), lesion('L2', [80, 0, 0], 20)]),
    visit('v2', '2026-03-01', [lesion('L1', [0, 0, 0], 28)], extra),
  ];

  it('is NE until a reader confirms it gone, never 0 mm / −100%', () => {
    // Source: RECIST 1.1 section 4.4.2 (missing assessments): a target that cannot be assessed makes
    // the target response NE unless the rest already prove PD. A lesion a mask missed has not been
    // shown to have disappeared.
    const r = runFollowup(visits(), { marginMm: 10 });
    expect(r.visits[1]).toMatchObject({ goneLesions: ['B'], unconfirmedGone: ['B'] });
    expect(r.visits[1].response).toMatchObject({ targetSumComplete: false, changeFromBaselinePct: null, changeFromNadirPct: null, targetCategory: 'NE', category: 'NE' });
    expect(r.visits[1].response.targets[1]).toEqual({ track: 'B', recordedMm: null });
    expect(targetSumText(r.visits[1].response)).toBe('NE');
  });

  it('is 0 mm once the reader confirms it gone (by track id or by its baseline lesion)', () => {
    // 30 + 20 = 50 → 28 + 0 = 28: −44% → PR (section 4.3.1).
    for (const ref of ['B', 'v1:L2']) {
      const r = runFollowup(visits({ readerCalls: { outsideLiver: 'none', confirmedGone: [ref] } }), { marginMm: 10 });
      expect(r.visits[1].unconfirmedGone).toEqual([]);
      expect(r.visits[1].response).toMatchObject({ targetSumMm: 28, changeFromBaselinePct: -44, category: 'PR' });
      expect(targetSumText(r.visits[1].response)).toBe('28.0 mm');
    }
  });
});

describe('an equivocal new lesion (RECIST 1.1 section 4.3.5)', () => {
  // "If a new lesion is equivocal, for example because of its small size, continued follow-up will
  // clarify; if confirmed, PD is declared using the date of the initial scan" (from memory).
  const series = (calls: Partial<Record<string, FollowupVisit['readerCalls']>> = {}) =>
    runFollowup(
      [
        visit('v1', '2026-01-05', [lesion('L1', [0, 0, 0], 30)]),
        visit('v2', '2026-03-02', [lesion('L1', [0, 0, 0], 20), lesion('L2', [60, 0, 0], 6)], { readerCalls: { outsideLiver: 'none', ...calls.v2 } }),
        visit('v3', '2026-04-27', [lesion('L1', [0, 0, 0], 20), lesion('L2', [60, 0, 0], 12)], { readerCalls: { outsideLiver: 'none', ...calls.v3 } }),
      ],
      { marginMm: 10 },
    );

  it('is followed, not PD; once confirmed, progression dates from its first detection', () => {
    const r = series();
    // v2: 30 → 20 mm, −33.3% → PR; the 6 mm lesion is under 10 mm: equivocal.
    expect(r.visits[1]).toMatchObject({ overall: 'PR', equivocalNewLesions: ['B'] });
    // v3: it has grown to 12 mm: unequivocal by size → PD, dated from v2.
    expect(r.visits[2]).toMatchObject({ overall: 'PD', unequivocalNewLesions: [{ track: 'B', from: 'size' }] });
    expect(r.bestResponse.progression).toEqual({ visit: 'v2', date: '2026-03-02' });
    // The PR at v2 falls on the date of progression, so it does not count: best response PD.
    expect(r.bestResponse.category).toBe('PD');
  });

  it("follows the reader's call over the size rule", () => {
    const early = series({ v2: { newLesions: { L2: 'unequivocal' } } });
    expect(early.visits[1]).toMatchObject({ overall: 'PD', unequivocalNewLesions: [{ track: 'B', from: 'reader' }] });
    expect(early.bestResponse.progression).toEqual({ visit: 'v2', date: '2026-03-02' });
    const held = series({ v3: { newLesions: { L2: 'equivocal' } } });
    expect(held.visits.map((v) => v.overall)).toEqual([null, 'PR', 'PR']);
    expect(held.bestResponse).toMatchObject({ category: 'PR', progression: null });
  });

  it('takes its default size from the protocol, named as a departure when changed', () => {
    const r = runFollowup(
      [visit('v1', '2026-01-05', [lesion('L1', [0, 0, 0], 30)]), visit('v2', '2026-03-02', [lesion('L1', [0, 0, 0], 30), lesion('L2', [60, 0, 0], 6)])],
      { marginMm: 10, protocol: { equivocalNewBelowMm: 5 } },
    );
    expect(r.visits[1].overall).toBe('PD');
    expect(r.departures).toEqual(['new lesions under 5 mm are equivocal until called (default 10 mm)']);
    expect(protocolDepartures(DEFAULT_PROTOCOL)).toEqual([]);
  });
});

describe('non-target call and disease outside the liver through the follow-up (RECIST 1.1 tables 1 and 2)', () => {
  it('CR of the liver is PR while the rest of the body is not assessed', () => {
    const visits = [visit('v1', '2026-01-05', [lesion('L1', [0, 0, 0], 30)]), visit('v2', '2026-03-02', [], { readerCalls: { confirmedGone: ['A'] } })];
    const r = runFollowup(visits, { marginMm: 10 });
    expect(r.visits[1]).toMatchObject({ overall: 'PR', readerCalls: { outsideLiver: 'not-assessed' } });
    expect(r.visits[1].response).toMatchObject({ targetCategory: 'CR', nonTargetCategory: 'NE' });
    visits[1].readerCalls = { confirmedGone: ['A'], outsideLiver: 'none' };
    expect(runFollowup(visits, { marginMm: 10 }).visits[1].overall).toBe('CR');
    visits[1].readerCalls = { confirmedGone: ['A'], outsideLiver: 'progression' };
    expect(runFollowup(visits, { marginMm: 10 }).visits[1].overall).toBe('PD');
    expect(r.scope).toBe('Falciform assesses the liver; non-target calls and disease outside the liver are taken from the reader.');
  });

  it("a reader's non-target call replaces what the masks show", () => {
    // The 8 mm non-target is missing from v2's mask; without a call it is not evaluable.
    const base = visit('v1', '2026-01-05', [lesion('L1', [0, 0, 0], 30), lesion('L2', [60, 0, 0], 8)]);
    const v2 = (reader: FollowupVisit['readerCalls']) => visit('v2', '2026-03-02', [lesion('L1', [0, 0, 0], 29)], { readerCalls: reader });
    expect(runFollowup([base, v2({ outsideLiver: 'none' })], { marginMm: 10 }).visits[1].response.nonTargetCategory).toBe('NE');
    expect(runFollowup([base, v2({ outsideLiver: 'none', nonTarget: 'absent' })], { marginMm: 10 }).visits[1].response.nonTargetCategory).toBe('CR');
    expect(runFollowup([base, v2({ outsideLiver: 'none', nonTarget: 'unequivocal-progression' })], { marginMm: 10 }).visits[1]).toMatchObject({
      overall: 'PD', nonTarget: { category: 'PD', readerProgression: true },
    });
  });
});

describe('target present but too small to measure', () => {
  it('is 5 mm only on the reader\'s mark; otherwise its measured value', () => {
    // Source: RECIST 1.1 section 4.3.2 (from memory).
    const visits = (reader: FollowupVisit['readerCalls']) => [
      visit('v1', '2026-01-05', [lesion('L1', [0, 0, 0], 20)]),
      visit('v2', '2026-03-02', [lesion('L1', [0, 0, 0], 3.4)], { readerCalls: reader }),
    ];
    expect(runFollowup(visits({ outsideLiver: 'none' }), { marginMm: 10 }).visits[1].response.targets).toEqual([{ track: 'A', recordedMm: 3.4 }]);
    expect(runFollowup(visits({ outsideLiver: 'none', tooSmall: ['L1'] }), { marginMm: 10 }).visits[1].response.targets).toEqual([{ track: 'A', recordedMm: 5 }]);
  });
});

describe('best overall response (RECIST 1.1 sections 4.4.3 and 4.6, table 3)', () => {
  const tp = (visit: string, date: string, category: TimePoint['category']): TimePoint => ({ visit, date, category });
  const base = tp('v1', '2026-01-01', null);
  const confirm = { ...DEFAULT_PROTOCOL, confirmResponse: true };

  it('without confirmation: the best time-point response up to progression', () => {
    const r = bestOverallResponse([base, tp('v2', '2026-02-26', 'PR'), tp('v3', '2026-04-23', 'SD'), tp('v4', '2026-06-18', 'PD'), tp('v5', '2026-08-13', 'CR')], DEFAULT_PROTOCOL);
    expect(r).toMatchObject({ category: 'PR', visit: 'v2', unconfirmed: null, progression: { visit: 'v4', date: '2026-06-18' } });
  });

  it('with confirmation: a PR needs a PR or CR at least 4 weeks later', () => {
    // v2 day 56 PR, v3 day 84 PR (28 days on): confirmed.
    expect(bestOverallResponse([base, tp('v2', '2026-02-26', 'PR'), tp('v3', '2026-03-26', 'PR')], confirm)).toMatchObject({ category: 'PR', confirmedBy: 'v3', unconfirmed: null });
    // 27 days on is too soon: unconfirmed PR, counted as SD (day 56 ≥ the 42-day SD minimum).
    expect(bestOverallResponse([base, tp('v2', '2026-02-26', 'PR'), tp('v3', '2026-03-25', 'PR')], confirm)).toMatchObject({ category: 'SD', unconfirmed: 'PR', confirmedBy: null });
    // Table 3: CR then PR is a confirmed PR; CR then CR a confirmed CR.
    expect(bestOverallResponse([base, tp('v2', '2026-02-26', 'CR'), tp('v3', '2026-04-01', 'PR')], confirm)).toMatchObject({ category: 'PR', unconfirmed: 'CR' });
    expect(bestOverallResponse([base, tp('v2', '2026-02-26', 'CR'), tp('v3', '2026-04-01', 'CR')], confirm)).toMatchObject({ category: 'CR', confirmedBy: 'v3', unconfirmed: null });
  });

  it('SD counts only from the minimum interval; before it, the next assessment decides', () => {
    // Day 28 SD, then PD: PD. Day 28 SD, then NE: NE. Day 42 SD: SD.
    expect(bestOverallResponse([base, tp('v2', '2026-01-29', 'SD'), tp('v3', '2026-03-01', 'PD')], DEFAULT_PROTOCOL).category).toBe('PD');
    expect(bestOverallResponse([base, tp('v2', '2026-01-29', 'SD'), tp('v3', '2026-03-01', 'NE')], DEFAULT_PROTOCOL).category).toBe('NE');
    expect(bestOverallResponse([base, tp('v2', '2026-02-12', 'SD')], DEFAULT_PROTOCOL)).toMatchObject({ category: 'SD', visit: 'v2' });
    expect(bestOverallResponse([base, tp('v2', '2026-02-12', 'SD')], { ...DEFAULT_PROTOCOL, sdMinDays: 56 }).category).toBe('NE');
  });
});
