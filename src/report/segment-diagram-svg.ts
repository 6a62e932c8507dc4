import type { SegmentName } from '../segments/segment-map.js';
import type { SegmentDiagram } from './board-summary.js';
import { esc, n2 } from './html-escape.js';
import { segmentColour } from './palette.js';

/**
 * A schematic of the liver seen from the front (the patient's right on the left of the drawing),
 * cut into the Couinaud segments by three near-vertical lines (right hepatic vein, middle hepatic
 * vein, umbilical fissure) and the portal plane, as in the brief's plane rule; the left lateral
 * section is cut into II above and III below, and I sits behind, drawn as a dashed island. The
 * visit's lesions are dots in their segment, to scale with their longest axial diameter: filled for
 * targets, open for the others, a dashed ring for a margin alert.
 */

type Pt = readonly [number, number];
type Poly = Pt[];

const W = 300;
const H = 214;
const INK = '#1d2327';
/** Dot radius per mm of diameter: the drawing's scale is 0.6 units per mm. */
const RADIUS_PER_MM = 0.3;

/** Outline control points, clockwise from the patient's right; smoothed into the drawn outline. */
const OUTLINE_CONTROL: Poly = [
  [12, 112], [26, 60], [54, 31], [100, 16], [160, 12], [214, 22], [262, 42], [296, 66], [304, 80], [290, 92],
  [250, 108], [214, 124], [188, 146], [152, 172], [108, 194], [66, 198], [34, 184], [18, 154],
];

/** A closed Catmull-Rom curve through the control points, as a polygon fine enough to look smooth. */
function smooth(ctrl: Poly, steps = 8): Poly {
  const out: Poly = [];
  const m = ctrl.length;
  for (let n = 0; n < m; n++) {
    const p0 = ctrl[(n - 1 + m) % m], p1 = ctrl[n], p2 = ctrl[(n + 1) % m], p3 = ctrl[(n + 2) % m];
    for (let k = 0; k < steps; k++) {
      const t = k / steps, t2 = t * t, t3 = t2 * t;
      const f = (a: number, b: number, c: number, d: number) =>
        0.5 * (2 * b + (-a + c) * t + (2 * a - 5 * b + 4 * c - d) * t2 + (-a + 3 * b - 3 * c + d) * t3);
      out.push([f(p0[0], p1[0], p2[0], p3[0]), f(p0[1], p1[1], p2[1], p3[1])]);
    }
  }
  return out;
}

const OUTLINE = smooth(OUTLINE_CONTROL);
/** Each cut as a line from a to b; "left" is the side to the left of the drawing when going a → b downwards. */
const RIGHT_HEPATIC: [Pt, Pt] = [[94, 0], [76, H]];
const MIDDLE_HEPATIC: [Pt, Pt] = [[152, 0], [148, H]];
const UMBILICAL: [Pt, Pt] = [[208, 0], [216, H]];
const PORTAL: [Pt, Pt] = [[0, 114], [230, 101]];
const LEFT_LATERAL: [Pt, Pt] = [[200, 66], [310, 86]];
const CAUDATE = { cx: 152, cy: 46, rx: 19, ry: 11 };

/** Sutherland–Hodgman: the part of a polygon on one side of the line a → b (+1 left/below, -1 right/above). */
function clip(poly: Poly, [a, b]: [Pt, Pt], side: 1 | -1): Poly {
  const s = (p: Pt) => side * ((b[0] - a[0]) * (p[1] - a[1]) - (b[1] - a[1]) * (p[0] - a[0]));
  const out: Poly = [];
  for (let n = 0; n < poly.length; n++) {
    const p = poly[n], q = poly[(n + 1) % poly.length];
    const sp = s(p), sq = s(q);
    if (sp >= 0) out.push(p);
    if ((sp >= 0) !== (sq >= 0)) {
      const t = sp / (sp - sq);
      out.push([p[0] + t * (q[0] - p[0]), p[1] + t * (q[1] - p[1])]);
    }
  }
  return out;
}

/** Segment regions of the drawing. For a downward line, +1 keeps the left side; for a rightward one, +1 keeps below. */
function regions(): Record<Exclude<SegmentName, 'I'>, Poly> {
  const posterior = clip(OUTLINE, RIGHT_HEPATIC, 1);
  const anterior = clip(clip(OUTLINE, RIGHT_HEPATIC, -1), MIDDLE_HEPATIC, 1);
  const medial = clip(clip(OUTLINE, MIDDLE_HEPATIC, -1), UMBILICAL, 1);
  const lateral = clip(OUTLINE, UMBILICAL, -1);
  return {
    VII: clip(posterior, PORTAL, -1),
    VI: clip(posterior, PORTAL, 1),
    VIII: clip(anterior, PORTAL, -1),
    V: clip(anterior, PORTAL, 1),
    IV: medial,
    IVa: clip(medial, PORTAL, -1),
    IVb: clip(medial, PORTAL, 1),
    II: clip(lateral, LEFT_LATERAL, -1),
    III: clip(lateral, LEFT_LATERAL, 1),
  };
}

const path = (poly: Poly) => `M${poly.map((p) => `${n2(p[0])} ${n2(p[1])}`).join('L')}Z`;

/** Where each segment's name goes, and where its lesions are drawn, apart so neither hides the other. */
const LABEL_AT: Record<SegmentName, Pt> = {
  I: [140, 50], II: [228, 48], III: [234, 110], IV: [186, 44], IVa: [190, 44], IVb: [200, 120],
  V: [118, 182], VI: [40, 170], VII: [46, 56], VIII: [118, 34],
};
const DOTS_AT: Record<SegmentName, Pt> = {
  I: [160, 46], II: [262, 62], III: [264, 94], IV: [182, 100], IVa: [182, 84], IVb: [172, 126],
  V: [112, 140], VI: [52, 140], VII: [56, 86], VIII: [116, 72],
};
const OUTSIDE_AT: Pt = [262, 156];

export const dotRadius = (longestAxialMm: number, scale = 1) => Math.min(14, Math.max(2.2, longestAxialMm * RADIUS_PER_MM * scale));

/** Dots shrink together when one segment holds many lesions, so they stay apart; the key follows. */
export function diagramScale(d: SegmentDiagram): number {
  const counts = new Map<string, number>();
  for (const l of d.lesions) counts.set(l.segment ?? 'outside', (counts.get(l.segment ?? 'outside') ?? 0) + 1);
  const most = Math.max(0, ...counts.values());
  return most <= 3 ? 1 : Math.max(0.4, 3 / most);
}

export function segmentDiagramSvg(d: SegmentDiagram): string {
  const out: string[] = [];
  out.push(
    `<svg xmlns="http://www.w3.org/2000/svg" class="segment-diagram" viewBox="-6 0 ${W + 12} ${H}" role="img" aria-label="Segment diagram of visit ${esc(d.visit)} with its lesions">`,
  );
  const polys = regions();
  const present = new Set(d.segments);
  const shown: Exclude<SegmentName, 'I'>[] = d.splitIV
    ? ['VII', 'VI', 'VIII', 'V', 'IVa', 'IVb', 'II', 'III']
    : ['VII', 'VI', 'VIII', 'V', 'IV', 'II', 'III'];
  for (const s of shown) {
    // A segment the map lacks is drawn pale: the page should not suggest it was measured.
    const opacity = present.has(s) ? '0.42' : '0.1';
    out.push(`<path d="${path(polys[s])}" fill="${segmentColour(s)}" fill-opacity="${opacity}" stroke="${INK}" stroke-width="0.9" stroke-linejoin="round"/>`);
  }
  out.push(
    `<ellipse cx="${CAUDATE.cx}" cy="${CAUDATE.cy}" rx="${CAUDATE.rx}" ry="${CAUDATE.ry}" fill="#ffffff" stroke="${INK}" stroke-width="0.9" stroke-dasharray="2.5 2"/>`,
    `<ellipse cx="${CAUDATE.cx}" cy="${CAUDATE.cy}" rx="${CAUDATE.rx}" ry="${CAUDATE.ry}" fill="${segmentColour('I')}" fill-opacity="${present.has('I') ? '0.28' : '0.06'}" stroke="none"/>`,
  );
  out.push(`<path d="${path(OUTLINE)}" fill="none" stroke="${INK}" stroke-width="1.6" stroke-linejoin="round"/>`);
  for (const s of [...shown, 'I' as const]) {
    const [x, y] = LABEL_AT[s];
    out.push(`<text x="${x}" y="${y}" text-anchor="middle" class="segment-label${present.has(s) ? '' : ' absent'}">${s}</text>`);
  }
  out.push(`<text x="4" y="${H - 4}" class="note-text">patient's right</text>`);
  out.push(`<text x="${W - 4}" y="${H - 4}" text-anchor="end" class="note-text">patient's left</text>`);

  // Lesions grouped by where they are drawn, largest first, laid out in rows around the anchor.
  const anchorOf = (s: SegmentName | null): Pt => {
    if (s === null) return OUTSIDE_AT;
    const key = s === 'IV' && d.splitIV ? 'IVa' : (s === 'IVa' || s === 'IVb') && !d.splitIV ? 'IV' : s;
    return DOTS_AT[key];
  };
  const groups = new Map<string, typeof d.lesions>();
  for (const l of d.lesions) {
    const k = l.segment ?? 'outside';
    groups.set(k, [...(groups.get(k) ?? []), l]);
  }
  const marks: string[] = [];
  const labels: string[] = [];
  const scale = diagramScale(d);
  for (const [key, list] of groups) {
    const sorted = [...list].sort((a, b) => b.longestAxialMm - a.longestAxialMm);
    const [ax, ay] = anchorOf(key === 'outside' ? null : (key as SegmentName));
    const step = 2 * dotRadius(sorted[0].longestAxialMm, scale) + 14;
    const perRow = 3;
    sorted.forEach((l, k) => {
      const row = Math.floor(k / perRow), col = k % perRow;
      const inRow = Math.min(perRow, sorted.length - row * perRow);
      const x = ax + (col - (inRow - 1) / 2) * step;
      const y = ay + (row - (Math.ceil(sorted.length / perRow) - 1) / 2) * step;
      const r = dotRadius(l.longestAxialMm, scale);
      if (l.alert) marks.push(`<circle cx="${n2(x)}" cy="${n2(y)}" r="${n2(r + 3)}" fill="none" stroke="${INK}" stroke-width="1.1" stroke-dasharray="2 1.6"/>`);
      marks.push(`<circle cx="${n2(x)}" cy="${n2(y)}" r="${n2(r)}" fill="${l.target ? INK : '#ffffff'}" stroke="${INK}" stroke-width="1.2"/>`);
      labels.push(`<text x="${n2(x + r + 2)}" y="${n2(y - r + 2)}" class="dot-label" paint-order="stroke" stroke="#ffffff" stroke-width="2.4" stroke-linejoin="round">${esc(l.label)}</text>`);
    });
    if (key === 'outside') labels.push(`<text x="${OUTSIDE_AT[0]}" y="${OUTSIDE_AT[1] + 22}" text-anchor="middle" class="note-text">outside the segments</text>`);
  }
  out.push(...marks, ...labels);
  out.push('</svg>');
  return out.join('');
}

/** A small key to the dots: sizes at the diagram's scale, filled for target, ring for alert. */
export function diagramKeySvg(scale = 1): string {
  const out: string[] = [`<svg xmlns="http://www.w3.org/2000/svg" class="diagram-key" viewBox="0 0 300 27" role="img" aria-label="Key to the lesion dots">`];
  let x = 6;
  for (const mm of [10, 20, 40]) {
    const r = dotRadius(mm, scale);
    out.push(`<circle cx="${n2(x + r)}" cy="13.5" r="${n2(r)}" fill="#ffffff" stroke="${INK}" stroke-width="1.1"/>`);
    out.push(`<text x="${n2(x + 2 * r + 3)}" y="16.5" class="note-text">${mm} mm</text>`);
    x += 2 * r + 36;
  }
  out.push(`<circle cx="${x + 4}" cy="13.5" r="4" fill="${INK}"/><text x="${x + 11}" y="16.5" class="note-text">target</text>`);
  x += 46;
  out.push(`<circle cx="${x + 4}" cy="13.5" r="4" fill="#ffffff" stroke="${INK}" stroke-width="1.1"/><circle cx="${x + 4}" cy="13.5" r="7" fill="none" stroke="${INK}" stroke-width="1.1" stroke-dasharray="2 1.6"/><text x="${x + 14}" y="16.5" class="note-text">margin alert</text>`);
  out.push('</svg>');
  return out.join('');
}
