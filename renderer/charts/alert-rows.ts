import type { FollowupResult } from '../../src/followup/followup.js';
import type { SegmentName } from '../../src/segments/segment-map.js';
import type { LesionResult } from '../../src/visit/analyze.js';
import { belowMargin, trackOfLesion } from './chart-data.js';

/** One lesion below the set margin at one visit: what the margin-alert list shows. */
export interface AlertRow {
  visit: string;
  date: string;
  lesion: string;
  track: string | null;
  /** Whether the lesion's track is a RECIST target: said beside the track id, never by it. */
  target: boolean;
  segment: SegmentName | null;
  nearestOtherSegment: SegmentName | null;
  marginMm: number | null;
  longestAxialMm: number;
  /** Viable (enhancing) diameter where the visit gives viable measures; null when not given. */
  viableAxialMm: number | null;
}

/** Every lesion below the margin, latest visit first, then by distance (closest first). */
export function alertRows(f: FollowupResult, visits: readonly { id: string; date: string; analysis: { lesions: readonly LesionResult[] } }[]): AlertRow[] {
  const tracks = trackOfLesion(f);
  const targets = new Set(f.tracks.filter((t) => t.target).map((t) => t.id));
  const rows: AlertRow[] = [];
  for (const v of visits) {
    for (const l of v.analysis.lesions) {
      if (!belowMargin(l, f.marginMm)) continue;
      rows.push({
        visit: v.id, date: v.date, lesion: l.id, track: tracks.get(`${v.id}/${l.id}`) ?? null,
        target: targets.has(tracks.get(`${v.id}/${l.id}`) ?? ''), segment: l.segment,
        nearestOtherSegment: l.nearestOtherSegment, marginMm: l.marginMm, longestAxialMm: l.longestAxialMm,
        viableAxialMm: f.visits.find((x) => x.id === v.id)?.viableAxialMm?.[l.id] ?? null,
      });
    }
  }
  return rows.sort((a, b) => b.date.localeCompare(a.date) || (a.marginMm ?? Infinity) - (b.marginMm ?? Infinity) || a.lesion.localeCompare(b.lesion));
}
