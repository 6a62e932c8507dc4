/**
 * Labels in one column (the ends of lines at one date) moved apart vertically so no two overlap,
 * each as near its own point as the others allow.
 *
 * Labels keep their top-to-bottom order. Where wanted positions crowd, neighbours form a block
 * spaced `gapPx` apart, centred on the mean of what its labels want (the least total squared
 * move for a block); blocks that then touch merge, and a block is slid back inside [top, bottom].
 */
export function spreadLabels(wantedPx: readonly number[], gapPx: number, topPx: number, bottomPx: number): number[] {
  const order = wantedPx.map((_, n) => n).sort((a, b) => wantedPx[a] - wantedPx[b] || a - b);
  interface Block { first: number; count: number; sum: number; start: number }
  const blocks: Block[] = [];
  const span = (b: Block) => (b.count - 1) * gapPx;
  const place = (b: Block) => {
    // Mean of (wanted − offset in the block): the block's best start; then kept within the bounds.
    const best = b.sum / b.count;
    b.start = Math.min(Math.max(best, topPx), Math.max(topPx, bottomPx - span(b)));
  };
  order.forEach((n, rank) => {
    const block: Block = { first: rank, count: 1, sum: wantedPx[n], start: wantedPx[n] };
    place(block);
    blocks.push(block);
    // Merge while the last block overlaps the one before it.
    while (blocks.length > 1) {
      const b = blocks[blocks.length - 1], a = blocks[blocks.length - 2];
      if (a.start + span(a) + gapPx <= b.start) break;
      // Each label of b sits a.count places further down in the merged block.
      a.sum += b.sum - b.count * a.count * gapPx;
      a.count += b.count;
      blocks.pop();
      place(a);
    }
  });
  const out = new Array<number>(wantedPx.length);
  for (const b of blocks) for (let k = 0; k < b.count; k++) out[order[b.first + k]] = b.start + k * gapPx;
  return out;
}
