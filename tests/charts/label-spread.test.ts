import { describe, expect, it } from 'vitest';
import { spreadLabels } from '../../renderer/charts/label-spread.js';

// Expected positions worked by hand: a crowded group is spaced by the gap and centred on the mean of
// its wanted positions less each label's offset in the group (the least-squares placement).
describe('line-end labels spread apart', () => {
  it('leaves labels alone when they are far enough apart', () => {
    expect(spreadLabels([10, 40, 25], 12, 0, 100)).toEqual([10, 40, 25]);
  });

  it('centres two colliding labels on their wanted mean, the gap apart, order kept', () => {
    // Wanted 50 and 54, gap 12: start = ((50 − 0) + (54 − 12)) / 2 = 46 → 46 and 58.
    expect(spreadLabels([54, 50], 12, 0, 100)).toEqual([58, 46]);
    // Equal wishes keep input order top to bottom.
    expect(spreadLabels([30, 30, 30], 10, 0, 100)).toEqual([20, 30, 40]);
  });

  it('merges a block that a later label pushes into, and keeps every pair at least the gap apart', () => {
    // 10, 18 collide (block at 8, 20); 26 then collides with 20: block of three, start
    // ((10) + (18 − 10) + (26 − 20)) / 3 = 8 → 8, 18, 28.
    expect(spreadLabels([10, 18, 26], 10, 0, 100)).toEqual([8, 18, 28]);
    const ys = spreadLabels([5, 6, 7, 60, 61, 90], 11, 0, 100);
    const sorted = [...ys].sort((a, b) => a - b);
    for (let n = 1; n < sorted.length; n++) expect(sorted[n] - sorted[n - 1]).toBeGreaterThanOrEqual(11 - 1e-9);
  });

  it('slides a block back inside the plot', () => {
    // Wanted 0 and 1 with the top at 5: the block starts at the top.
    expect(spreadLabels([0, 1], 12, 5, 100)).toEqual([5, 17]);
    // Wanted 99 and 100 with the bottom at 100: the block ends at the bottom.
    expect(spreadLabels([99, 100], 12, 0, 100)).toEqual([88, 100]);
  });
});
