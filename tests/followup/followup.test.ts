import { describe, expect, it } from 'vitest';
import { runFollowup, type FollowupLesion, type FollowupVisit } from '../../src/followup/followup.js';
import { isFalciformError } from '../../src/errors.js';
import type { SegmentName } from '../../src/segments/segment-map.js';
import { LANDMARKS, LIVER, move, movedLandmarks, movedLiver, randomMotion, seeded, type V3 } from './phantom.js';

function lesion(id: string, centre: V3, longestAxialMm: number, segment: SegmentName | null = 'V', extra: Partial<FollowupLesion> = {}): FollowupLesion {
  return { id, centroidMm: centre, segment, longestAxialMm, volumeMl: +(longestAxialMm ** 3 / 2000).toFixed(2), marginAlert: false, ...extra };
}

function visit(id: string, date: string, lesions: FollowupLesion[], extra: Partial<FollowupVisit> = {}): FollowupVisit {
  return { id, date, lesions, sliceThicknessMm: 2.5, ...extra };
}

describe('follow-up of a patient', () => {
  it('gives the contract example: tracks, PR at −34.4%, burden per segment', () => {
    // RECIST 1.1 (Eisenhauer et al. 2009), section 4.3.1: 21.5 + 17.7 = 39.2 mm at baseline;
    // 15.2 + 10.5 = 25.7 mm; (25.7 − 39.2) / 39.2 = −34.4% → PR. The third, 8 mm lesion is not
    // measurable (< 10 mm) and is the non-target; it persists, so non-target is non-CR/non-PD.
    const r = runFollowup(
      [
        visit('v2', '2026-03-02', [lesion('L1', [-70, -20, 5], 15.2), lesion('L2', [-30, 10, 30], 10.5, 'VIII', { marginAlert: true }), lesion('L3', [40, 0, 0], 7, 'III')]),
        visit('v1', '2026-01-12', [lesion('L1', [-70, -20, 4], 21.5), lesion('L2', [-31, 10, 30], 17.7, 'VIII'), lesion('L3', [40, 1, 0], 8, 'III')]),
      ],
      { marginMm: 10 },
    );
    expect(r.visits.map((v) => v.id)).toEqual(['v1', 'v2']);
    expect(r.targets).toEqual({ tracks: ['A', 'B'], source: 'default' });
    expect(r.visits[1].response).toMatchObject({
      criteria: 'RECIST 1.1', targetSumMm: 25.7, baselineSumMm: 39.2, nadirSumMm: 39.2,
      changeFromBaselinePct: -34.4, changeFromNadirPct: -34.4, category: 'PR',
    });
    expect(r.visits[1]).toMatchObject({ newLesions: [], goneLesions: [], marginAlerts: ['B'], overall: 'PR' });
    expect(r.visits[1].nonTarget).toMatchObject({ category: 'non-CR/non-PD', tracks: ['C'] });
    expect(r.tracks[0]).toMatchObject({ id: 'A', lesions: { v1: 'L1', v2: 'L1' }, segments: { v1: 'V', v2: 'V' }, longestAxialMm: { v1: 21.5, v2: 15.2 }, target: true });
    expect(r.tracks[2].target).toBe(false);
    expect(r.burden.filter((b) => b.visit === 'v1')).toEqual([
      { visit: 'v1', segment: 'III', count: 1, sumLongestAxialMm: 8, volumeMl: 0.26 },
      { visit: 'v1', segment: 'V', count: 1, sumLongestAxialMm: 21.5, volumeMl: 4.97 },
      { visit: 'v1', segment: 'VIII', count: 1, sumLongestAxialMm: 17.7, volumeMl: 2.77 },
    ]);
    expect(r.visits[0].response.category).toBeNull();
    expect(r.notes.join(' ')).toMatch(/reader's judgement/);
  });

  it('recovers a known rigid motion from landmarks and matches lesions moved with it', () => {
    // The motion (up to 25°, 40 mm) is far beyond any matching gate: only alignment can link them.
    const m = randomMotion(seeded(31), 25, 40);
    const base = [lesion('L1', [-60, 0, 10], 22), lesion('L2', [-20, -30, 30], 14), lesion('L3', [10, 20, -10], 12)];
    const r = runFollowup(
      [
        visit('v1', '2026-01-01', base, { landmarks: LANDMARKS }),
        visit('v2', '2026-02-01', base.map((l) => ({ ...l, centroidMm: move(m, l.centroidMm) })), { landmarks: movedLandmarks(m) }),
      ],
      { marginMm: 10 },
    );
    expect(r.visits[1].alignment.method).toBe('landmarks');
    expect(r.visits[1].alignment.residualMm).toBeLessThan(0.01);
    expect(r.tracks.map((t) => t.lesions)).toEqual([{ v1: 'L1', v2: 'L1' }, { v1: 'L2', v2: 'L2' }, { v1: 'L3', v2: 'L3' }]);
    expect(r.visits[1].response.category).toBe('SD');
  });

  it('aligns on the liver masks when there are no landmarks', () => {
    const m = randomMotion(seeded(5), 12, 30);
    const base = [lesion('L1', [-60, 0, 10], 22), lesion('L2', [-20, -30, 30], 14)];
    const r = runFollowup(
      [
        visit('v1', '2026-01-01', base, { liver: movedLiver(null) }),
        visit('v2', '2026-02-01', base.map((l) => ({ ...l, centroidMm: move(m, l.centroidMm) })), { liver: movedLiver(m) }),
      ],
      { marginMm: 10 },
    );
    expect(r.visits[1].alignment.method).toBe('liver');
    expect(r.tracks).toHaveLength(2);
    expect(r.visits[1].newLesions).toEqual([]);
  });

  it('uses world coordinates unaligned, with a warning, when nothing can align the visits', () => {
    const r = runFollowup(
      [visit('v1', '2026-01-01', [lesion('L1', [0, 0, 0], 20)]), visit('v2', '2026-02-01', [lesion('L1', [25, 0, 0], 20)])],
      { marginMm: 10 },
    );
    expect(r.visits[1].alignment).toMatchObject({ method: 'none', residualMm: null });
    expect(r.warnings.join(' ')).toMatch(/unaligned/);
    // Gate 10 + 15 + 20 mm unaligned slack = 45 mm: the 25 mm shift is still the same lesion.
    expect(r.tracks).toHaveLength(1);
  });

  it('sums a split target\'s fragments and measures a coalesced lesion whole', () => {
    // RECIST 1.1 section 4.3.2 (from memory): fragments' longest diameters are added; lesions that
    // coalesce are measured as one, the others recorded 0 mm.
    // A 40 mm splits into 14 + 16 = 30 mm; B (15 mm) and C (12 mm) coalesce into 30 mm.
    // Baseline sum (A, B the two largest) = 40 + 15 = 55; v2 = 30 + 30 = 60: +9.1% → SD.
    const r = runFollowup(
      [
        visit('v1', '2026-01-01', [lesion('L1', [0, 0, 0], 40), lesion('L2', [100, 0, 0], 15), lesion('L3', [118, 0, 0], 12)]),
        visit('v2', '2026-02-01', [lesion('L1', [-9, 0, 0], 14), lesion('L2', [9, 0, 0], 16), lesion('L3', [109, 0, 0], 30)]),
      ],
      { marginMm: 10 },
    );
    expect(r.targets.tracks).toEqual(['A', 'B']);
    const [t1, t2, t3] = r.tracks;
    expect(t1.fragments).toEqual({ v2: ['L1', 'L2'] });
    expect(t1.longestAxialMm.v2).toBe(30);
    expect(t2.lesions.v2).toBe('L3');
    expect(t3.status.v2).toBe('merged');
    expect(t3.mergedInto).toEqual({ v2: 'B' });
    expect(t3.longestAxialMm.v2).toBe(0);
    expect(r.visits[1].response).toMatchObject({ targetSumMm: 60, baselineSumMm: 55, changeFromBaselinePct: 9, category: 'SD' });
    expect(r.visits[1].goneLesions).toEqual([]);
  });

  it('reports new and gone lesions, PD for a new one, and a segment change', () => {
    const r = runFollowup(
      [
        visit('v1', '2026-01-01', [lesion('L1', [0, 0, 0], 30, 'V'), lesion('L2', [60, 0, 0], 8, 'IVa')]),
        visit('v2', '2026-02-01', [lesion('L1', [2, 0, 0], 20, 'VIII'), lesion('L2', [-80, 50, 0], 6, 'VI')]),
      ],
      { marginMm: 10 },
    );
    expect(r.visits[1]).toMatchObject({ newLesions: ['C'], goneLesions: ['B'], unconfirmedGone: ['B'] });
    // The new lesion is 6 mm, under the 10 mm default: equivocal, followed, not PD (RECIST 1.1
    // section 4.3.5, from memory: a new lesion must be unequivocal; small size is the example given).
    expect(r.visits[1]).toMatchObject({ equivocalNewLesions: ['C'], unequivocalNewLesions: [] });
    expect(r.visits[1].response).toMatchObject({ targetCategory: 'PR', newLesion: false, category: 'PR' });
    // Called unequivocal by the reader: targets 30 → 20 mm (−33.3%, PR) but a new lesion → PD (table 1).
    const called = runFollowup(
      [
        visit('v1', '2026-01-01', [lesion('L1', [0, 0, 0], 30, 'V'), lesion('L2', [60, 0, 0], 8, 'IVa')]),
        visit('v2', '2026-02-01', [lesion('L1', [2, 0, 0], 20, 'VIII'), lesion('L2', [-80, 50, 0], 6, 'VI')], { readerCalls: { newLesions: { L2: 'unequivocal' } } }),
      ],
      { marginMm: 10 },
    );
    expect(called.visits[1]).toMatchObject({ unequivocalNewLesions: [{ track: 'C', from: 'reader' }], equivocalNewLesions: [] });
    expect(called.visits[1].response).toMatchObject({ targetCategory: 'PR', newLesion: true, category: 'PD' });
    expect(r.tracks[0]).toMatchObject({ segmentChanged: true, segmentChanges: [{ visit: 'v2', from: 'V', to: 'VIII' }] });
    // Burden keeps a row for every segment seen at any visit, zeros included.
    expect(r.burden.filter((b) => b.visit === 'v2').map((b) => [b.segment, b.count])).toEqual([['IVa', 0], ['V', 0], ['VI', 1], ['VIII', 1]]);
  });

  it('honours named targets, and refuses a name that is not a baseline track', () => {
    const visits = [
      visit('v1', '2026-01-01', [lesion('L1', [0, 0, 0], 30), lesion('L2', [60, 0, 0], 25), lesion('L3', [0, 60, 0], 20)]),
      visit('v2', '2026-02-01', [lesion('L1', [0, 0, 0], 30), lesion('L2', [60, 0, 0], 25), lesion('L3', [0, 60, 0], 20)]),
    ];
    const r = runFollowup(visits, { marginMm: 10, targets: ['C'] });
    expect(r.targets).toEqual({ tracks: ['C'], source: 'named' });
    expect(r.visits[0].response.baselineSumMm).toBe(20);
    expect(r.tracks.map((t) => t.target)).toEqual([false, false, true]);
    try {
      runFollowup(visits, { marginMm: 10, targets: ['I'] });
      expect.unreachable();
    } catch (e) {
      expect(isFalciformError(e)).toBe(true);
      expect((e as Error).message).toMatch(/I is not a lesion track seen at the baseline visit \(tracks there: A, B, C\)/);
    }
    // A manifest or store written when tracks were numbered names them "T1", "T2", …: read as A, B, …
    expect(runFollowup(visits, { marginMm: 10, targets: ['T3'] }).targets).toEqual({ tracks: ['C'], source: 'named' });
    // One rule for the command line and the app (RECIST 1.1 section 4.2, at most two targets per
    // organ, from memory; the liver is one organ): more than two named is refused.
    expect(() => runFollowup(visits, { marginMm: 10, targets: ['A', 'B', 'C'] })).toThrow(/at most 2 per organ/);
  });

  it('makes non-target progression PD only when a reader says so', () => {
    const visits = [
      visit('v1', '2026-01-01', [lesion('L1', [0, 0, 0], 30), lesion('L2', [60, 0, 0], 8)]),
      visit('v2', '2026-02-01', [lesion('L1', [0, 0, 0], 30), lesion('L2', [60, 0, 0], 9)], { nonTargetProgression: true }),
    ];
    expect(runFollowup(visits, { marginMm: 10 }).visits[1]).toMatchObject({ overall: 'PD', nonTarget: { category: 'PD', readerProgression: true } });
    const noFlag = visits.map((v) => ({ ...v, nonTargetProgression: undefined }));
    expect(runFollowup(noFlag, { marginMm: 10 }).visits[1].overall).toBe('SD');
  });

  it('recomputes margin alerts against the follow-up margin when lesions carry their margin', () => {
    const r = runFollowup([visit('v1', '2026-01-01', [lesion('L1', [0, 0, 0], 20, 'V', { marginMm: 7, marginAlert: false })])], { marginMm: 8 });
    expect(r.visits[0].marginAlerts).toEqual(['A']);
  });

  it('calls a target outside a later scan\'s field not evaluable', () => {
    const liver1 = movedLiver(null);
    const liver2 = movedLiver(null);
    const far: V3 = [LIVER.centre[0], LIVER.centre[1], LIVER.centre[2] + 400];
    const r = runFollowup(
      [
        visit('v1', '2026-01-01', [lesion('L1', LIVER.centre, 30), lesion('L2', far, 25)], { liver: liver1 }),
        visit('v2', '2026-02-01', [lesion('L1', LIVER.centre, 20)], { liver: liver2 }),
      ],
      { marginMm: 10 },
    );
    expect(r.visits[1].notEvaluable).toEqual(['B']);
    expect(r.visits[1].response.category).toBe('NE');
  });
});
