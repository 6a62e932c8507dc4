import { WHOLE_SEGMENTS, type SegmentName, type WholeSegment } from '../segments/segment-map.js';

export interface ResectionPreset {
  readonly id: string;
  readonly name: string;
  /** Other names the terminology accepts for the same operation. */
  readonly alsoCalled: readonly string[];
  /** 'IV' stands for IVa and IVb on a split map. */
  readonly removes: readonly WholeSegment[];
}

/**
 * Named resections of the Brisbane 2000 terminology: Strasberg SM et al., The Brisbane 2000
 * terminology of liver anatomy and resections, HPB 2000;2:333-339. The segment sets follow its
 * first-, second- and third-order divisions (hemiliver, section, segment) and its extended
 * resections; the alternative names are recalled from that paper, from memory.
 *
 * Segment I is in none of the hemiliver, sectional or extended presets: the terminology asks the
 * surgeon to state "plus segment I" separately, so such a variant is chosen by adding I by hand.
 */
export const RESECTION_PRESETS: readonly ResectionPreset[] = [
  { id: 'right-hemihepatectomy', name: 'Right hemihepatectomy', alsoCalled: ['Right hepatectomy'], removes: ['V', 'VI', 'VII', 'VIII'] },
  { id: 'left-hemihepatectomy', name: 'Left hemihepatectomy', alsoCalled: ['Left hepatectomy'], removes: ['II', 'III', 'IV'] },
  { id: 'right-anterior-sectionectomy', name: 'Right anterior sectionectomy', alsoCalled: [], removes: ['V', 'VIII'] },
  { id: 'right-posterior-sectionectomy', name: 'Right posterior sectionectomy', alsoCalled: [], removes: ['VI', 'VII'] },
  // The terminology's left medial section is segment IV alone.
  { id: 'left-medial-sectionectomy', name: 'Left medial sectionectomy', alsoCalled: ['Resection of segment 4', 'Segmentectomy 4'], removes: ['IV'] },
  { id: 'left-lateral-sectionectomy', name: 'Left lateral sectionectomy', alsoCalled: ['Bisegmentectomy 2,3'], removes: ['II', 'III'] },
  {
    id: 'right-trisectionectomy', name: 'Right trisectionectomy',
    alsoCalled: ['Extended right hemihepatectomy', 'Extended right hepatectomy'], removes: ['IV', 'V', 'VI', 'VII', 'VIII'],
  },
  {
    id: 'left-trisectionectomy', name: 'Left trisectionectomy',
    alsoCalled: ['Extended left hemihepatectomy', 'Extended left hepatectomy'], removes: ['II', 'III', 'IV', 'V', 'VIII'],
  },
  ...WHOLE_SEGMENTS.map(
    (s, n): ResectionPreset => ({ id: `segmentectomy-${n + 1}`, name: `Segmentectomy ${s}`, alsoCalled: [`Segmentectomy ${n + 1}`], removes: [s] }),
  ),
];

export function resectionPreset(id: string): ResectionPreset | undefined {
  return RESECTION_PRESETS.find((p) => p.id === id);
}

/**
 * The map's own segment names that removing `chosen` takes away. On a map that splits IV, 'IV'
 * means both IVa and IVb; on a map that does not, IVa or IVb alone cannot be taken (it would leave
 * part of a labelled region unaccounted), so they are reported back as not found.
 */
export function expandRemoved(
  chosen: readonly SegmentName[],
  present: readonly SegmentName[],
): { removed: SegmentName[]; notFound: SegmentName[] } {
  const have = new Set(present);
  const removed = new Set<SegmentName>();
  const notFound: SegmentName[] = [];
  for (const s of chosen) {
    const names: SegmentName[] = s === 'IV' && !have.has('IV') ? ['IVa', 'IVb'] : [s];
    const hits = names.filter((n) => have.has(n));
    if (hits.length === 0) notFound.push(s);
    for (const n of hits) removed.add(n);
  }
  return { removed: present.filter((s) => removed.has(s)), notFound: [...new Set(notFound)] };
}
