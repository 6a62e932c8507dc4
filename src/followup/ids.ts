/**
 * Natural order for lesion and track ids, so L2 comes before L10 and T9 before T10; ties fall back
 * to plain string order to stay total and deterministic.
 */
export function compareIds(a: string, b: string): number {
  const pa = a.match(/\d+|\D+/g) ?? [];
  const pb = b.match(/\d+|\D+/g) ?? [];
  for (let n = 0; n < Math.min(pa.length, pb.length); n++) {
    const x = pa[n], y = pb[n];
    const dx = /^\d/.test(x), dy = /^\d/.test(y);
    if (dx && dy) {
      const d = Number(x) - Number(y);
      if (d !== 0) return d;
    } else if (x !== y) return x < y ? -1 : 1;
  }
  if (pa.length !== pb.length) return pa.length - pb.length;
  return a < b ? -1 : a > b ? 1 : 0;
}
