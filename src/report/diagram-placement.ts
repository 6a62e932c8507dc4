import { isMarginAlert } from '../lesions/margin.js';
import type { FollowupResult } from '../followup/followup.js';
import { compareIds, compareTrackIds } from '../followup/ids.js';
import type { SegmentName } from '../segments/segment-map.js';
import { borderBetween, dotRadius, regionOf, slotPosition, type Point } from './diagram-layout.js';
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
  /** Share of the lesion in each segment it touches, largest first; one entry when it lies in one segment. */
  shares: { segment: SegmentName; share: number }[];
  /** The border it is drawn on when it crosses one: its centroid's segment and the one it reaches most into. */
  crossing: [SegmentName, SegmentName] | null;
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
    segmentFractions?: Partial<Record<SegmentName, number>>;
  }[];
}

type DiagramLesion = DiagramVisit['lesions'][number];

/** Shares by segment, largest first (anatomical order on a tie); a mark lies wholly in its segment. */
function sharesOf(l: DiagramLesion): { segment: SegmentName; share: number }[] {
  const parts = Object.entries(l.segmentFractions ?? {})
    .filter(([, x]) => (x ?? 0) > 0)
    .map(([segment, share]) => ({ segment: segment as SegmentName, share: share ?? 0 }));
  if (parts.length === 0) return l.segment === null ? [] : [{ segment: l.segment, share: 1 }];
  return parts.sort((a, b) => b.share - a.share || compareIds(a.segment, b.segment));
}

/** The border a lesion is drawn on: its centroid's segment and the other segment holding most of the rest. */
function crossingOf(l: DiagramLesion): [SegmentName, SegmentName] | null {
  if (l.segment === null) return null;
  const other = sharesOf(l).find((x) => x.segment !== l.segment);
  return other && borderBetween(l.segment, other.segment) ? [l.segment, other.segment] : null;
}

/** Slot key: a segment, or a border as its two segments in a fixed order. */
const placeKey = (l: DiagramLesion) => {
  const c = crossingOf(l);
  return c ? [...c].sort(compareIds).join('|') : segmentKey(l.segment);
};

const segmentKey = (s: SegmentName | null) => s ?? 'outside';

/**
 * Places one visit's lesions. Each segment has one slot per track that ever lies in it (over all
 * visits, in track order), so a lesion keeps its place from visit to visit and from screen to page;
 * fragments of a split track sit side by side on the track's slot. A lesion is ringed when its own
 * margin is under the follow-up's, the rule the follow-up and the alert list use. A lesion with parts in
 * two segments is drawn on the border between them (its slots spread along it), with its shares.
 */
export function placeLesions(f: FollowupResult, visits: readonly DiagramVisit[], visitId: string): PlacedLesion[] {
  const trackOf = new Map<string, string>();
  for (const t of f.tracks) for (const v of visits) for (const id of lesionsOfTrack(t, v.id)) trackOf.set(`${v.id}/${id}`, t.id);
  const keyOf = (visit: string, lesion: string) => trackOf.get(`${visit}/${lesion}`) ?? `${visit}/${lesion}`;

  const slots = new Map<string, string[]>();
  for (const v of visits) {
    for (const l of v.lesions) {
      const list = slots.get(placeKey(l)) ?? [];
      const key = keyOf(v.id, l.id);
      if (!list.includes(key)) list.push(key);
      slots.set(placeKey(l), list);
    }
  }
  for (const list of slots.values()) list.sort(compareTrackIds);

  const visit = visits.find((v) => v.id === visitId);
  if (!visit) return [];
  const baseline = f.visits[0]?.id;
  const fragmentsSeen = new Map<string, number>();
  return [...visit.lesions]
    .sort((a, b) => b.longestAxialMm - a.longestAxialMm || compareIds(a.id, b.id))
    .map((l) => {
      const key = keyOf(visit.id, l.id);
      const list = slots.get(placeKey(l)) ?? [key];
      const crossing = crossingOf(l);
      const region = regionOf(l.segment);
      const slot = crossing
        ? borderSlot(borderBetween(crossing[0], crossing[1])!, list.indexOf(key), list.length)
        : slotPosition(region.anchor, region.anchorRadius, list.indexOf(key), list.length);
      const fragment = `${placeKey(l)}/${key}`;
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
        shares: sharesOf(l),
        crossing,
        at: [slot[0] + nth * (r + 4), slot[1]] as Point,
        r,
      };
    });
}

/** Slot `k` of `n` along a border: evenly spread over its middle, clear of the outline at its ends. */
function borderSlot([a, b]: readonly [Point, Point], k: number, n: number): Point {
  const t = n <= 1 ? 0.5 : 0.3 + (0.4 * k) / (n - 1);
  return [a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])];
}
