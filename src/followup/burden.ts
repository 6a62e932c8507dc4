import { roundTo } from '../rounding.js';
import { SEGMENT_NAMES, type SegmentName } from '../segments/segment-map.js';
import { round1 } from './recist.js';

/**
 * Tumour burden per Couinaud segment per visit, straight from each visit's lesions (not from the
 * tracks, so a split or merge never changes what was seen). Every segment that holds a lesion at
 * any visit gets a row at every visit, zeros included, so a chart of a segment over time has no
 * gaps. Lesions outside every segment are gathered under segment null.
 *
 * Count and sum of diameters go by the segment holding each lesion's centroid (as RECIST measures a
 * lesion whole). The volume is the tumour lying in the segment: each lesion's volume shared out by its
 * segment fractions, the same voxels the remnant's volumetry counts, so one segment's tumour volume is
 * one number on every screen. A lesion's part outside every segment goes to the null row when there is one.
 */
export interface BurdenRow {
  visit: string;
  segment: SegmentName | null;
  count: number;
  sumLongestAxialMm: number;
  /** Tumour volume lying in the segment; null when a manual mark without a volume contributes. */
  volumeMl: number | null;
}

export interface BurdenLesion {
  segment: SegmentName | null;
  longestAxialMm: number;
  volumeMl: number | null;
  /** Share of the lesion's voxels in each segment; absent for a mark (wholly in its centroid's segment). */
  segmentFractions?: Partial<Record<SegmentName, number>>;
}

/** The lesion's share in `segment` (null: the part outside every segment). */
function shareIn(l: BurdenLesion, segment: SegmentName | null): number {
  const f = l.segmentFractions;
  if (!f || Object.keys(f).length === 0) return l.segment === segment ? 1 : 0;
  if (segment !== null) return f[segment] ?? 0;
  return Math.max(0, 1 - Object.values(f).reduce<number>((a, x) => a + (x ?? 0), 0));
}

export function burdenBySegment(visits: readonly { id: string; lesions: readonly BurdenLesion[] }[]): BurdenRow[] {
  const used = new Set<SegmentName | null>();
  for (const v of visits) {
    for (const l of v.lesions) {
      used.add(l.segment);
      for (const [s, x] of Object.entries(l.segmentFractions ?? {})) if ((x ?? 0) > 0) used.add(s as SegmentName);
    }
  }
  const order: (SegmentName | null)[] = [...SEGMENT_NAMES.filter((s) => used.has(s)), ...(used.has(null) ? [null] : [])];
  const rows: BurdenRow[] = [];
  for (const v of visits) {
    for (const segment of order) {
      let count = 0, sum = 0, volume: number | null = 0;
      for (const l of v.lesions) {
        if (l.segment === segment) {
          count++;
          sum += l.longestAxialMm;
        }
        const share = shareIn(l, segment);
        if (share > 0) volume = volume === null || l.volumeMl === null ? null : volume + share * l.volumeMl;
      }
      rows.push({ visit: v.id, segment, count, sumLongestAxialMm: round1(sum), volumeMl: volume === null ? null : roundTo(volume, 2) });
    }
  }
  return rows;
}
