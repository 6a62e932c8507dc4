import type { SizeChart } from './board-summary.js';
import { esc, n2 } from './html-escape.js';
import { INK, segmentColour } from './palette.js';

/**
 * The size chart as inline SVG: longest axial diameter of each lesion track over the real visit
 * dates (time to scale, not evenly spaced visits). Colour is the track's segment; a solid line and
 * round marks for targets, a dashed line and square marks for the others; a cross where a track is
 * gone (0 mm, as RECIST 1.1 records it). Every line has a dark casing, so the lighter palette
 * colours still read on white paper.
 */

const W = 470;
/** As tall as the segment diagram beside it, so the row costs no extra height. */
const H = 244;
const PLOT = { left: 46, right: W - 112, top: 18, bottom: H - 36 };
const DAY_MS = 86_400_000;

const time = (iso: string) => Date.parse(`${iso}T00:00:00Z`);

/** A tick step of 1, 2, 2.5 or 5 × 10^n giving at most six intervals. */
function niceStep(max: number): number {
  const raw = max / 6;
  const p = 10 ** Math.floor(Math.log10(raw));
  for (const m of [1, 2, 2.5, 5, 10]) if (m * p >= raw) return m * p;
  return 10 * p;
}

export function sizeChartSvg(chart: SizeChart): string {
  const out: string[] = [];
  out.push(
    `<svg xmlns="http://www.w3.org/2000/svg" class="size-chart" viewBox="0 0 ${W} ${H}" role="img" aria-label="Longest axial diameter per lesion track over visit dates">`,
  );
  const all = chart.series.flatMap((s) => s.points.map((p) => p.longestAxialMm));
  const maxMm = Math.max(10, ...all);
  const step = niceStep(maxMm);
  const yMax = Math.ceil(maxMm / step) * step;
  const dates = chart.visitDates.map(time);
  let t0 = Math.min(...dates), t1 = Math.max(...dates);
  if (!(t1 > t0)) {
    t0 -= 15 * DAY_MS;
    t1 += 15 * DAY_MS;
  }
  const pad = (t1 - t0) * 0.05;
  t0 -= pad;
  t1 += pad;
  const x = (iso: string) => PLOT.left + ((time(iso) - t0) / (t1 - t0)) * (PLOT.right - PLOT.left);
  const y = (mm: number) => PLOT.bottom - (mm / yMax) * (PLOT.bottom - PLOT.top);

  // Grid and y axis.
  for (let v = 0; v <= yMax + 1e-9; v += step) {
    const yy = n2(y(v));
    out.push(`<line x1="${PLOT.left}" x2="${PLOT.right}" y1="${yy}" y2="${yy}" stroke="#d9ddd8" stroke-width="0.6"/>`);
    out.push(`<text x="${PLOT.left - 4}" y="${n2(y(v) + 3)}" text-anchor="end" class="tick">${n2(v)}</text>`);
  }
  out.push(`<line x1="${PLOT.left}" x2="${PLOT.left}" y1="${PLOT.top}" y2="${PLOT.bottom}" stroke="${INK}" stroke-width="0.8"/>`);
  out.push(`<line x1="${PLOT.left}" x2="${PLOT.right}" y1="${PLOT.bottom}" y2="${PLOT.bottom}" stroke="${INK}" stroke-width="0.8"/>`);
  const midY = (PLOT.top + PLOT.bottom) / 2;
  out.push(`<text x="12" y="${n2(midY)}" text-anchor="middle" transform="rotate(-90 12 ${n2(midY)})" class="axis-title">Longest axial diameter (mm)</text>`);

  // Visit dates on the time axis; a label too close to the previous one is left out, its tick stays.
  let lastLabelX = -Infinity;
  for (const d of [...new Set(chart.visitDates)].sort()) {
    const xx = x(d);
    out.push(`<line x1="${n2(xx)}" x2="${n2(xx)}" y1="${PLOT.bottom}" y2="${PLOT.bottom + 4}" stroke="${INK}" stroke-width="0.8"/>`);
    if (xx - lastLabelX >= 64) {
      out.push(`<text x="${n2(xx)}" y="${PLOT.bottom + 15}" text-anchor="middle" class="tick">${esc(d)}</text>`);
      lastLabelX = xx;
    }
  }
  out.push(`<text x="${n2((PLOT.left + PLOT.right) / 2)}" y="${H - 4}" text-anchor="middle" class="axis-title">Visit date (YYYY-MM-DD)</text>`);

  // Treatments inside the charted period, as dotted lines with their label.
  for (const tr of chart.treatments) {
    const t = time(tr.date);
    if (!(t >= t0 && t <= t1)) continue;
    const xx = n2(x(tr.date));
    const label = tr.label.length > 28 ? `${tr.label.slice(0, 27)}…` : tr.label;
    out.push(`<line x1="${xx}" x2="${xx}" y1="${PLOT.top - 6}" y2="${PLOT.bottom}" stroke="#5b6770" stroke-width="0.8" stroke-dasharray="1.5 2"/>`);
    out.push(`<text x="${n2(x(tr.date) + 3)}" y="${PLOT.top - 8}" class="note-text">${esc(label)} (${esc(tr.date)})</text>`);
  }

  if (chart.series.length === 0) {
    out.push(`<text x="${n2((PLOT.left + PLOT.right) / 2)}" y="${n2(midY)}" text-anchor="middle" class="note-text">No lesions recorded</text>`);
  }

  // Lines: casings first, then colours, then marks, so no line hides another's marks.
  const lines = chart.series.map((s) => s.points.map((p) => `${n2(x(p.date))},${n2(y(p.longestAxialMm))}`).join(' '));
  chart.series.forEach((s, k) => {
    if (s.points.length > 1) out.push(`<polyline points="${lines[k]}" fill="none" stroke="${INK}" stroke-width="3.2" stroke-linejoin="round"${s.target ? '' : ' stroke-dasharray="5 3"'}/>`);
  });
  chart.series.forEach((s, k) => {
    if (s.points.length > 1) out.push(`<polyline points="${lines[k]}" fill="none" stroke="${segmentColour(s.segment)}" stroke-width="1.8" stroke-linejoin="round"${s.target ? '' : ' stroke-dasharray="5 3"'}/>`);
  });
  for (const s of chart.series) {
    const colour = segmentColour(s.segment);
    for (const p of s.points) {
      const xx = x(p.date), yy = y(p.longestAxialMm);
      if (p.status !== 'present') out.push(cross(xx, yy));
      else out.push(mark(xx, yy, colour, s.target));
    }
  }

  // Legend to the right of the plot, in two columns when there are many tracks; the line style
  // and mark say target or not, so the entries stay short.
  const twoColumns = chart.series.length > 11;
  const perColumn = twoColumns ? Math.ceil(chart.series.length / 2) : chart.series.length;
  const rowH = Math.min(13, (PLOT.bottom - PLOT.top - 22) / Math.max(1, perColumn));
  const colW = 54;
  chart.series.forEach((s, k) => {
    const lx = PLOT.right + 10 + (twoColumns ? Math.floor(k / perColumn) * colW : 0);
    const yy = PLOT.top + 4 + (k % perColumn) * rowH;
    const dash = s.target ? '' : ' stroke-dasharray="4 2"';
    out.push(`<line x1="${lx}" x2="${lx + 14}" y1="${n2(yy)}" y2="${n2(yy)}" stroke="${INK}" stroke-width="3.2"${dash}/>`);
    out.push(`<line x1="${lx}" x2="${lx + 14}" y1="${n2(yy)}" y2="${n2(yy)}" stroke="${segmentColour(s.segment)}" stroke-width="1.8"${dash}/>`);
    out.push(mark(lx + 7, yy, segmentColour(s.segment), s.target));
    out.push(`<text x="${lx + 18}" y="${n2(yy + 3.5)}" class="legend">${esc(s.track)} ${esc(s.segment ?? 'outside')}</text>`);
  });
  // The key to line styles and marks, under the legend.
  const lx = PLOT.right + 10;
  let ky = PLOT.bottom - (chart.series.some((s) => s.points.some((p) => p.status !== 'present')) ? 22 : 11);
  out.push(mark(lx + 4, ky - 3, '#ffffff', true), `<text x="${lx + 11}" y="${n2(ky)}" class="note-text">target</text>`);
  out.push(mark(lx + 50, ky - 3, '#ffffff', false), `<text x="${lx + 57}" y="${n2(ky)}" class="note-text">other</text>`);
  if (chart.series.some((s) => s.points.some((p) => p.status !== 'present'))) {
    ky += 11;
    out.push(cross(lx + 4, ky - 3), `<text x="${lx + 11}" y="${n2(ky)}" class="note-text">gone/merged, 0 mm</text>`);
  }
  out.push('</svg>');
  return out.join('');
}

function mark(x: number, y: number, colour: string, target: boolean): string {
  return target
    ? `<circle cx="${n2(x)}" cy="${n2(y)}" r="3.1" fill="${colour}" stroke="${INK}" stroke-width="0.9"/>`
    : `<rect x="${n2(x - 2.8)}" y="${n2(y - 2.8)}" width="5.6" height="5.6" fill="${colour}" stroke="${INK}" stroke-width="0.9"/>`;
}

function cross(x: number, y: number): string {
  const d = 3;
  return `<path d="M${n2(x - d)} ${n2(y - d)}L${n2(x + d)} ${n2(y + d)}M${n2(x - d)} ${n2(y + d)}L${n2(x + d)} ${n2(y - d)}" stroke="${INK}" stroke-width="1.3"/>`;
}
