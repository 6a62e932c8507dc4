import type { SegmentName } from '../segments/segment-map.js';
import {
  CAUDATE, dotRadius, OUTLINE_PATH, OUTSIDE_BOX, portalCuts, REGIONS, regionOf, shownRegions, veinCuts, VIEW_HEIGHT, VIEW_WIDTH, type Point,
} from './diagram-layout.js';
import type { PlacedLesion } from './diagram-placement.js';
import { ALERT_INK, INK, PAPER, segmentColour } from './palette.js';

/**
 * The segment diagram as a list of plain SVG shapes, so the board summary (an SVG string) and the app
 * (React) draw exactly the same thing. Styling is by presentation attributes only: the app's CSP
 * forbids style attributes in the HTML it injects, and no stylesheet is needed for the drawing to
 * look the same on screen and on paper. Targets are filled, other lesions open, and a dashed ring marks
 * a margin alert, all in ink so the page reads in black and white; the segment colours tint the regions.
 */

export type SvgAttrs = Readonly<Record<string, string | number>>;

export interface SvgShape {
  tag: 'path' | 'line' | 'circle' | 'ellipse' | 'rect' | 'text';
  /** SVG attribute names as written in markup (stroke-width, data-segment-region). */
  attrs: SvgAttrs;
  text?: string;
}

export interface LesionMark {
  lesion: PlacedLesion;
  /** The lesion in words, for a tooltip. */
  title: string;
  /** On the lesion's group: which lesion it is, for tests and scripts. */
  attrs: SvgAttrs;
  /** Ring and dot. */
  shapes: SvgShape[];
  /** Drawn after every dot, so no dot hides a name. */
  label: SvgShape;
}

export interface DiagramDrawing {
  viewBox: string;
  /** Accessible name of the whole drawing. */
  label: string;
  /** Regions, cuts, outline, names, notes and key: everything under the lesions. */
  base: SvgShape[];
  lesions: LesionMark[];
}

const REGION_OPACITY = 0.35;
/** Names of segments absent from the map are drawn faint. */
const ABSENT_OPACITY = 0.4;
const NOTE = { 'font-size': 15, fill: INK, 'fill-opacity': 0.72 } as const;

const pathOf = (ps: readonly Point[]) => `M${ps.map((p) => `${round(p[0])} ${round(p[1])}`).join('L')}Z`;
const round = (x: number) => Math.round(x * 10) / 10;

function segmentShapes(segments: readonly SegmentName[]): SvgShape[] {
  const mapped = new Set(segments);
  const regions = shownRegions(segments);
  const split = regions.includes('IVa');
  const out: SvgShape[] = regions.map((s) => ({
    tag: 'path',
    attrs: { d: pathOf(REGIONS[s].polygon), fill: mapped.has(s) ? segmentColour(s) : 'none', 'fill-opacity': REGION_OPACITY, 'data-segment-region': s },
  }));
  const line = ([a, b]: readonly [Point, Point], extra: SvgAttrs): SvgShape => ({
    tag: 'line',
    attrs: { x1: round(a[0]), y1: round(a[1]), x2: round(b[0]), y2: round(b[1]), stroke: INK, ...extra },
  });
  out.push(...veinCuts().map((c) => line(c, { 'stroke-width': 1.4 })));
  // The portal plane is a plane, not a vessel: dashed, and absent inside IV where the map keeps IV whole.
  out.push(...portalCuts(split).map((c) => line(c, { 'stroke-width': 1.2, 'stroke-dasharray': '6 4' })));
  // Segment I lies behind: an opaque island with a dashed edge, over the cuts it hides.
  const oval = { cx: CAUDATE.cx, cy: CAUDATE.cy, rx: CAUDATE.rx, ry: CAUDATE.ry };
  out.push(
    { tag: 'ellipse', attrs: { ...oval, fill: PAPER } },
    {
      tag: 'ellipse',
      attrs: {
        ...oval, fill: mapped.has('I') ? segmentColour('I') : 'none', 'fill-opacity': REGION_OPACITY,
        stroke: INK, 'stroke-width': 1.2, 'stroke-dasharray': '4 3', 'data-segment-region': 'I',
      },
    },
  );
  out.push({ tag: 'path', attrs: { d: OUTLINE_PATH, fill: 'none', stroke: INK, 'stroke-width': 2, 'stroke-linejoin': 'round' } });
  for (const s of [...regions, 'I' as const]) {
    const at = regionOf(s).labelAt;
    out.push({
      tag: 'text',
      attrs: {
        x: at[0], y: at[1], class: 'diagram-segment-name', 'text-anchor': 'middle', 'font-size': s === 'I' ? 13 : 18, 'font-weight': 700,
        fill: INK, opacity: mapped.has(s) ? 1 : ABSENT_OPACITY,
      },
      text: s,
    });
  }
  out.push(
    { tag: 'text', attrs: { x: 16, y: 24, class: 'diagram-note', ...NOTE }, text: "patient's right" },
    { tag: 'text', attrs: { x: VIEW_WIDTH - 16, y: 24, class: 'diagram-note', 'text-anchor': 'end', ...NOTE }, text: "patient's left" },
  );
  return out;
}

const KEY_LABEL = 46;
const KEY_GAP = 26;

/** Size and symbol key in the lower corner, so a saved or printed copy keeps it. */
function keyShapes(): SvgShape[] {
  const baseline = VIEW_HEIGHT - 10;
  const out: SvgShape[] = [
    {
      tag: 'text', attrs: { x: 20, y: baseline - 52, class: 'diagram-note', 'data-key': 'scale', ...NOTE },
      text: 'Positions schematic; dot diameter to scale = longest axial diameter',
    },
  ];
  let x = 20;
  for (const mm of [10, 20, 40]) {
    const r = dotRadius(mm);
    out.push(
      { tag: 'circle', attrs: { cx: x + r, cy: baseline - r, r, fill: PAPER, stroke: INK, 'stroke-width': 1.2 } },
      { tag: 'text', attrs: { x: x + 2 * r + 5, y: baseline - 2, class: 'diagram-note', ...NOTE }, text: `${mm} mm` },
    );
    // Room for the label (about 45 units) and a clear gap before the next dot.
    x += 2 * r + 5 + KEY_LABEL + KEY_GAP;
  }
  out.push(
    { tag: 'circle', attrs: { cx: x + 7, cy: baseline - 7, r: 7, fill: INK, stroke: INK, 'stroke-width': 1.2 } },
    { tag: 'text', attrs: { x: x + 18, y: baseline - 2, class: 'diagram-note', ...NOTE }, text: 'target' },
  );
  x += 18 + KEY_LABEL + KEY_GAP;
  out.push(
    { tag: 'circle', attrs: { cx: x + 10, cy: baseline - 10, r: 5, fill: PAPER, stroke: INK, 'stroke-width': 1.2 } },
    { tag: 'circle', attrs: { cx: x + 10, cy: baseline - 10, r: 10, fill: 'none', stroke: ALERT_INK, 'stroke-width': 2, 'stroke-dasharray': '4 3' } },
    { tag: 'text', attrs: { x: x + 26, y: baseline - 2, class: 'diagram-note', ...NOTE }, text: 'margin alert' },
  );
  return out;
}

/** "V 62% / VIII 38%": a crossing lesion's shares, whole percent (under 1% as "<1%"). */
export function sharesText(l: Pick<PlacedLesion, 'shares'>): string {
  return l.shares.map((x) => `${x.segment} ${x.share < 0.005 ? '<1' : (x.share * 100).toFixed(0)}%`).join(' / ');
}

function lesionTitle(l: PlacedLesion): string {
  return (
    `${l.track ?? 'no track'} (lesion ${l.lesion}), segment ${l.segment ?? 'outside'}` +
    (l.crossing ? `, crossing the border: ${sharesText(l)}` : '') +
    `, longest axial ${l.longestAxialMm.toFixed(1)} mm` +
    (l.target ? ', target' : '') +
    (l.marginMm === null ? '' : `, ${l.marginMm.toFixed(1)} mm from ${l.nearestOtherSegment ?? 'another segment'}`) +
    (l.alert ? ' — margin alert' : '') +
    (l.isNew ? ' — new at this visit' : '')
  );
}

function lesionMark(l: PlacedLesion): LesionMark {
  const [x, y] = l.at;
  const shapes: SvgShape[] = [];
  if (l.alert) shapes.push({ tag: 'circle', attrs: { cx: x, cy: y, r: l.r + 5, fill: 'none', stroke: ALERT_INK, 'stroke-width': 2, 'stroke-dasharray': '4 3' } });
  shapes.push({ tag: 'circle', attrs: { class: 'lesion-dot', cx: x, cy: y, r: l.r, fill: l.target ? INK : PAPER, stroke: INK, 'stroke-width': 1.6 } });
  return {
    lesion: l,
    title: lesionTitle(l),
    attrs: {
      'data-lesion': l.lesion, 'data-track': l.track ?? '', 'data-segment': l.segment ?? 'outside',
      'data-crossing': l.crossing ? l.crossing.join('|') : '',
      'data-mm': l.longestAxialMm, 'data-alert': String(l.alert), 'data-target': String(l.target),
    },
    shapes,
    label: {
      tag: 'text',
      attrs: {
        x: round(x + l.r + 3), y: round(y - l.r + 3), class: 'diagram-lesion-name', 'font-size': 15, 'font-weight': 700, fill: INK,
        stroke: PAPER, 'stroke-width': 3.5, 'stroke-linejoin': 'round', 'paint-order': 'stroke',
      },
      text: (l.track ?? l.lesion) + (l.isNew ? ' new' : '') + (l.crossing ? ` ${sharesText(l)}` : ''),
    },
  };
}

/** One visit's drawing: its map's segments (IV whole or split, absent ones unfilled) and its placed lesions. */
export function diagramDrawing(d: { segments: readonly SegmentName[]; lesions: readonly PlacedLesion[]; label: string }): DiagramDrawing {
  const base = segmentShapes(d.segments);
  if (d.lesions.some((l) => l.segment === null)) {
    const b = OUTSIDE_BOX;
    base.push(
      { tag: 'rect', attrs: { x: b.x, y: b.y, width: b.width, height: b.height, rx: 4, fill: PAPER, stroke: INK, 'stroke-width': 1, 'stroke-dasharray': '4 3' } },
      { tag: 'text', attrs: { x: regionOf(null).labelAt[0], y: regionOf(null).labelAt[1], class: 'diagram-note', ...NOTE }, text: 'outside the segment map' },
    );
  }
  base.push(...keyShapes());
  return { viewBox: `0 0 ${VIEW_WIDTH} ${VIEW_HEIGHT}`, label: d.label, base, lesions: d.lesions.map(lesionMark) };
}
