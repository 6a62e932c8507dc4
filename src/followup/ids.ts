/**
 * Natural order for lesion ids, so L2 comes before L10; ties fall back to plain string order to stay
 * total and deterministic.
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

/**
 * Lesion track ids are letters counted like spreadsheet columns: A … Z, AA, AB, … Letters, not
 * "T1, T2", because a numbered "T" reads as "target 1" on a case form and as an MR sequence (T1, T2);
 * whether a track is a target is said separately, never by its id.
 */
const TRACK_ID = /^[A-Z]+$/;

/** The id of the track at 0-based index n: 0 → A, 25 → Z, 26 → AA, 701 → ZZ, 702 → AAA. */
export function trackId(n: number): string {
  if (!Number.isInteger(n) || n < 0) throw new RangeError(`track index ${n} is not a whole number ≥ 0`);
  let id = '';
  for (let k = n + 1; k > 0; k = Math.floor((k - 1) / 26)) id = String.fromCharCode(65 + ((k - 1) % 26)) + id;
  return id;
}

/** The 0-based index of a track id, or null when the text is no track id. */
export function trackIndex(id: string): number | null {
  if (!TRACK_ID.test(id)) return null;
  let k = 0;
  for (const c of id) k = k * 26 + (c.charCodeAt(0) - 64);
  return k - 1;
}

export function isTrackId(id: string): boolean {
  return TRACK_ID.test(id);
}

/** Track order A < B < … < Z < AA (shorter first, then alphabetical); anything else after, in natural order. */
export function compareTrackIds(a: string, b: string): number {
  const x = trackIndex(a), y = trackIndex(b);
  if (x !== null && y !== null) return x - y;
  if (x !== null) return -1;
  if (y !== null) return 1;
  return compareIds(a, b);
}

/**
 * Track ids were once numbered "T1", "T2", …; a manifest, stored record or backup written then still
 * names tracks so. The number maps one to one onto the letters (T1 → A, T27 → AA); any other text is
 * returned unchanged ("v1:L2", or a current id).
 */
export function currentTrackRef(ref: string): string {
  const m = /^T([1-9]\d{0,5})$/.exec(ref);
  return m ? trackId(Number(m[1]) - 1) : ref;
}
