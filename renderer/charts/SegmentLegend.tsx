import type { SegmentName } from '../../src/segments/segment-map';
import { SegmentMark } from './SegmentMark';
import { needsOutline, OUTLINE_INK, segmentColour, segmentDash } from './segment-style';
import { segmentRank } from './chart-data';

/** A line sample in a segment's colour and dash. */
export function SegmentSwatch({ segment }: { segment: SegmentName | null }) {
  const colour = segmentColour(segment);
  return (
    <svg className="swatch" width="30" height="12" viewBox="0 0 26 10" aria-hidden="true">
      {needsOutline(segment) && <line x1="1" y1="5" x2="25" y2="5" stroke={OUTLINE_INK} strokeWidth="4" />}
      <line x1="1" y1="5" x2="25" y2="5" stroke={colour} strokeWidth="2.4" strokeDasharray={segmentDash(segment)} />
      <SegmentMark segment={segment} cx={13} cy={5} r={3.6} fill={colour} stroke={needsOutline(segment) ? OUTLINE_INK : '#fff'} strokeWidth={1} />
    </svg>
  );
}

/** Which colour is which segment, and what is drawn in it, in Couinaud order. */
export function SegmentLegend({ entries }: { entries: { segment: SegmentName | null; label?: string }[] }) {
  const groups = new Map<SegmentName | null, string[]>();
  for (const e of entries) {
    const list = groups.get(e.segment) ?? [];
    if (e.label) list.push(e.label);
    groups.set(e.segment, list);
  }
  const ordered = [...groups.entries()].sort((a, b) => segmentRank(a[0]) - segmentRank(b[0]));
  return (
    <ul className="segment-legend" aria-label="Segments">
      {ordered.map(([segment, labels]) => (
        <li key={segment ?? 'outside'}>
          <SegmentSwatch segment={segment} />
          <span className="segment-name">{segment ? `Segment ${segment}` : 'Outside the segment map'}</span>
          {labels.length > 0 && <span className="segment-items">{labels.join(', ')}</span>}
        </li>
      ))}
    </ul>
  );
}
