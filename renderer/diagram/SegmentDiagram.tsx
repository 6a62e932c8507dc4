import type { SegmentName } from '../../src/segments/segment-map';
import { needsOutline, OUTLINE_INK, segmentColour } from '../charts/segment-style';
import {
  CAUDATE, dotRadius, lineX, MIDDLE_HEPATIC_VEIN, OUTLINE_PATH, OUTSIDE_BOX, PORTAL_Y, PX_PER_MM, REGIONS, RIGHT_HEPATIC_VEIN, UMBILICAL_FISSURE,
  VIEW_HEIGHT, VIEW_WIDTH, type Point,
} from './layout';
import type { PlacedLesion } from './placement';

const INK = '#1d2327';
const LINE = '#4d5a62';
const ALERT = '#8a3b00';

const polygonPoints = (ps: readonly Point[]) => ps.map((p) => p.join(',')).join(' ');

/** Segment regions of the map: IV whole or split, as the visit's segment map has it. */
function shownRegions(segments: readonly SegmentName[]): Exclude<SegmentName, 'I'>[] {
  const split = segments.includes('IVa') || segments.includes('IVb');
  return ['II', 'III', ...(split ? (['IVa', 'IVb'] as const) : (['IV'] as const)), 'V', 'VI', 'VII', 'VIII'];
}

/**
 * Our schematic of the liver's segments with one visit's lesions as dots sized by their longest
 * axial diameter. Segments absent from the visit's segment map are drawn unfilled.
 */
export function SegmentDiagram(props: { segments: readonly SegmentName[]; lesions: readonly PlacedLesion[]; caption: string }) {
  const mapped = new Set(props.segments);
  const regions = shownRegions(props.segments);
  const split = regions.includes('IVa');
  const divider = (line: [Point, Point], key: string) => (
    <line key={key} x1={line[0][0]} y1={line[0][1]} x2={line[1][0]} y2={line[1][1]} stroke={LINE} strokeWidth={1.4} />
  );
  const portalLeft = 0, portalRight = VIEW_WIDTH;
  const hasOutside = props.lesions.some((l) => l.segment === null);
  return (
    <svg
      className="segment-diagram"
      viewBox={`0 0 ${VIEW_WIDTH} ${VIEW_HEIGHT}`}
      role="img"
      aria-label={props.caption}
      data-testid="segment-diagram"
    >
      <defs>
        <clipPath id="liver-outline"><path d={OUTLINE_PATH} /></clipPath>
      </defs>
      <g clipPath="url(#liver-outline)">
        <rect x="0" y="0" width={VIEW_WIDTH} height={VIEW_HEIGHT} fill="#fbfbfa" />
        {regions.map((s) => (
          <polygon
            key={s}
            points={polygonPoints(REGIONS[s].polygon)}
            fill={mapped.has(s) ? segmentColour(s) : 'none'}
            fillOpacity={0.13}
            data-segment-region={s}
          />
        ))}
        {divider(RIGHT_HEPATIC_VEIN, 'rhv')}
        {divider(MIDDLE_HEPATIC_VEIN, 'mhv')}
        {divider(UMBILICAL_FISSURE, 'uf')}
        {/* Portal plane: across the whole liver; between the middle vein and the fissure only where IV is split. */}
        <line x1={portalLeft} y1={PORTAL_Y} x2={lineX(MIDDLE_HEPATIC_VEIN, PORTAL_Y)} y2={PORTAL_Y} stroke={LINE} strokeWidth={1.2} strokeDasharray="5 4" />
        {split && <line x1={lineX(MIDDLE_HEPATIC_VEIN, PORTAL_Y)} y1={PORTAL_Y} x2={lineX(UMBILICAL_FISSURE, PORTAL_Y)} y2={PORTAL_Y} stroke={LINE} strokeWidth={1.2} strokeDasharray="5 4" />}
        <line x1={lineX(UMBILICAL_FISSURE, PORTAL_Y)} y1={PORTAL_Y} x2={portalRight} y2={PORTAL_Y} stroke={LINE} strokeWidth={1.2} strokeDasharray="5 4" />
      </g>
      <ellipse
        cx={CAUDATE.cx} cy={CAUDATE.cy} rx={CAUDATE.rx} ry={CAUDATE.ry}
        fill={mapped.has('I') ? segmentColour('I') : '#fbfbfa'} fillOpacity={mapped.has('I') ? 0.16 : 1}
        stroke={LINE} strokeWidth={1.2} strokeDasharray="3 3" data-segment-region="I"
      />
      <path d={OUTLINE_PATH} fill="none" stroke={INK} strokeWidth={1.8} />
      {regions.map((s) => (
        <text key={s} x={REGIONS[s].labelAt[0]} y={REGIONS[s].labelAt[1]} className="segment-label" textAnchor="middle" opacity={mapped.has(s) ? 1 : 0.45}>{s}</text>
      ))}
      <text x={CAUDATE.cx} y={CAUDATE.cy + 4} className="segment-label small" textAnchor="middle" opacity={mapped.has('I') ? 1 : 0.45}>I</text>
      {hasOutside && (
        <g>
          <rect x={OUTSIDE_BOX.x} y={OUTSIDE_BOX.y} width={OUTSIDE_BOX.width} height={OUTSIDE_BOX.height} rx="4" fill="#fff" stroke={LINE} strokeDasharray="4 3" />
          <text x={OUTSIDE_BOX.x + 8} y={OUTSIDE_BOX.y + 14} className="diagram-note">outside the segment map</text>
        </g>
      )}
      {props.lesions.map((l) => (
        <g key={l.lesion} data-testid="diagram-lesion" data-lesion={l.lesion} data-track={l.track ?? ''} data-segment={l.segment ?? 'outside'} data-mm={l.longestAxialMm} data-alert={l.alert}>
          <title>
            {`${l.track ?? 'no track'} (lesion ${l.lesion}), segment ${l.segment ?? 'outside'}, longest axial ${l.longestAxialMm.toFixed(1)} mm` +
              (l.marginMm === null ? '' : `, ${l.marginMm.toFixed(1)} mm from ${l.nearestOtherSegment ?? 'another segment'}`) +
              (l.alert ? ' — margin alert' : '') + (l.isNew ? ' — new at this visit' : '')}
          </title>
          {l.alert && <circle cx={l.at[0]} cy={l.at[1]} r={l.r + 4} fill="none" stroke={ALERT} strokeWidth={1.6} strokeDasharray="3 2" />}
          <circle className="lesion-dot" cx={l.at[0]} cy={l.at[1]} r={l.r} fill={segmentColour(l.segment)} fillOpacity={0.9} stroke={needsOutline(l.segment) ? OUTLINE_INK : '#fff'} strokeWidth={1.5} />
          <text x={l.at[0] + l.r + 3} y={l.at[1] - l.r + 2} className="lesion-label">{(l.track ?? l.lesion) + (l.isNew ? ' new' : '')}</text>
        </g>
      ))}
      <DiagramKey />
    </svg>
  );
}

/** Size and symbol key, drawn into the lower corner so a saved or printed copy keeps it. */
function DiagramKey() {
  const baseline = VIEW_HEIGHT - 10;
  let x = 20;
  const items = [10, 20, 40].map((mm) => {
    const r = dotRadius(mm);
    const at = { mm, r, cx: x + r };
    x += 2 * r + 58;
    return at;
  });
  return (
    <g className="diagram-key">
      <text x={20} y={baseline - 50} className="diagram-note">Dot diameter = longest axial diameter ({PX_PER_MM} px per mm of the drawing)</text>
      {items.map(({ mm, r, cx }) => (
        <g key={mm}>
          <circle cx={cx} cy={baseline - r} r={r} fill="#fff" stroke={LINE} />
          <text x={cx + r + 4} y={baseline - 2} className="diagram-note">{mm} mm</text>
        </g>
      ))}
      <circle cx={x + 8} cy={baseline - 6} r={6} fill="none" stroke={ALERT} strokeWidth={1.6} strokeDasharray="3 2" />
      <text x={x + 18} y={baseline - 2} className="diagram-note">margin alert</text>
    </g>
  );
}
