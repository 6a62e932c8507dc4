import type { ResponseProtocol } from './protocol.js';
import type { OverallCategory } from './recist.js';

/**
 * Best overall response across the visits (RECIST 1.1 sections 4.4.3 and 4.6, tables 1–3; section
 * numbers from memory). Only visits up to the first progression count.
 *
 * - Without confirmation the best time-point response is taken (CR, then PR, then SD or
 *   non-CR/non-PD), SD only at or after the protocol's minimum interval from baseline.
 * - With confirmation (`confirmResponse`), a CR needs a later CR, and a PR a later PR or CR, at least
 *   `confirmationMinDays` apart (table 3: CR then PR is a confirmed PR). An unconfirmed CR or PR
 *   counts as SD when the SD interval is met, and is reported as `unconfirmed`.
 * - Nothing qualifying: PD when the series progresses, else NE.
 * - The date of progression is that of the first PD visit; when a new lesion that was equivocal at
 *   first is later confirmed, progression dates from its first detection (section 4.3.5).
 */

export interface TimePoint {
  visit: string;
  /** ISO date. */
  date: string;
  /** Overall response at the visit; null at baseline. */
  category: OverallCategory | null;
  /** For a PD visit made PD by a confirmed, once equivocal new lesion: the visit that first showed it. */
  progressionFrom?: { visit: string; date: string };
}

export type BestCategory = 'CR' | 'PR' | 'SD' | 'non-CR/non-PD' | 'PD' | 'NE';

export interface BestResponse {
  category: BestCategory;
  /** Visit where the best response was reached (the first such); null for NE. */
  visit: string | null;
  confirmationRequired: boolean;
  /** With confirmation required: the best CR or PR that was not confirmed (counted as SD or less), else null. */
  unconfirmed: 'CR' | 'PR' | null;
  /** The visit that confirmed the response, when confirmation was required and met. */
  confirmedBy: string | null;
  /** Date of progression and the visit that showed it; null while there is none. */
  progression: { visit: string; date: string } | null;
}

const DAY_MS = 86_400_000;
const days = (from: string, to: string) => Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / DAY_MS);

export function bestOverallResponse(points: readonly TimePoint[], protocol: ResponseProtocol): BestResponse {
  const confirmationRequired = protocol.confirmResponse;
  const none: BestResponse = { category: 'NE', visit: null, confirmationRequired, unconfirmed: null, confirmedBy: null, progression: null };
  if (points.length < 2) return none;
  const baseline = points[0].date;
  const after = points.slice(1);
  const pdAt = after.findIndex((p) => p.category === 'PD');
  const progression = pdAt < 0 ? null : (after[pdAt].progressionFrom ?? { visit: after[pdAt].visit, date: after[pdAt].date });
  // Time points on or after the date of progression do not count towards a response.
  const counted = after.filter((p, n) => (pdAt < 0 || n < pdAt) && (progression === null || p.date < progression.date));
  const sdMet = (p: TimePoint) => days(baseline, p.date) >= protocol.sdMinDays;

  let best: { category: BestCategory; visit: string; by: string | null } | null = null;
  let unconfirmed: 'CR' | 'PR' | null = null;
  const rank: Record<BestCategory, number> = { CR: 5, PR: 4, SD: 3, 'non-CR/non-PD': 3, PD: 1, NE: 0 };
  const offer = (category: BestCategory, visit: string, by: string | null) => {
    if (best === null || rank[category] > rank[best.category]) best = { category, visit, by };
  };
  counted.forEach((p, n) => {
    const c = p.category;
    if (c === 'CR' || c === 'PR') {
      if (!confirmationRequired) return offer(c, p.visit, null);
      const later = counted.slice(n + 1).filter((q) => days(p.date, q.date) >= protocol.confirmationMinDays);
      const byCr = later.find((q) => q.category === 'CR');
      const byPr = later.find((q) => q.category === 'CR' || q.category === 'PR');
      if (c === 'CR' && byCr) return offer('CR', p.visit, byCr.visit);
      if (unconfirmed === null || (unconfirmed === 'PR' && c === 'CR')) unconfirmed = c;
      if (byPr) return offer('PR', p.visit, byPr.visit);
      if (sdMet(p)) offer('SD', p.visit, null);
      return;
    }
    if ((c === 'SD' || c === 'non-CR/non-PD') && sdMet(p)) offer(c, p.visit, null);
  });
  const b = best as { category: BestCategory; visit: string; by: string | null } | null;
  if (b !== null && (b.category === 'CR' || b.category === 'PR')) unconfirmed = unconfirmed === 'CR' && b.category === 'PR' ? 'CR' : null;
  if (b) return { category: b.category, visit: b.visit, confirmationRequired, unconfirmed, confirmedBy: b.by, progression };
  if (progression) return { ...none, category: 'PD', visit: progression.visit, unconfirmed, progression };
  return { ...none, unconfirmed };
}

/** One line for screens and reports: "PR (confirmed at v3); progression 2026-05-04 (v3)". */
export function bestResponseText(b: BestResponse): string {
  let text: string = b.category;
  if (b.confirmedBy) text += ` (confirmed at ${b.confirmedBy})`;
  else if (b.confirmationRequired && (b.category === 'CR' || b.category === 'PR')) text += ' (confirmation pending)';
  if (b.unconfirmed) text += `; unconfirmed ${b.unconfirmed}`;
  text += b.progression ? `; progression ${b.progression.date} (${b.progression.visit})` : '; no progression';
  return text;
}
