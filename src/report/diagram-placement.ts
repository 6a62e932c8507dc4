import { isMarginAlert } from '../lesions/margin.js';
import type { FollowupResult } from '../followup/followup.js';
import { compareIds } from '../followup/ids.js';
import type { SegmentName } from '../segments/segment-map.js';
import { dotRadius, regionOf, slotPosition, type Point } from './diagram-layout.js';
import { lesionsOfTrack } from './input.js';

/** A lesion of the shown visit, placed on the segment diagram. */
export interface PlacedLesion {
  lesion: string;
  track: string | null;
  segment: SegmentName | null;
  longestAxialMm: number;
  marginMm: number | null;
  nearestOtherSegment: SegmentName | null;
  alert: boolean;
  target: boolean;
  /** First seen at this visit (after baseline). */
  isNew: boolean;
  at: Point;
  r: number;
}

/** What placement needs of a visit: an analysed visit's lesions fit as they are. */
export interface DiagramVisit {
  id: string;
  lesions: readonly {
    id: string;
    segment: SegmentName | null;
    longestAxialMm: number;
    marginMm: number | null;
    nearestOtherSegment: SegmentName | null;
  }[];
}

const segmentKey = (s: SegmentName | null) => s ?? 'outside';

/**
 * Places one visit's lesions. Each segment has one slot per track that ever lies in it (over all
 * visits, in track order), so a lesion keeps its place from visit to visit and from screen to page;
 * fragments of a split track sit side by side on the track's slot. A lesion is ringed when its own
 * margin is under the follow-up's, the rule the follow-up and the alert list use.
 */
export function placeLesions(f: FollowupResult, visits: readonly DiagramVisit[], visitId: string): PlacedLesion[] {
  const trackOf = new Map<string, string>();
  for (const t of f.tracks) for (const v of visits) for (const id of lesionsOfTrack(t, v.id)) trackOf.set(`${v.id}/${id}`, t.id);
  const keyOf = (visit: string, lesion: string) => trackOf.get(`${visit}/${lesion}`) ?? `${visit}/${lesion}`;

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
  const baseline = f.visits[0]?.id;
  const fragmentsSeen = new Map<string, number>();
  return [...visit.lesions]
    .sort((a, b) => b.longestAxialMm - a.longestAxialMm || compareIds(a.id, b.id))
    .map((l) => {
      const key = keyOf(visit.id, l.id);
      const list = slots.get(segmentKey(l.segment)) ?? [key];
      const region = regionOf(l.segment);
      const slot = slotPosition(region.anchor, region.anchorRadius, list.indexOf(key), list.length);
      const fragment = `${segmentKey(l.segment)}/${key}`;
      const nth = fragmentsSeen.get(fragment) ?? 0;
      fragmentsSeen.set(fragment, nth + 1);
      const r = dotRadius(l.longestAxialMm);
      const track = trackOf.get(`${visit.id}/${l.id}`) ?? null;
      const summary = track === null ? undefined : f.tracks.find((t) => t.id === track);
      return {
        lesion: l.id,
        track,
        segment: l.segment,
        longestAxialMm: l.longestAxialMm,
        marginMm: l.marginMm,
        nearestOtherSegment: l.nearestOtherSegment,
        alert: isMarginAlert(l.marginMm, f.marginMm),
        target: summary?.target ?? false,
        isNew: summary !== undefined && visit.id !== baseline && summary.firstVisit === visit.id,
        at: [slot[0] + nth * (r + 4), slot[1]] as Point,
        r,
      };
    });
}
