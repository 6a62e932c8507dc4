import type { FollowupResult } from '../../src/followup/followup.js';
import { compareIds } from '../../src/followup/ids.js';
import type { SegmentName } from '../../src/segments/segment-map.js';
import { belowMargin, trackOfLesion } from '../charts/chart-data.js';
import { dotRadius, regionOf, slotPosition, type Point } from './layout.js';

/** A lesion of the shown visit, placed on the diagram. */
export interface PlacedLesion {
  lesion: string;
  track: string | null;
  segment: SegmentName | null;
  longestAxialMm: number;
  marginMm: number | null;
  nearestOtherSegment: SegmentName | null;
  alert: boolean;
  /** First seen at this visit (after baseline). */
  isNew: boolean;
  at: Point;
  r: number;
}

interface VisitLesions {
  id: string;
  lesions: readonly { id: string; segment: SegmentName | null; longestAxialMm: number; marginMm: number | null; nearestOtherSegment: SegmentName | null; marginAlert: boolean }[];
}

const segmentKey = (s: SegmentName | null) => s ?? 'outside';

/**
 * Places one visit's lesions. Each segment has one slot per track that ever lies in it (over all
 * visits, in track order), so a lesion keeps its place from visit to visit; fragments of a split
 * track sit side by side on the track's slot.
 */
export function placeLesions(f: FollowupResult, visits: readonly VisitLesions[], visitId: string): PlacedLesion[] {
  const tracks = trackOfLesion(f);
  const keyOf = (visit: string, lesion: string) => tracks.get(`${visit}/${lesion}`) ?? `${visit}/${lesion}`;
  const slots = new Map<string, string[]>();
  for (const v of visits) {
    for (const l of v.lesions) {
      const list = slots.get(segmentKey(l.segment)) ?? [];
      const key = keyOf(v.id, l.id);
      if (!list.includes(key)) list.push(key);
      slots.set(segmentKey(l.segment), list);
    }
  }
  for (const list of slots.values()) list.sort(compareIds);

  const visit = visits.find((v) => v.id === visitId);
  if (!visit) return [];
  const first = f.visits[0]?.id;
  const fragmentsSeen = new Map<string, number>();
  return [...visit.lesions]
    .sort((a, b) => b.longestAxialMm - a.longestAxialMm || compareIds(a.id, b.id))
    .map((l) => {
      const key = keyOf(visit.id, l.id);
      const list = slots.get(segmentKey(l.segment)) ?? [key];
      const region = regionOf(l.segment);
      const slot = slotPosition(region.anchor, region.anchorRadius, list.indexOf(key), list.length);
      const nth = fragmentsSeen.get(`${segmentKey(l.segment)}/${key}`) ?? 0;
      fragmentsSeen.set(`${segmentKey(l.segment)}/${key}`, nth + 1);
      const r = dotRadius(l.longestAxialMm);
      const track = tracks.get(`${visit.id}/${l.id}`) ?? null;
      const summary = track ? f.tracks.find((t) => t.id === track) : undefined;
      return {
        lesion: l.id,
        track,
        segment: l.segment,
        longestAxialMm: l.longestAxialMm,
        marginMm: l.marginMm,
        nearestOtherSegment: l.nearestOtherSegment,
        alert: belowMargin(l, f.marginMm),
        isNew: summary !== undefined && visit.id !== first && summary.firstVisit === visit.id,
        at: [slot[0] + nth * (r + 4), slot[1]] as Point,
        r,
      };
    });
}
