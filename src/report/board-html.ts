import type { BoardAlert, BoardKeyImage, BoardKeyImagePair, BoardRemnant, BoardSummary, BoardTrackCell, BoardVisitRow } from './board-summary.js';
import { SOFT_TISSUE_WINDOW } from './key-image.js';
import { boardCss, type PageSize } from './board-style.js';
import { COMPUTED_RESPONSE } from '../caution.js';
import { REMNANT_SCOPE } from '../remnant/planner.js';
import { planSheets, type FlowSection, type SheetPlan } from './board-sheets.js';
import { SHEET_MM as G } from './board-style.js';
import { esc } from './html-escape.js';
import { lineCount, textWidthMm, type Face } from './text-measure.js';
import { segmentDiagramSvg } from './segment-diagram-svg.js';
import { sizeChartSvg } from './size-chart-svg.js';

/**
 * The board summary as HTML: self-contained sheets, no scripts and no external resources, charts as
 * inline SVG. `boardSheetsHtml` gives each sheet's markup (the app shows and prints them as they are);
 * `boardDocument` wraps them in a file with its stylesheet for the command line and headless printing.
 * Every value from the data goes through `esc`. The first sheet holds the headline, the chart and the
 * diagram; the tables and lists follow and run over as many sheets as their rows need (planSheets),
 * each sheet saying which of how many it is, and a sheet that does not end the page saying so.
 */

/** Lengths and volumes with one decimal, as the app's screens show them, so a figure reads the same on both. */
const oneDecimal = (x: number) => x.toFixed(1);
const mm = (x: number | null | undefined) => (x === null || x === undefined ? '—' : oneDecimal(x));
const pct = (x: number | null) => (x === null ? '—' : `${x > 0 ? '+' : ''}${x.toFixed(1)}%`);
const share = (x: number) => `${(x * 100).toFixed(0)}%`;
const ids = (xs: readonly string[]) => (xs.length ? xs.map(esc).join(', ') : '—');

const DECODE: Record<string, string> = { '&amp;': '&', '&lt;': '<', '&gt;': '>', '&quot;': '"', '&#39;': "'" };
/** The text a piece of the page's markup shows: what its height is counted from. */
function shownText(html: string): string {
  return html.replace(/<[^>]*>/g, '').replace(/&(amp|lt|gt|quot|#39);/g, (e) => DECODE[e]);
}
/** Lines a piece of markup wraps into in a box of the given width. */
const lines = (html: string, widthMm: number, pt: number = G.bodyPt, face: Face = 'regular') => lineCount(shownText(html), widthMm, pt, face);
/** A heading's height: its wrapped lines (counted as bold, the wider face) and its rule and space. */
const h2Mm = (html: string, widthMm = G.width) => lines(html, widthMm, G.h2Pt, 'bold') * G.line + G.h2Extra;
const leftOutMm = (html: string) => 0.4 + lines(html, G.width, G.bodyPt, 'italic') * G.line;

/** A section as planned and drawn: its heights and how to draw rows [from, to). */
interface Section extends FlowSection {
  title: string;
  draw(from: number, to: number, continued: boolean): string;
}

const CONTINUED = ' <span class="b-continued">(continued)</span>';

function h2(title: string, note: string, continued = false): string {
  return `<h2>${title}${continued ? CONTINUED : ''}${note ? ` <span class="b-h2-note">${note}</span>` : ''}</h2>`;
}

/** A table section: heading, header row repeated on every sheet, one-line rows, notes under the last row. */
function tableSection(id: string, title: string, note: string, headRow: string, rows: string[], empty: string, foot: string): Section {
  const body = rows.length ? rows : [empty];
  return {
    id,
    title,
    headMm: (continued) => G.sectionGap + h2Mm(h2(title, note, continued)) + G.row,
    rowsMm: body.map(() => G.row),
    footMm: foot ? leftOutMm(foot) : 0,
    draw: (from, to, continued) =>
      `<section data-section="${id}"${continued ? ' data-continued="true"' : ''}>${h2(title, note, continued)}<table><thead>${headRow}</thead><tbody>` +
      body.slice(from, to).join('') + `</tbody></table>${to === body.length ? foot : ''}</section>`,
  };
}

/** A list section: heading and items that may wrap; each item is a row. */
function listSection(id: string, title: string, note: string, items: string[], opts: { cls?: string; small?: boolean } = {}): Section {
  const [pt, line] = opts.small ? [G.smallPt, G.smallLine] : [G.bodyPt, G.line];
  return {
    id,
    title,
    headMm: (continued) => G.sectionGap + h2Mm(h2(title, note, continued)),
    rowsMm: items.map((it) => lines(it, G.width, pt, 'bold') * line + 0.45),
    footMm: 0,
    draw: (from, to, continued) =>
      `<section data-section="${id}"${opts.cls ? ` class="${opts.cls}"` : ''}>${h2(title, note, continued)}<ul class="b-list">` +
      items.slice(from, to).map((it) => `<li>${it}</li>`).join('') + `</ul></section>`,
  };
}

/** Each sheet's markup, the first sheet first. */
export function boardSheetsHtml(s: BoardSummary): string[] {
  const { plans, sections, firstTop } = layout(s);
  const byId = new Map(sections.map((x) => [x.id, x]));
  const count = plans.length;
  return plans.map((plan, k) => {
    const h: string[] = [];
    h.push(`<article class="board-sheet" data-testid="board-sheet" data-sheet="${k + 1}" data-sheets="${count}">`);
    h.push(header(s, k + 1, count));
    h.push(`<p class="b-caution" role="note">${esc(s.caution)}</p>`);
    if (k === 0) h.push(...firstTop.map((b) => b.html));
    for (const part of plan.parts) h.push(byId.get(part.section)!.draw(part.from, part.to, part.continued));
    if (k + 1 < count) {
      const next = plans[k + 1].parts.map((p) => byId.get(p.section)!.title);
      h.push(`<p class="b-continues" data-testid="board-continues">Continued on sheet ${k + 2} of ${count}: ${[...new Set(next)].join(', ')}.</p>`);
    } else {
      // Room left on the last sheet is for the board's own hand-written notes.
      h.push(`<section class="b-notes"><p>Board discussion: decision, reasons, next step</p></section>`);
    }
    h.push(
      `<footer class="b-foot"><span>Made ${esc(s.madeAt)}</span><span>Falciform ${esc(s.version)}</span><span>Lengths in mm, volumes in mL, dates YYYY-MM-DD</span>` +
        `<span>${esc(s.patient.label)} · board summary · sheet ${k + 1} of ${count}</span></footer>`,
    );
    h.push(`</article>`);
    return h.join('\n');
  });
}

/** The whole page, every sheet. */
export function boardSheetHtml(s: BoardSummary): string {
  return boardSheetsHtml(s).join('\n');
}

/** How many sheets the page takes, and what each holds. */
export function boardSheetPlan(s: BoardSummary): SheetPlan[] {
  return layout(s).plans;
}

function layout(s: BoardSummary) {
  const firstTop = topBlocks(s);
  const sections = flowSections(s);
  const headerMm = headerHeightMm(s);
  const cautionMm = 3 + 2 + lines(esc(s.caution), G.width - 5, G.bodyPt, 'bold') * G.line;
  const plans = planSheets(
    {
      sheetMm: G.height,
      firstTopMm: headerMm + cautionMm + firstTop.reduce((a, b) => a + b.mm, 0),
      laterTopMm: headerMm + cautionMm,
      bottomMm: G.notesMin + G.footer,
    },
    sections,
  );
  return { plans, sections, firstTop };
}

/** The first sheet's blocks above the tables, each with its height. */
function topBlocks(s: BoardSummary): { html: string; mm: number }[] {
  const out: { html: string; mm: number }[] = [];
  if (s.patient.pseudonymNote) {
    const html = `<p class="b-pseudonym">${esc(s.patient.pseudonymNote)}</p>`;
    out.push({ html, mm: 1.5 + 1.6 + 0.4 + lines(html, G.width - 4.4) * G.line });
  }
  out.push(headline(s));
  const summary = responseSummaryLines(s);
  out.push({ html: summary, mm: lines(summary, G.width, G.bodyPt, 'italic') * G.line + G.sectionGap });
  const both = G.width - G.columnGap;
  const chartW = (both * G.chartShare) / (G.chartShare + G.diagramShare);
  const diagramW = both - chartW;
  const chartH2 = h2('Size per lesion track', 'longest axial diameter, coloured by segment');
  const diagramH2 = h2(
    `Segments at ${esc(s.diagram.visit)}`,
    `${esc(s.diagram.date)}, seen from the front${s.diagram.fromLandmarks ? '; map from landmarks, flat-plane approximation' : ''}`,
  );
  out.push({
    html:
      `<div class="b-row"><section class="b-col-chart">${chartH2}${sizeChartSvg(s.chart)}</section>` +
      `<section class="b-col-diagram">${diagramH2}${segmentDiagramSvg(s.diagram)}</section></div>`,
    mm: Math.max(h2Mm(chartH2, chartW) + (chartW * CHART_ASPECT[1]) / CHART_ASPECT[0], h2Mm(diagramH2, diagramW) + (diagramW * DIAGRAM_ASPECT[1]) / DIAGRAM_ASPECT[0]) + G.sectionGap,
  });
  return out;
}

/** The drawings' view boxes (size-chart-svg.ts, diagram-layout.ts): their printed height follows the column width. */
const CHART_ASPECT = [470, 244] as const;
const DIAGRAM_ASPECT = [640, 440] as const;

function flowSections(s: BoardSummary): Section[] {
  const out = [visitsSection(s), tracksSection(s), alertsSection(s)];
  if (s.keyImages) out.push(keyImagesSection(s.keyImages));
  out.push(remnantSection(s.remnant));
  if (s.warnings.length) out.push(listSection('warnings', 'Warnings', '', s.warnings.map(esc), { cls: 'b-warnings', small: true }));
  return out;
}

function factsOf(s: BoardSummary): string[] {
  return [
    ...s.patient.facts.map((f) => `${f.label} ${f.value}`),
    `Criteria ${s.criteria}`,
    `Margin ${s.marginMm} mm`,
    `Targets ${s.targets.tracks.join(', ') || 'none'} (${s.targets.source === 'named' ? 'named' : 'default selection'})`,
  ];
}

function header(s: BoardSummary, sheet: number, count: number): string {
  return (
    `<header class="b-head"><div><p class="b-kind">Board summary · patient${count > 1 ? ` · sheet ${sheet} of ${count}` : ''}</p>` +
    `<h1 data-testid="board-patient">${esc(s.patient.label)}${s.patient.demo ? '<span class="b-demo">demo, invented patient</span>' : ''}</h1>` +
    `<p class="b-facts">${factsOf(s).map((f) => `<span>${esc(f)}</span>`).join('')}</p></div>` +
    `<p class="b-made">Made ${esc(s.madeAt)}<br>Falciform ${esc(s.version)}</p></header>`
  );
}

/** The header: kind line, name, facts (wrapping beside the "made" lines), rule. */
function headerHeightMm(s: BoardSummary): number {
  const madeW = Math.max(textWidthMm(`Made ${s.madeAt}`, G.bodyPt), textWidthMm(`Falciform ${s.version}`, G.bodyPt));
  const factsLines = lineCount(factsOf(s).join(' · '), G.width - 4 - madeW, G.bodyPt);
  return Math.max(3 + 5.5 + 0.5 + factsLines * G.line, 2 * G.line) + 1.7;
}

/**
 * The response line: items that wrap as whole items onto further lines (flex-wrap), the long
 * sub-line wrapping inside itself when it is wider than the sheet.
 */
function headline(s: BoardSummary): { html: string; mm: number } {
  const v = s.latest;
  const isBaseline = s.visits.length === 1 || v.response === 'baseline';
  const sums = isBaseline
    ? `target sum ${mm(v.targetSumMm)} mm at baseline`
    : v.targetSumComplete
      ? `target sum ${mm(v.targetSumMm)} mm, ${pct(v.changeFromBaselinePct)} vs baseline, ${pct(v.changeFromNadirPct)} vs nadir`
      : 'target sum NE (a target not evaluable)';
  const other = v.otherResponses.length ? ` · ${v.otherResponses.map(esc).join(' · ')}` : '';
  const items = [
    { html: `<span>Response at ${esc(v.id)} (${esc(v.date)}), ${esc(s.criteria)}</span>`, pt: G.bodyPt, pad: 0, extra: 0, line: G.line },
    { html: `<span class="b-category" data-testid="board-response">${esc(v.response)}</span>`, pt: 12, pad: 4, extra: 0.8, line: 5 },
    { html: `<span class="b-computed" data-testid="board-computed" title="${esc(COMPUTED_RESPONSE)}">computed, not read</span>`, pt: G.bodyPt, pad: 0, extra: 0.2, line: G.line },
    { html: `<span class="b-sub">${esc(sums)}${other}${v.newTracks.length ? ` · new: ${ids(v.newTracks)}` : ''}</span>`, pt: G.bodyPt, pad: 0, extra: 0, line: G.line },
  ];
  let x = 0;
  let rowH = 0;
  let total = 0;
  for (const it of items) {
    const w = Math.min(G.width, textWidthMm(shownText(it.html), it.pt, 'bold') + it.pad);
    const h = lines(it.html, G.width - it.pad, it.pt, 'bold') * it.line + it.extra;
    if (x > 0 && x + 3 + w > G.width) {
      total += rowH + 1;
      x = 0;
      rowH = 0;
    }
    x += (x > 0 ? 3 : 0) + w;
    rowH = Math.max(rowH, h);
  }
  return { html: `<div class="b-headline">${items.map((it) => it.html).join('')}</div>`, mm: total + rowH + 1.5 };
}

/** Best overall response, the liver-only scope and what still waits for a reader's call. */
function responseSummaryLines(s: BoardSummary): string {
  const r = s.responseSummary;
  const parts = [`Best overall response: ${r.best}.`, r.scope, ...(r.departures.length ? [`Protocol: ${r.departures.join('; ')}.`] : []), ...r.pending];
  return `<p class="b-summary" data-testid="board-best-response">${parts.map(esc).join(' ')}</p>`;
}

/**
 * One line per visit. Rows stay one line so the table keeps its planned height: the map's origin is a
 * mark on the visit, and the alert column counts the alerted tracks, which the alert table names.
 */
function visitsSection(s: BoardSummary): Section {
  const row = (v: BoardVisitRow) =>
    `<tr data-visit="${esc(v.id)}"><th scope="row">${esc(v.id)}${v.segmentMap === 'imported' ? '' : '†'}</th><td>${esc(v.date)}</td><td class="num">${v.daysFromBaseline}</td>` +
    `<td class="num">${v.lesionCount} <span class="b-muted">${esc(v.lesionSource)}</span></td>` +
    (v.targetSumComplete
      ? `<td class="num">${mm(v.targetSumMm)}</td><td class="num">${esc(pct(v.changeFromBaselinePct))}</td><td class="num">${esc(pct(v.changeFromNadirPct))}</td>`
      : `<td class="num">NE*</td><td class="num">NE</td><td class="num">NE</td>`) +
    `<td><span class="b-cat">${esc(v.response)}</span>${v.otherResponses.length ? ` <span class="b-muted">(${v.otherResponses.map(esc).join('; ')})</span>` : ''}</td>` +
    `<td>${ids(v.newTracks)}</td><td>${ids(v.goneTracks)}</td><td class="num${v.alertTracks.length ? ' b-alert' : ''}" title="${esc(v.alertTracks.join(', '))}">${v.alertTracks.length || '—'}</td></tr>`;
  const head =
    `<tr><th scope="col">Visit</th><th scope="col">Date</th><th scope="col" class="num">Day</th><th scope="col" class="num">Lesions</th>` +
    `<th scope="col" class="num">Target sum mm</th><th scope="col" class="num">vs baseline</th><th scope="col" class="num">vs nadir</th><th scope="col">Response</th>` +
    `<th scope="col">New</th><th scope="col">Gone</th><th scope="col" class="num">Alerts</th></tr>`;
  const note =
    `${esc(s.criteria)}, computed from the sums of target ${s.criteria === 'mRECIST' ? 'viable (enhancing) diameters' : 'longest axial diameters'}; a qualified reader confirms` +
    `${s.visits.some((v) => v.segmentMap !== 'imported') ? '; † segment map from landmarks: flat-plane approximation' : ''}`;
  const foot = s.visits.some((v) => !v.targetSumComplete) ? `<p class="b-left-out">* NE: a target was not evaluable, so the sum and its changes are not given.</p>` : '';
  return tableSection('visits', 'Visits and response', note, head, s.visits.map(row), `<tr><td colspan="11">No visits.</td></tr>`, foot);
}

function cellText(c: BoardTrackCell | null): string {
  if (!c) return '<td class="b-muted">·</td>';
  const cls = c.alert ? ' class="b-alert"' : '';
  switch (c.status) {
    case 'present':
      return `<td${cls}>${ids(c.lesions)} ${mm(c.longestAxialMm)}${c.viableAxialMm !== undefined ? ` <span class="b-muted">viable ${mm(c.viableAxialMm)}</span>` : ''}</td>`;
    case 'gone':
      return `<td${cls}>gone</td>`;
    case 'merged':
      return `<td${cls}>merged into ${esc(c.mergedInto ?? '?')}</td>`;
    default:
      return `<td${cls}>not evaluable</td>`;
  }
}

function tracksSection(s: BoardSummary): Section {
  const t = s.lesionTable;
  const head =
    `<tr><th scope="col">Track</th><th scope="col">Segment</th><th scope="col">Role</th>` +
    t.visits.map((v) => `<th scope="col">${esc(v.id)} <span class="b-muted">${esc(v.date)}</span></th>`).join('') + `</tr>`;
  const rows = t.rows.map(
    (r) =>
      `<tr data-track="${esc(r.id)}"><th scope="row">${esc(r.id)}</th><td>${r.segmentPath.map((x) => esc(x ?? 'outside')).join(' → ') || '—'}</td>` +
      `<td>${r.target ? 'target' : 'non-target'}${r.newAt ? `, new at ${esc(r.newAt)}` : ''}</td>${r.cells.map(cellText).join('')}</tr>`,
  );
  const foot = t.visitsLeftOut.length ? `<p class="b-left-out">Visits ${ids(t.visitsLeftOut)} are left out of this table for width; the chart and the visits table show them.</p>` : '';
  return tableSection(
    'tracks', 'Lesion tracks', `lesion id and longest axial diameter (mm) per visit${t.viable ? ', then the viable (enhancing) diameter (mm, mRECIST)' : ''}; <span class="b-mark"></span>margin alert`, head, rows,
    `<tr><td colspan="${3 + t.visits.length}">No lesions at any visit.</td></tr>`, foot,
  );
}

/** One row per alerted track: its latest alert with the distance, and the earlier visits it was alerted at. */
function alertsSection(s: BoardSummary): Section {
  const byTrack = new Map<string, BoardAlert[]>();
  for (const a of s.alerts) byTrack.set(a.track, [...(byTrack.get(a.track) ?? []), a]);
  const head =
    `<tr><th scope="col">Track</th><th scope="col">Latest alert</th><th scope="col">Lesions</th><th scope="col">Segment</th>` +
    `<th scope="col">Distance to the other segment</th><th scope="col">Also alerted at</th></tr>`;
  const rows = [...byTrack.values()].map(([a, ...earlier]) =>
    `<tr data-alert-track="${esc(a.track)}"><th scope="row"${a.latest ? ' class="b-alert"' : ''}>${esc(a.track)}</th><td>${esc(a.visit)} ${esc(a.date)}</td><td>${ids(a.lesions)}</td>` +
    `<td>${esc(a.segment ?? 'outside')}</td><td>${alertDistance(a.marginMm, a.nearestOtherSegment)}</td><td>${ids(earlier.map((e) => e.visit))}</td></tr>`,
  );
  return tableSection(
    'alerts', 'Margin alerts', `lesion closer than ${esc(s.marginMm)} mm to another segment, by track; <span class="b-mark"></span>alerted at the latest visit`,
    head, rows, `<tr><td colspan="6">No margin alert at any visit.</td></tr>`, '',
  );
}

/** The key images: one tile per track (baseline and latest slice side by side), rows of tiles as the section's rows. */
function keyImagesSection(pairs: BoardKeyImagePair[]): Section {
  const title = 'Key images';
  const note =
    `axial slice through the centroid, baseline and latest visit, patient's right on the left; soft-tissue window ${SOFT_TISSUE_WINDOW.widthHu}/${SOFT_TISSUE_WINDOW.levelHu} HU; ` +
    'segment colour washed over the liver, lesion outline white, longest axial diameter magenta (dashed: measured in another slice)';
  const figure = (img: BoardKeyImage | null, missing: string) =>
    img
      ? `<figure><img src="${img.png}" alt="${esc(`${img.lesion} at ${img.visit}`)}" data-visit="${esc(img.visit)}" data-lesion="${esc(img.lesion)}">` +
        `<figcaption>${esc(img.visit)} ${esc(img.lesion)} ${img.source === 'mark' ? 'mark ' : ''}${esc(mm(img.longestAxialMm))} mm</figcaption></figure>`
      : `<figure><div class="b-key-none">${esc(missing)}</div><figcaption></figcaption></figure>`;
  const tile = (p: BoardKeyImagePair) =>
    `<div class="b-key" data-key-track="${esc(p.track)}"><p class="b-key-title${p.alert ? ' b-alert' : ''}">${esc(p.track)} ${p.target ? 'target' : 'non-target'}${p.alert ? ', margin alert' : ''} · ${esc(p.segment ?? 'outside')}</p>` +
    `<div class="b-key-pair">${figure(p.baseline, 'not seen at baseline')}${figure(p.latest, p.baseline ? 'not seen at the latest visit' : '')}</div></div>`;
  const rows: string[] = [];
  for (let k = 0; k < pairs.length; k += G.keysPerRow) rows.push(`<div class="b-keys-row">${pairs.slice(k, k + G.keysPerRow).map(tile).join('')}</div>`);
  const body = rows.length ? rows : ['<p class="b-keys-row b-muted">No target and no alerted lesion at the latest visit.</p>'];
  return {
    id: 'keys',
    title,
    headMm: (continued) => G.sectionGap + h2Mm(h2(title, note, continued)),
    rowsMm: body.map(() => G.keyRow),
    footMm: 0,
    draw: (from, to, continued) => `<section data-section="keys" data-testid="board-key-images">${h2(title, note, continued)}${body.slice(from, to).join('')}</section>`,
  };
}

/** A margin of 0 means the lesion reaches into the other segment (brief: measures). */
function alertDistance(marginMm: number | null, other: string | null): string {
  if (marginMm === null) return 'margin not measured';
  if (marginMm === 0 && other) return `reaches into ${esc(other)} (0 mm)`;
  return `${esc(mm(marginMm))} mm${other ? ` from ${esc(other)}` : ''}`;
}

function remnantSection(r: BoardRemnant | null): Section {
  if (!r) return listSection('remnant', 'Remnant', '', ['<span class="b-muted">No resection proposed for this page.</span>']);
  const minimums = r.minimums.map((m) => `${share(m.minimumShare)} ${esc(m.context)} (${m.met ? 'above' : 'below'})`).join(', ');
  const crossing = r.lesionsCrossingCut.map((c) => `${esc(c.label)} (${share(c.keptShare)} stays)`).join(', ');
  const items = [
    `<b>${esc(r.resection)}</b>: removes ${ids(r.removedSegments)}; remnant ${ids(r.remnantSegments)}`,
    `Remnant ${esc(oneDecimal(r.remnantMl))} mL of ${esc(oneDecimal(r.tumourFreeLiverMl))} mL tumour-free liver (${share(r.remnantShare)}); ` +
      `${r.compared.kind === 'standardised' ? 'standardised remnant' : 'measured share'} ${share(r.compared.value)}${r.overFull ? ' (over 100%: see below)' : ''}`,
    `Commonly quoted minimums (common practice, from memory): ${minimums}`,
    `Lesions wholly in the remnant: ${ids(r.lesionsInRemnant)}${crossing ? `; crossing the cut: ${crossing}` : ''}` +
      `${r.alertLesionsAtTransection.length ? `; close to the cut: ${ids(r.alertLesionsAtTransection)}` : ''}`,
    ...(r.overFull ? [esc(r.overFull)] : []),
    `<span class="b-muted">${esc(REMNANT_SCOPE)}</span>`,
  ];
  const sec = listSection('remnant', 'Remnant', `${esc(r.visit)} ${esc(r.date)}${r.estimated ? ', tumour volumes estimated from diameters' : ''}`, items);
  return { ...sec, draw: (from, to, continued) => sec.draw(from, to, continued).replace('<section data-section="remnant"', '<section data-section="remnant" data-testid="board-remnant"') };
}

/**
 * A complete HTML file: the page with its stylesheet and its fonts (`fontFaceCss`, the shipped fonts
 * as data URLs), safe to open anywhere (its own CSP forbids scripts and fetches).
 */
export function boardDocument(s: BoardSummary, page: PageSize, fontFaceCss: string): string {
  return (
    `<!doctype html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n` +
    `<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; font-src data:; img-src data:">\n` +
    `<title>Board summary ${esc(s.patient.label)}</title>\n<style>\n${fontFaceCss}\n${boardCss(page)}\nhtml, body { margin: 0; background: #ffffff; }\n</style>\n</head>\n<body>\n` +
    `${boardSheetHtml(s)}\n</body>\n</html>\n`
  );
}
