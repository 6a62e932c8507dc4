import type { SegmentName } from '../../src/segments/segment-map.js';

/**
 * The geometry of our segment diagram: a schematic front view of the liver (the patient's right on
 * the viewer's left), divided as the plane rule divides it: the right and middle hepatic veins and
 * the umbilical fissure as three near-vertical lines, the portal plane as a horizontal one, and the
 * caudate (I) as a small dashed oval behind, at the hilum. Schematic, not to scale.
 *
 * Lesions are placed within their segment's region on fixed slots, one slot per lesion track that
 * ever lies in that segment, so the same lesion sits in the same place visit after visit.
 */

export type Point = [number, number];

export const VIEW_WIDTH = 640;
export const VIEW_HEIGHT = 420;

/** Cubic Bézier pieces of the outline, as [control 1, control 2, end]; starts at OUTLINE_START. */
const OUTLINE_START: Point = [44, 190];
const OUTLINE: [Point, Point, Point][] = [
  [[36, 95], [150, 38], [300, 40]], // dome of the right liver
  [[390, 42], [500, 62], [580, 102]], // upper border of the left lobe
  [[622, 124], [626, 150], [596, 166]], // tip of the left lobe
  [[540, 196], [470, 246], [410, 292]], // lower border of the left lobe
  [[396, 302], [384, 304], [372, 298]], // notch of the round ligament
  [[300, 335], [190, 352], [118, 335]], // lower border of the right liver
  [[66, 322], [48, 260], OUTLINE_START], // right border
];

/** The outline as an SVG path. */
export const OUTLINE_PATH = `M ${OUTLINE_START.join(' ')} ${OUTLINE.map((c) => `C ${c.map((p) => p.join(' ')).join(', ')}`).join(' ')} Z`;

/** The outline sampled as a polygon, for placement checks. */
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

/** Dividing lines, each from its top to its bottom end (drawn clipped to the outline). */
export const RIGHT_HEPATIC_VEIN: [Point, Point] = [[200, 30], [110, 360]];
export const MIDDLE_HEPATIC_VEIN: [Point, Point] = [[300, 30], [262, 360]];
export const UMBILICAL_FISSURE: [Point, Point] = [[344, 30], [378, 360]];
export const PORTAL_Y = 192;

/** Caudate lobe (I): an oval at the hilum. */
export const CAUDATE = { cx: 318, cy: 178, rx: 24, ry: 14 };

/** x of a dividing line at height y. */
export function lineX([a, b]: [Point, Point], y: number): number {
  return a[0] + ((y - a[1]) * (b[0] - a[0])) / (b[1] - a[1]);
}

const FAR_LEFT = -20, FAR_RIGHT = VIEW_WIDTH + 20, TOP = 0, BOTTOM = VIEW_HEIGHT;

/** The corners of the band between two dividing lines (or the frame), above or below the portal plane. */
function band(left: [Point, Point] | null, right: [Point, Point] | null, upper: boolean): Point[] {
  const y0 = upper ? TOP : PORTAL_Y, y1 = upper ? PORTAL_Y : BOTTOM;
  const lx = (y: number) => (left ? lineX(left, y) : FAR_LEFT);
  const rx = (y: number) => (right ? lineX(right, y) : FAR_RIGHT);
  return [[lx(y0), y0], [rx(y0), y0], [rx(y1), y1], [lx(y1), y1]];
}

export interface SegmentRegion {
  /** Polygon (before clipping to the outline). */
  polygon: Point[];
  /** Where the segment's name is written. */
  labelAt: Point;
  /** Where its lesions go: a disc inside the region. */
  anchor: Point;
  anchorRadius: number;
}

const RHV = RIGHT_HEPATIC_VEIN, MHV = MIDDLE_HEPATIC_VEIN, UF = UMBILICAL_FISSURE;

/** Regions of the eight segments, IV both whole and split (IVa above the portal plane, IVb below). */
export const REGIONS: Record<Exclude<SegmentName, 'I'>, SegmentRegion> = {
  VII: { polygon: band(null, RHV, true), labelAt: [96, 96], anchor: [125, 135], anchorRadius: 30 },
  VI: { polygon: band(null, RHV, false), labelAt: [74, 300], anchor: [100, 254], anchorRadius: 24 },
  VIII: { polygon: band(RHV, MHV, true), labelAt: [236, 70], anchor: [233, 122], anchorRadius: 32 },
  V: { polygon: band(RHV, MHV, false), labelAt: [200, 322], anchor: [206, 256], anchorRadius: 34 },
  IV: { polygon: [...band(MHV, UF, true).slice(0, 2), ...band(MHV, UF, false).slice(2)], labelAt: [322, 70], anchor: [319, 240], anchorRadius: 30 },
  IVa: { polygon: band(MHV, UF, true), labelAt: [322, 70], anchor: [322, 112], anchorRadius: 18 },
  IVb: { polygon: band(MHV, UF, false), labelAt: [322, 300], anchor: [320, 244], anchorRadius: 26 },
  II: { polygon: band(UF, null, true), labelAt: [540, 120], anchor: [462, 126], anchorRadius: 34 },
  III: { polygon: band(UF, null, false), labelAt: [452, 206], anchor: [404, 226], anchorRadius: 18 },
};

export const CAUDATE_REGION: SegmentRegion = {
  polygon: [],
  labelAt: [CAUDATE.cx, CAUDATE.cy + 4],
  anchor: [CAUDATE.cx, CAUDATE.cy],
  anchorRadius: 6,
};

/** Lesions outside every segment go in a box of their own. */
export const OUTSIDE_BOX = { x: 470, y: 300, width: 150, height: 64 };
export const OUTSIDE_REGION: SegmentRegion = {
  polygon: [],
  labelAt: [OUTSIDE_BOX.x + 8, OUTSIDE_BOX.y + 14],
  anchor: [OUTSIDE_BOX.x + OUTSIDE_BOX.width / 2, OUTSIDE_BOX.y + 38],
  anchorRadius: 18,
};

export function regionOf(segment: SegmentName | null): SegmentRegion {
  if (segment === null) return OUTSIDE_REGION;
  if (segment === 'I') return CAUDATE_REGION;
  return REGIONS[segment];
}

/** Drawn radius of a lesion dot: proportional to its longest diameter (1 px per mm), within limits. */
export const PX_PER_MM = 1;
export function dotRadius(longestAxialMm: number): number {
  return Math.min(30, Math.max(3, (longestAxialMm * PX_PER_MM) / 2));
}

/**
 * Slot `k` of `n` in a disc: the first at the centre, the rest on a sunflower spiral (even spacing
 * for any n, and adding a slot never moves the earlier ones much).
 */
export function slotPosition(anchor: Point, radius: number, k: number, n: number): Point {
  if (n <= 1 || k === 0) return anchor;
  const r = radius * Math.sqrt(k / (n - 1));
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
