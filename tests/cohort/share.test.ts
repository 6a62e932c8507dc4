import { describe, expect, it } from 'vitest';
import { parseShard, shardOf, shareOf } from '../../src/cohort/share.js';

// The shard arithmetic of `--shard K/N` (docs/formats.md, batch): K from 0 to N−1, as Slurm's
// $SLURM_ARRAY_TASK_ID runs with --array=0-(N-1) (sbatch manual, --array, common practice).

describe('parseShard', () => {
  it('takes K/N with K from 0 to N-1', () => {
    expect(parseShard('0/4')).toEqual({ index: 0, count: 4 });
    expect(parseShard('3/4')).toEqual({ index: 3, count: 4 });
    expect(parseShard('0/1')).toEqual({ index: 0, count: 1 });
  });
  it('refuses K >= N, N = 0 and anything not K/N, saying why', () => {
    expect(parseShard('4/4')).toEqual({ problem: '--shard 4/4: K runs from 0 to N-1 (3)' });
    expect(parseShard('0/0')).toEqual({ problem: '--shard 0/0: N must be at least 1' });
    for (const bad of ['1', '-1/4', '1/4/2', 'a/b', '1.5/4', '']) expect(parseShard(bad)).toHaveProperty('problem');
  });
});

describe('shareOf', () => {
  const paths = Array.from({ length: 200 }, (_, n) => `site-${n % 3}/P-${String(n).padStart(4, '0')}/manifest.json`);

  it('splits a cohort into N disjoint shares that together hold every patient once', () => {
    for (const count of [1, 2, 3, 7]) {
      const shares = Array.from({ length: count }, (_, index) => shareOf(paths, { index, count }));
      expect(shares.flat().sort()).toEqual([...paths].sort());
      // Each share is a fair part on average: none empty, none more than twice the mean, for 200 patients.
      for (const s of shares) expect(s.length).toBeGreaterThan(0);
      for (const s of shares) expect(s.length).toBeLessThan((2 * paths.length) / count + 1);
    }
  });

  it("gives a patient the same shard whatever other patients the cohort holds", () => {
    const fewer = paths.filter((_, n) => n % 5 !== 0);
    for (const p of fewer) expect(shareOf(fewer, { index: shardOf(p, 4), count: 4 })).toContain(p);
    expect(paths.map((p) => shardOf(p, 4))).toEqual(paths.map((p) => shardOf(p, 4)));
  });
});
