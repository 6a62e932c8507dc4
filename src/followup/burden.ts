import { roundTo } from '../rounding.js';
import { SEGMENT_NAMES, type SegmentName } from '../segments/segment-map.js';
import { round1 } from './recist.js';

/**
 * Tumour burden per Couinaud segment per visit, straight from each visit's lesions (not from the
 * tracks, so a split or merge never changes what was seen). Every segment that holds a lesion at
 * any visit gets a row at every visit, zeros included, so a chart of a segment over time has no
 * gaps. Lesions outside every segment are gathered under segment null.
 */
export interface BurdenRow {
  visit: string;
  segment: SegmentName | null;
  count: number;
  sumLongestAxialMm: number;
  /** Sum of lesion volumes; null when any lesion there is a manual mark without a volume. */
  volumeMl: number | null;
}

export interface BurdenLesion {
  segment: SegmentName | null;
  longestAxialMm: number;
  volumeMl: number | null;
}

export function burdenBySegment(visits: readonly { id: string; lesions: readonly BurdenLesion[] }[]): BurdenRow[] {
  const used = new Set<SegmentName | null>();
  for (const v of visits) for (const l of v.lesions) used.add(l.segment);
  const order: (SegmentName | null)[] = [...SEGMENT_NAMES.filter((s) => used.has(s)), ...(used.has(null) ? [null] : [])];
  const rows: BurdenRow[] = [];
  for (const v of visits) {
    for (const segment of order) {
      let count = 0, sum = 0, volume: number | null = 0;
      for (const l of v.lesions) {
        if (l.segment !== segment) continue;
        count++;
        sum += l.longestAxialMm;
        volume = volume === null || l.volumeMl === null ? null : volume + l.volumeMl;
      }
      rows.push({ visit: v.id, segment, count, sumLongestAxialMm: round1(sum), volumeMl: volume === null ? null : roundTo(volume, 2) });
    }
  }
  return rows;
}
