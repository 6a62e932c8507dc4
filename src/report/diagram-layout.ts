import type { SegmentName } from '../segments/segment-map.js';

/**
 * The geometry of the segment diagram, shared by the app's Diagram tab and the board summary so a
 * patient's drawing is the same on screen and on paper: a schematic front view of the liver (the
 * patient's right on the drawing's left), cut as the plane rule cuts it: the right and middle hepatic
 * veins and the umbilical fissure as three near-vertical lines, the portal plane as a horizontal one
 * (II above it, III below, as in `src/segments/build.ts`), and the caudate (I) as a small dashed
 * island at the hilum, since it lies behind. Schematic, not to scale; only the dots are to scale.
 */

export type Point = readonly [number, number];
type Line = readonly [Point, Point];
type NonCaudate = Exclude<SegmentName, 'I'>;

export const VIEW_WIDTH = 640;
export const VIEW_HEIGHT = 440;

/** Cubic Bézier pieces of the outline, as [control 1, control 2, end]; starts at OUTLINE_START. */
const OUTLINE_START: Point = [44, 190];
const OUTLINE: readonly (readonly [Point, Point, Point])[] = [
  [[36, 95], [150, 38], [300, 40]], // dome of the right liver
  [[390, 42], [500, 62], [580, 102]], // upper border of the left lobe
  [[622, 124], [626, 150], [596, 166]], // tip of the left lobe
  [[540, 196], [470, 246], [410, 292]], // lower border of the left lobe
  [[396, 302], [384, 304], [372, 298]], // notch of the round ligament
  [[300, 335], [190, 352], [118, 335]], // lower border of the right liver
  [[66, 322], [48, 260], OUTLINE_START], // right border
];

/** The outline as an SVG path, for its stroke. */
export const OUTLINE_PATH = `M ${OUTLINE_START.join(' ')} ${OUTLINE.map((c) => `C ${c.map((p) => p.join(' ')).join(', ')}`).join(' ')} Z`;

/** The outline sampled as a polygon: the segment regions are cut from it, and placement is checked against it. */
export function outlinePolygon(stepsPerCurve = 24): Point[] {
  const out: Point[] = [];
  let p0 = OUTLINE_START;
  for (const [c1, c2, p3] of OUTLINE) {
    for (let s = 0; s < stepsPerCurve; s++) {
      const t = s / stepsPerCurve, u = 1 - t;
      out.push([
        u * u * u * p0[0] + 3 * u * u * t * c1[0] + 3 * u * t * t * c2[0] + t * t * t * p3[0],
        u * u * u * p0[1] + 3 * u * u * t * c1[1] + 3 * u * t * t * c2[1] + t * t * t * p3[1],
      ]);
    }
    p0 = p3;
  }
  return out;
}

/** Dividing lines, each from above the outline's top to below its bottom. */
export const RIGHT_HEPATIC_VEIN: Line = [[200, 30], [110, 360]];
export const MIDDLE_HEPATIC_VEIN: Line = [[300, 30], [262, 360]];
export const UMBILICAL_FISSURE: Line = [[344, 30], [378, 360]];
export const PORTAL_Y = 192;

/** Caudate lobe (I): an oval at the hilum, over the portal plane between the middle vein and the fissure. */
export const CAUDATE = { cx: 318, cy: 178, rx: 24, ry: 14 } as const;

/** x of a dividing line at height y. */
export function lineX([a, b]: Line, y: number): number {
  return a[0] + ((y - a[1]) * (b[0] - a[0])) / (b[1] - a[1]);
}

/** A side of a cut as an affine function of the point: >= 0 on the kept side. */
type Side = (p: Point) => number;
const leftOf = (l: Line): Side => (p) => lineX(l, p[1]) - p[0];
const rightOf = (l: Line): Side => (p) => p[0] - lineX(l, p[1]);
const above: Side = (p) => PORTAL_Y - p[1];
const below: Side = (p) => p[1] - PORTAL_Y;

/**
 * Sutherland–Hodgman against one half-plane. Exact for an affine side; the outline is not convex, but
 * no cut here splits it into two pieces, so each region stays one polygon.
 */
function clip(poly: readonly Point[], side: Side): Point[] {
  const out: Point[] = [];
  for (let n = 0; n < poly.length; n++) {
    const p = poly[n], q = poly[(n + 1) % poly.length];
    const sp = side(p), sq = side(q);
    if (sp >= 0) out.push(p);
    if (sp >= 0 !== sq >= 0) {
      const t = sp / (sp - sq);
      out.push([p[0] + t * (q[0] - p[0]), p[1] + t * (q[1] - p[1])]);
    }
  }
  return out;
}

export interface SegmentRegion {
  /** The segment's part of the outline. */
  polygon: readonly Point[];
  /** Where the segment's name is written. */
  labelAt: Point;
  /** Where its lesions go: slots in a disc inside the region. */
  anchor: Point;
  anchorRadius: number;
}

const RHV = RIGHT_HEPATIC_VEIN, MHV = MIDDLE_HEPATIC_VEIN, UF = UMBILICAL_FISSURE;
const OUTLINE_POLYGON = outlinePolygon();
const cut = (...sides: Side[]) => sides.reduce<readonly Point[]>(clip, OUTLINE_POLYGON);

/** Regions of the eight segments, IV both whole and split (IVa above the portal plane, IVb below). */
export const REGIONS: Readonly<Record<NonCaudate, SegmentRegion>> = {
  VII: { polygon: cut(leftOf(RHV), above), labelAt: [102, 116], anchor: [126, 160], anchorRadius: 24 },
  VI: { polygon: cut(leftOf(RHV), below), labelAt: [88, 306], anchor: [100, 244], anchorRadius: 28 },
  VIII: { polygon: cut(rightOf(RHV), leftOf(MHV), above), labelAt: [244, 72], anchor: [234, 132], anchorRadius: 34 },
  V: { polygon: cut(rightOf(RHV), leftOf(MHV), below), labelAt: [206, 334], anchor: [210, 256], anchorRadius: 38 },
  IV: { polygon: cut(rightOf(MHV), leftOf(UF)), labelAt: [322, 72], anchor: [320, 262], anchorRadius: 32 },
  IVa: { polygon: cut(rightOf(MHV), leftOf(UF), above), labelAt: [322, 72], anchor: [322, 118], anchorRadius: 20 },
  IVb: { polygon: cut(rightOf(MHV), leftOf(UF), below), labelAt: [330, 306], anchor: [320, 250], anchorRadius: 30 },
  II: { polygon: cut(rightOf(UF), above), labelAt: [562, 128], anchor: [448, 122], anchorRadius: 40 },
  III: { polygon: cut(rightOf(UF), below), labelAt: [468, 214], anchor: [406, 234], anchorRadius: 22 },
};

export const CAUDATE_REGION: SegmentRegion = {
  polygon: [],
  labelAt: [CAUDATE.cx, CAUDATE.cy + 5],
  anchor: [CAUDATE.cx, CAUDATE.cy],
  anchorRadius: 6,
};

/** Lesions outside every segment go in a box of their own. */
export const OUTSIDE_BOX = { x: 440, y: 290, width: 186, height: 74 } as const;
export const OUTSIDE_REGION: SegmentRegion = {
  polygon: [],
  labelAt: [OUTSIDE_BOX.x + 8, OUTSIDE_BOX.y + 16],
  anchor: [OUTSIDE_BOX.x + OUTSIDE_BOX.width / 2, OUTSIDE_BOX.y + 46],
  anchorRadius: 18,
};

export function regionOf(segment: SegmentName | null): SegmentRegion {
  if (segment === null) return OUTSIDE_REGION;
  if (segment === 'I') return CAUDATE_REGION;
  return REGIONS[segment];
}

/** The regions a visit's map is drawn with: IV whole or split, as the map has it. */
export function shownRegions(segments: readonly SegmentName[]): NonCaudate[] {
  const split = segments.includes('IVa') || segments.includes('IVb');
  return ['VII', 'VI', 'VIII', 'V', ...(split ? (['IVa', 'IVb'] as const) : (['IV'] as const)), 'II', 'III'];
}

/** Drawing units per mm of lesion diameter: a dot's diameter is the lesion's longest axial diameter. */
export const UNITS_PER_MM = 1;

/** Drawn radius of a lesion dot, within limits so a tiny lesion still shows and a huge one leaves its segment visible. */
export function dotRadius(longestAxialMm: number): number {
  return Math.min(30, Math.max(3, (longestAxialMm * UNITS_PER_MM) / 2));
}

/**
 * Slot `k` of `n` in a disc: one slot at the centre, more on a sunflower (Vogel's spiral, offset
 * by half a step so the first two are not centre and rim), which spaces any number evenly.
 */
export function slotPosition(anchor: Point, radius: number, k: number, n: number): Point {
  if (n <= 1) return anchor;
  const r = radius * Math.sqrt((k + 0.5) / n);
  const a = k * 2.399963; // the golden angle, radians
  return [anchor[0] + r * Math.cos(a), anchor[1] + r * Math.sin(a)];
}

/** Ray-casting point-in-polygon. */
export function insidePolygon(p: Point, poly: readonly Point[]): boolean {
  let inside = false;
  for (let i = 0, j = poly.length - 1; i < poly.length; j = i++) {
    const [xi, yi] = poly[i], [xj, yj] = poly[j];
    if (yi > p[1] !== yj > p[1] && p[0] < ((xj - xi) * (p[1] - yi)) / (yj - yi) + xi) inside = !inside;
  }
  return inside;
}

/** The pieces of the segment a → b that lie inside the outline, so cuts stop at its edge. */
export function insideOutline(a: Point, b: Point): Line[] {
  const poly = OUTLINE_POLYGON;
  const ts = [0, 1];
  const dx = b[0] - a[0], dy = b[1] - a[1];
  for (let i = 0, j = poly.length - 1; i < poly.length; j = i++) {
    const p = poly[j], q = poly[i];
    const ex = q[0] - p[0], ey = q[1] - p[1];
    const den = dx * ey - dy * ex;
    if (den === 0) continue;
    const t = ((p[0] - a[0]) * ey - (p[1] - a[1]) * ex) / den;
    const u = ((p[0] - a[0]) * dy - (p[1] - a[1]) * dx) / den;
    if (t > 0 && t < 1 && u >= 0 && u < 1) ts.push(t);
  }
  ts.sort((x, y) => x - y);
  const at = (t: number): Point => [a[0] + t * dx, a[1] + t * dy];
  const out: Line[] = [];
  for (let n = 0; n + 1 < ts.length; n++) {
    if (ts[n + 1] - ts[n] > 1e-9 && insidePolygon(at((ts[n] + ts[n + 1]) / 2), poly)) out.push([at(ts[n]), at(ts[n + 1])]);
  }
  return out;
}

/** The three vein and fissure cuts as drawn. */
export function veinCuts(): Line[] {
  return [RHV, MHV, UF].flatMap(([a, b]) => insideOutline(a, b));
}

/** The portal plane as drawn: across the liver, but not through IV where the map keeps IV whole. */
export function portalCuts(splitIV: boolean): Line[] {
  const left: Point = [-20, PORTAL_Y], right: Point = [VIEW_WIDTH + 20, PORTAL_Y];
  const atMHV: Point = [lineX(MHV, PORTAL_Y), PORTAL_Y], atUF: Point = [lineX(UF, PORTAL_Y), PORTAL_Y];
  const spans: Line[] = splitIV ? [[left, right]] : [[left, atMHV], [atUF, right]];
  return spans.flatMap(([a, b]) => insideOutline(a, b));
}

/**
 * The drawn border between two segments as the two ends of its shared edge, or null when the two do
 * not touch on the drawing (or touch at a corner only). Regions are cut from one outline by the same
 * lines, so a shared edge's ends are vertices of one polygon lying on the other's edge. Segment I, an island, borders every
 * segment around it: the border is the oval's edge facing the other segment's lesions.
 */
export function borderBetween(a: SegmentName, b: SegmentName): Line | null {
  if (a === b) return null;
  if (a === 'I' || b === 'I') {
    const other = regionOf(a === 'I' ? b : a).anchor;
    const angle = Math.atan2(other[1] - CAUDATE.cy, other[0] - CAUDATE.cx);
    const at = (da: number): Point => [CAUDATE.cx + CAUDATE.rx * Math.cos(angle + da), CAUDATE.cy + CAUDATE.ry * Math.sin(angle + da)];
    return [at(-0.6), at(0.6)];
  }
  const pa = regionOf(a).polygon, pb = regionOf(b).polygon;
  const shared = [...pa.filter((p) => onBoundary(p, pb)), ...pb.filter((p) => onBoundary(p, pa))];
  if (shared.length < 2) return null;
  let best: Line = [shared[0], shared[1]];
  let far = -1;
  for (const p of shared) {
    for (const q of shared) {
      const d = (p[0] - q[0]) ** 2 + (p[1] - q[1]) ** 2;
      if (d > far) { far = d; best = [p, q]; }
    }
  }
  // Regions meeting at a corner only (VII and V) have no border to draw a lesion on.
  return far > 16 ? best : null;
}

/** Whether p lies on an edge of the polygon (within a thousandth of a drawing unit). */
function onBoundary(p: Point, poly: readonly Point[]): boolean {
  for (let i = 0, j = poly.length - 1; i < poly.length; j = i++) {
    const a = poly[j], b = poly[i];
    const dx = b[0] - a[0], dy = b[1] - a[1];
    const len2 = dx * dx + dy * dy;
    const t = len2 === 0 ? 0 : Math.max(0, Math.min(1, ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / len2));
    if (Math.hypot(a[0] + t * dx - p[0], a[1] + t * dy - p[1]) < 1e-3) return true;
  }
  return false;
}
