import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { assignWithGate } from '../../src/followup/hungarian.js';
import { buildTracks, gateMm, type Override, type TrackVisitInput } from '../../src/followup/tracks.js';
import { compareIds, compareTrackIds, currentTrackRef, trackId, trackIndex } from '../../src/followup/ids.js';

// Matching scenarios as designed (see the module comment of src/followup/tracks.ts): optimal
// assignment within a size-scaled gate, then splits, merges, new and gone lesions, and reader
// overrides. Centres are given in the baseline's space, as after alignment.

type L = [id: string, x: number, y: number, diameterMm: number];
function visit(id: string, lesions: L[], extra: Partial<TrackVisitInput> = {}): TrackVisitInput {
  return { id, lesions: lesions.map(([lid, x, y, d]) => ({ id: lid, centreMm: [x, y, 0], longestAxialMm: d })), slackMm: 0, ...extra };
}

/** track id → lesion ids (joined with "+") at visit k, or its status when absent. */
function table(visits: TrackVisitInput[], overrides: Override[] = []) {
  const { tracks, warnings } = buildTracks(visits, overrides);
  const rows: Record<string, string[]> = {};
  for (const t of tracks) {
    rows[t.id] = t.visits.map((v) => (v === null ? '-' : v.status === 'present' ? v.lesions.join('+') : v.mergedInto ? `merged:${v.mergedInto}` : v.status));
  }
  return { rows, warnings, tracks };
}

describe('optimal assignment (Hungarian)', () => {
  it('finds the least total cost where a greedy pick would not', () => {
    // Greedy takes (0,0)=1 first, leaving (1,1)=100: 101. The optimum is 2 + 3 = 5. An unpaired cost
    // far above every pair makes every row pair, as a plain assignment does.
    expect(assignWithGate([[1, 2], [3, 100]], 1000)).toEqual([[0, 1], [1, 0]]);
    // Rectangular: three rows, four columns.
    expect(assignWithGate([[4, 1, 3, 9], [2, 0, 5, 9], [3, 2, 2, 9]], 1000)).toEqual([[0, 1], [1, 0], [2, 2]]);
  });

  it('agrees with brute force on random rectangular matrices', () => {
    let seed = 12345;
    const rand = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    const best = (cost: number[][], row: number, used: Set<number>): number => {
      if (row === cost.length) return 0;
      let min = Infinity;
      for (let c = 0; c < cost[0].length; c++) {
        if (used.has(c)) continue;
        used.add(c);
        min = Math.min(min, cost[row][c] + best(cost, row + 1, used));
        used.delete(c);
      }
      return min;
    };
    for (let trial = 0; trial < 40; trial++) {
      const n = 1 + Math.floor(rand() * 5), m = n + Math.floor(rand() * 3);
      const cost = Array.from({ length: n }, () => Array.from({ length: m }, () => Math.round(rand() * 20)));
      const pairs = assignWithGate(cost, 1000);
      expect(pairs.map(([r]) => r).sort()).toEqual([...Array(n).keys()]);
      expect(new Set(pairs.map(([, c]) => c)).size).toBe(n);
      expect(pairs.reduce((s, [r, c]) => s + cost[r][c], 0)).toBe(best(cost, 0, new Set()));
    }
  });

  it('leaves pairs out of the gate unpaired and prefers leaving ends unpaired to a poor pair', () => {
    expect(assignWithGate([[0.2, Infinity], [Infinity, Infinity]], 0.5)).toEqual([[0, 0]]);
    // Row 0 sits on column 0 (0.1); row 1 could only pair with column 0 (0.5) or column 1 (0.99).
    // {0-0, 1 unpaired, column 1 unpaired} = 0.1 + 0.5 + 0.5 = 1.1 beats {0-1, 1-0} = 0.99 + 0.5 = 1.49.
    expect(assignWithGate([[0.1, 0.99], [0.5, Infinity]], 0.5)).toEqual([[0, 0]]);
    expect(assignWithGate([], 0.5)).toEqual([]);
  });

  it('gives the least total that SciPy linear_sum_assignment finds on the padded square (run live)', () => {
    // Clustered lesions so that gated blocks chain into large ones, as in a many-lesion visit.
    let seed = 7;
    const rand = () => ((seed = (seed * 16807) % 2147483647) / 2147483647);
    const problems: number[][][] = [];
    for (let trial = 0; trial < 6; trial++) {
      const n = 20 + Math.floor(rand() * 40), m = 20 + Math.floor(rand() * 40);
      const at = (count: number) => Array.from({ length: count }, () => [rand() * 60, rand() * 60]);
      const rows = at(n), cols = at(m);
      problems.push(rows.map(([x, y]) => cols.map(([u, v]) => {
        const d = Math.hypot(x - u, y - v) / 12;
        return d <= 1 ? d : Infinity;
      })));
    }
    const py = [
      'import json, sys, numpy as np',
      'from scipy.optimize import linear_sum_assignment',
      'out = []',
      'for c in json.load(sys.stdin):',
      '    c = np.array(c, dtype=float); n, m = c.shape',
      '    sq = np.full((n + m, n + m), 1e6); sq[:n, :m] = np.where(c < 0, 1e6, c)',
      '    sq[np.arange(n), m + np.arange(n)] = 0.5; sq[n + np.arange(m), np.arange(m)] = 0.5; sq[n:, m:] = 0',
      '    r, k = linear_sum_assignment(sq); out.append(float(sq[r, k].sum()))',
      'print(json.dumps(out))',
    ].join('\n');
    const input = JSON.stringify(problems.map((c) => c.map((row) => row.map((x) => (Number.isFinite(x) ? x : -1)))));
    const r = spawnSync('/usr/bin/python3', ['-c', py], { input, encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    const scipy = JSON.parse(r.stdout) as number[];
    problems.forEach((cost, t) => {
      const pairs = assignWithGate(cost, 0.5);
      expect(new Set(pairs.map(([, c]) => c)).size).toBe(pairs.length);
      const total = pairs.reduce((s, [i, j]) => s + cost[i][j], 0) + 0.5 * (cost.length + cost[0].length - 2 * pairs.length);
      expect(total).toBeCloseTo(scipy[t], 9);
    });
  });
});

describe('lesion tracks', () => {
  it('letters track ids like spreadsheet columns and orders them A < … < Z < AA', () => {
    expect([0, 1, 25, 26, 27, 51, 52, 701, 702].map(trackId)).toEqual(['A', 'B', 'Z', 'AA', 'AB', 'AZ', 'BA', 'ZZ', 'AAA']);
    for (const n of [0, 25, 26, 701, 702, 18_277]) expect(trackIndex(trackId(n))).toBe(n);
    expect(trackIndex('T3')).toBeNull();
    expect(trackIndex('a')).toBeNull();
    expect(['AA', 'B', 'Z', 'A', 'AB', 'BA'].sort(compareTrackIds)).toEqual(['A', 'B', 'Z', 'AA', 'AB', 'BA']);
    // Lexical order would put AA before B: the natural order is by count.
    expect(['AA', 'B'].sort()).toEqual(['AA', 'B']);
    expect(() => trackId(-1)).toThrow(RangeError);
    // The old numbered ids map one to one onto the letters; other references pass unchanged.
    expect(['T1', 'T3', 'T26', 'T27', 'v1:L2', 'C', 'T0', 'T'].map(currentTrackRef)).toEqual(['A', 'C', 'Z', 'AA', 'v1:L2', 'C', 'T0', 'T']);
  });

  it('goes on past Z to AA, AB for the 27th and 28th lesion, and a link may name such a track', () => {
    const many = (id: string) => visit(id, Array.from({ length: 28 }, (_, n): L => [`L${n + 1}`, n * 60, 0, 12]));
    const { tracks } = buildTracks([many('v1'), many('v2')], [{ kind: 'link', visit: 'v2', lesion: 'L1', track: 'AB' }]);
    expect(tracks.map((t) => t.id)).toEqual([...'ABCDEFGHIJKLMNOPQRSTUVWXYZ', 'AA', 'AB', 'AC']);
    expect(tracks[27]).toMatchObject({ id: 'AB', visits: [{ lesions: ['L28'] }, { lesions: ['L1'], how: 'override' }] });
  });

  it('letters tracks in order of first appearance, within a visit in natural lesion-id order', () => {
    expect(['L10', 'L2', 'L1'].sort(compareIds)).toEqual(['L1', 'L2', 'L10']);
    const { rows } = table([visit('v1', [['L10', 0, 0, 12], ['L2', 50, 0, 12], ['L1', 100, 0, 12]]), visit('v2', [['L1', 100, 0, 12], ['L9', 0, 80, 12], ['L2', 50, 0, 12], ['L10', 0, 0, 12]])]);
    expect(rows).toEqual({ A: ['L1', 'L1'], B: ['L2', 'L2'], C: ['L10', 'L10'], D: ['-', 'L9'] });
  });

  it('follows lesions by position, whatever their ids and order at the next visit (shuffled)', () => {
    const { rows } = table([
      visit('v1', [['L1', 0, 0, 20], ['L2', 60, 0, 15], ['L3', 0, 60, 12], ['L4', 60, 60, 25]]),
      visit('v2', [['L4', 0, 61, 11], ['L1', 61, 60, 24], ['L3', 59, 1, 16], ['L2', 1, 0, 18]]),
    ]);
    expect(rows).toEqual({ A: ['L1', 'L2'], B: ['L2', 'L3'], C: ['L3', 'L4'], D: ['L4', 'L1'] });
  });

  it('keeps neighbours apart when they move together (global, not greedy, matching)', () => {
    // A at x=0 and B at x=12, both 10 mm, both move +8 mm. Greedy would give A' (x=8) to B (4 mm
    // away). Gate = 10 + 0.75 × 10 = 17.5 mm. Optimal: A'→A, B'→B costs 8/17.5 + 8/17.5 = 0.91;
    // A'→B leaves B' (20 mm from A, outside the gate) and A unpaired: 4/17.5 + 0.5 + 0.5 = 1.23.
    expect(gateMm(10, 10, 0)).toBe(17.5);
    const { rows } = table([visit('v1', [['A', 0, 0, 10], ['B', 12, 0, 10]]), visit('v2', [['A2', 8, 0, 10], ['B2', 20, 0, 10]])]);
    expect(rows).toEqual({ A: ['A', 'A2'], B: ['B', 'B2'] });
  });

  it('scales the gate with lesion size: a big lesion may shift further than a small one', () => {
    // 12 mm lesion moved 20 mm: gate 10 + 9 = 19 → not matched (gone + new).
    const small = table([visit('v1', [['L1', 0, 0, 12]]), visit('v2', [['L1', 20, 0, 12]])]).rows;
    expect(small).toEqual({ A: ['L1', 'gone'], B: ['-', 'L1'] });
    // 40 mm lesion moved 30 mm: gate 10 + 30 = 40 → matched.
    const big = table([visit('v1', [['L1', 0, 0, 40]]), visit('v2', [['L1', 30, 0, 38]])]).rows;
    expect(big).toEqual({ A: ['L1', 'L1'] });
    // The alignment's slack widens every gate of that visit.
    const slack = table([visit('v1', [['L1', 0, 0, 12]]), visit('v2', [['L1', 20, 0, 12]], { slackMm: 2 })]).rows;
    expect(slack).toEqual({ A: ['L1', 'L1'] });
  });

  it('marks new and gone lesions, and not-evaluable ones outside the scanned field', () => {
    const { rows } = table([
      visit('v1', [['L1', 0, 0, 20], ['L2', 80, 0, 20], ['L3', 0, 200, 20]]),
      visit('v2', [['L1', 0, 0, 20], ['L7', -80, 40, 9]], { inView: (p) => p[1] < 150 }),
    ]);
    expect(rows).toEqual({ A: ['L1', 'L1'], B: ['L2', 'gone'], C: ['L3', 'not-evaluable'], D: ['-', 'L7'] });
  });

  it('picks a lesion back up when it reappears', () => {
    const { rows } = table([visit('v1', [['L1', 0, 0, 15]]), visit('v2', []), visit('v3', [['L1', 2, 0, 8]])]);
    expect(rows).toEqual({ A: ['L1', 'gone', 'L1'] });
  });

  it('recognises a split: both fragments stay with the track', () => {
    // A 40 mm lesion (extent radius 20 mm) becomes lesions of 14 and 16 mm centred 9 mm either side
    // of its centre (reaching 16 and 17 mm out). One is paired by assignment; the other lies within
    // the gate and, like the first, inside the old extent.
    const { rows, tracks } = table([visit('v1', [['L1', 0, 0, 40], ['L2', 100, 0, 20]]), visit('v2', [['L1', -9, 0, 14], ['L2', 100, 0, 20], ['L3', 9, 0, 16]])]);
    expect(rows).toEqual({ A: ['L1', 'L3+L1'], B: ['L2', 'L2'] });
    expect(tracks[0].visits[1]!.how).toBe('split');
    // Not a split when the newcomer does not fit inside the old extent: a new lesion. A 12 mm
    // lesion (radius 6 mm, allowance 3 mm) cannot hold a 5 mm one centred 9 mm away (9 + 2.5 > 9).
    const beside = table([visit('v1', [['L1', 0, 0, 12]]), visit('v2', [['L1', 0, 0, 12], ['L2', 9, 0, 5]])]).rows;
    expect(beside).toEqual({ A: ['L1', 'L1'], B: ['-', 'L2'] });
  });

  it('recognises a merge: the coalesced lesion goes to the lower track, the other is merged into it', () => {
    // 15 mm lesions at x = 0 and x = 20 become one 36 mm lesion at x = 11. Assignment pairs it with
    // the nearer, B; A is unpaired, within the gate, and the lesion overlaps both old extents.
    const { rows, tracks } = table([
      visit('v1', [['L1', 0, 0, 15], ['L2', 20, 0, 15]]),
      visit('v2', [['L1', 11, 0, 36]]),
      visit('v3', [['L1', 10, 0, 30]]),
    ]);
    expect(rows).toEqual({ A: ['L1', 'L1', 'L1'], B: ['L2', 'merged:A', 'merged:A'] });
    expect(tracks[0].visits[1]!.how).toBe('coalesced');
  });

  it('respects reader overrides, also when tracks are recomputed', () => {
    const v1 = visit('v1', [['L1', 0, 0, 20], ['L2', 30, 0, 20]]);
    const v2 = visit('v2', [['L1', 0, 0, 20], ['L2', 30, 0, 20]]);
    expect(table([v1, v2]).rows).toEqual({ A: ['L1', 'L1'], B: ['L2', 'L2'] });
    // The reader says the automatic links are crossed.
    const swap: Override[] = [
      { kind: 'link', visit: 'v2', lesion: 'L1', track: 'B' },
      { kind: 'link', visit: 'v2', lesion: 'L2', track: 'v1:L1' },
    ];
    const first = table([v1, v2], swap);
    expect(first.rows).toEqual({ A: ['L1', 'L2'], B: ['L2', 'L1'] });
    expect(first.tracks[0].visits[1]!.how).toBe('override');
    // Recomputing with a third visit keeps the reader's links and follows each track on from where
    // the reader put it (A was L2 at x = 30 at v2, so it continues with v3's L2 at x = 31).
    const v3 = visit('v3', [['L1', 1, 0, 18], ['L2', 31, 0, 18]]);
    expect(table([v1, v2, v3], swap).rows).toEqual({ A: ['L1', 'L2', 'L2'], B: ['L2', 'L1', 'L1'] });
    // "This is new": L1 at v2 starts its own track; A is then gone.
    expect(table([v1, v2], [{ kind: 'new', visit: 'v2', lesion: 'L1' }]).rows).toEqual({ A: ['L1', 'gone'], B: ['L2', 'L2'], C: ['-', 'L1'] });
    // Unlink from one track only: L1 may not be A; with B taken it starts its own track.
    expect(table([v1, v2], [{ kind: 'unlink', visit: 'v2', lesion: 'L1', track: 'A' }]).rows).toEqual({ A: ['L1', 'gone'], B: ['L2', 'L2'], C: ['-', 'L1'] });
    // Two links to one track make fragments.
    expect(table([v1, v2], [{ kind: 'link', visit: 'v2', lesion: 'L1', track: 'A' }, { kind: 'link', visit: 'v2', lesion: 'L2', track: 'A' }]).rows.A).toEqual(['L1', 'L1+L2']);
    // A correction stored when tracks were numbered ("T2") still names the same track.
    expect(table([v1, v2], [{ kind: 'link', visit: 'v2', lesion: 'L1', track: 'T2' }, { kind: 'link', visit: 'v2', lesion: 'L2', track: 'T1' }]).rows).toEqual(first.rows);
  });

  it('warns about, and ignores, overrides naming what is not there', () => {
    const v1 = visit('v1', [['L1', 0, 0, 20]]);
    const v2 = visit('v2', [['L1', 0, 0, 20]]);
    const { rows, warnings } = table([v1, v2], [
      { kind: 'link', visit: 'v2', lesion: 'L5', track: 'A' },
      { kind: 'new', visit: 'v9', lesion: 'L1' },
    ]);
    expect(rows).toEqual({ A: ['L1', 'L1'] });
    expect(warnings).toHaveLength(2);
  });
});
