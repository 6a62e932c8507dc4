import type { BoardRemnant, BoardSummary, BoardTrackCell, BoardVisitRow } from './board-summary.js';
import { boardCss, type PageSize } from './board-style.js';
import { COMPUTED_RESPONSE } from '../caution.js';
import { REMNANT_SCOPE } from '../remnant/planner.js';
import { esc } from './html-escape.js';
import { segmentDiagramSvg } from './segment-diagram-svg.js';
import { sizeChartSvg } from './size-chart-svg.js';

/**
 * The board summary as HTML: one self-contained page, no scripts and no external resources, charts as
 * inline SVG. `boardSheetHtml` is the page's body, which the app shows and prints as it is;
 * `boardDocument` wraps it in a file with its stylesheet for the command line and headless printing.
 * Every value from the data goes through `esc`.
 */

/** Lengths and volumes with one decimal, as the app's screens show them, so a figure reads the same on both. */
const oneDecimal = (x: number) => x.toFixed(1);
const mm = (x: number | null | undefined) => (x === null || x === undefined ? '—' : oneDecimal(x));
const pct = (x: number | null) => (x === null ? '—' : `${x > 0 ? '+' : ''}${x.toFixed(1)}%`);
const share = (x: number) => `${(x * 100).toFixed(0)}%`;
const ids = (xs: readonly string[]) => (xs.length ? xs.map(esc).join(', ') : '—');

export function boardSheetHtml(s: BoardSummary): string {
  const h: string[] = [];
  h.push(`<article class="board-sheet" data-testid="board-sheet">`);
  h.push(header(s));
  h.push(`<p class="b-caution" role="note">${esc(s.caution)}</p>`);
  if (s.patient.pseudonymNote) h.push(`<p class="b-pseudonym">${esc(s.patient.pseudonymNote)}</p>`);
  h.push(headline(s));
  h.push(responseSummaryLines(s));
  h.push(`<div class="b-row">`);
  h.push(
    `<section class="b-col-chart"><h2>Size per lesion track <span class="b-h2-note">longest axial diameter, coloured by segment</span></h2>${sizeChartSvg(s.chart)}</section>`,
  );
  h.push(
    `<section class="b-col-diagram"><h2>Segments at ${esc(s.diagram.visit)} <span class="b-h2-note">${esc(s.diagram.date)}, seen from the front${s.diagram.fromLandmarks ? '; map from landmarks, flat-plane approximation' : ''}</span></h2>` +
      `${segmentDiagramSvg(s.diagram)}</section>`,
  );
  h.push(`</div>`);
  h.push(visitsTable(s));
  h.push(lesionTable(s));
  h.push(`<div class="b-row">`);
  h.push(alertsBlock(s));
  h.push(remnantBlock(s.remnant));
  h.push(`</div>`);
  if (s.warnings.length) {
    h.push(
      `<section class="b-warnings"><h2>Warnings</h2><ul>${s.warnings.map((w) => `<li>${esc(w)}</li>`).join('')}</ul>` +
        (s.warningsLeftOut ? `<p class="b-left-out">${s.warningsLeftOut} more warning(s): see the app or \`falciform followup\`.</p>` : '') +
        `</section>`,
    );
  }
  // Room left on the page is for the board's own hand-written notes.
  h.push(`<section class="b-notes"><p>Board discussion: decision, reasons, next step</p></section>`);
  h.push(
    `<footer class="b-foot"><span>Made ${esc(s.madeAt)}</span><span>Falciform ${esc(s.version)}</span><span>Lengths in mm, volumes in mL, dates YYYY-MM-DD</span>` +
      `<span>${esc(s.patient.label)} · board summary</span></footer>`,
  );
  h.push(`</article>`);
  return h.join('\n');
}

function header(s: BoardSummary): string {
  const facts = [
    ...s.patient.facts.map((f) => `${f.label} ${f.value}`),
    `Criteria ${s.criteria}`,
    `Margin ${s.marginMm} mm`,
    `Targets ${s.targets.tracks.join(', ') || 'none'} (${s.targets.source === 'named' ? 'named' : 'default selection'})`,
  ];
  return (
    `<header class="b-head"><div><p class="b-kind">Board summary · patient</p>` +
    `<h1 data-testid="board-patient">${esc(s.patient.label)}${s.patient.demo ? '<span class="b-demo">demo, invented patient</span>' : ''}</h1>` +
    `<p class="b-facts">${facts.map((f) => `<span>${esc(f)}</span>`).join('')}</p></div>` +
    `<p class="b-made">Made ${esc(s.madeAt)}<br>Falciform ${esc(s.version)}</p></header>`
  );
}

function headline(s: BoardSummary): string {
  const v = s.latest;
  const isBaseline = s.visits.length === 1 || v.response === 'baseline';
  const sums = isBaseline
    ? `target sum ${mm(v.targetSumMm)} mm at baseline`
    : `target sum ${mm(v.targetSumMm)} mm${v.targetSumComplete ? '' : ' (incomplete)'}, ${pct(v.changeFromBaselinePct)} vs baseline, ${pct(v.changeFromNadirPct)} vs nadir`;
  const other = v.otherResponses.length ? ` · ${v.otherResponses.map(esc).join(' · ')}` : '';
  return (
    `<div class="b-headline"><span>Response at ${esc(v.id)} (${esc(v.date)}), ${esc(s.criteria)}</span>` +
    `<span class="b-category" data-testid="board-response">${esc(v.response)}</span><span class="b-computed" data-testid="board-computed" title="${esc(COMPUTED_RESPONSE)}">computed, not read</span>` +
    `<span class="b-sub">${esc(sums)}${other}${v.newTracks.length ? ` · new: ${ids(v.newTracks)}` : ''}</span></div>`
  );
}

/** Best overall response, the liver-only scope and what still waits for a reader's call. */
function responseSummaryLines(s: BoardSummary): string {
  const r = s.responseSummary;
  const parts = [`Best overall response: ${r.best}.`, r.scope, ...(r.departures.length ? [`Protocol: ${r.departures.join('; ')}.`] : []), ...r.pending.slice(-2)];
  return `<p class="b-left-out" data-testid="board-best-response">${parts.map(esc).join(' ')}</p>`;
}

function visitsTable(s: BoardSummary): string {
  const row = (v: BoardVisitRow) =>
    `<tr><th scope="row">${esc(v.id)}</th><td class="nw">${esc(v.date)}</td><td class="num">${v.daysFromBaseline}</td>` +
    `<td class="nw">${v.segmentMap === 'imported' ? 'imported' : 'from landmarks†'}</td><td class="num">${v.lesionCount} <span class="b-muted">${esc(v.lesionSource)}</span></td>` +
    `<td class="num">${mm(v.targetSumMm)}${v.targetSumComplete ? '' : '*'}</td><td class="num">${esc(pct(v.changeFromBaselinePct))}</td><td class="num">${esc(pct(v.changeFromNadirPct))}</td>` +
    `<td><span class="b-cat">${esc(v.response)}</span>${v.otherResponses.length ? ` <span class="b-muted">(${v.otherResponses.map(esc).join('; ')})</span>` : ''}</td>` +
    `<td>${ids(v.newTracks)}</td><td>${ids(v.goneTracks)}</td><td${v.alertTracks.length ? ' class="b-alert"' : ''}>${ids(v.alertTracks)}</td></tr>`;
  return (
    `<section><h2>Visits and response <span class="b-h2-note">${esc(s.criteria)}, computed from the sums of target ${s.criteria === 'mRECIST' ? 'viable (enhancing) diameters' : 'longest axial diameters'}; a qualified reader confirms` +
    `${s.visits.some((v) => v.segmentMap !== 'imported') ? '; † map from landmarks: flat-plane approximation' : ''}</span></h2>` +
    `<table><thead><tr><th scope="col">Visit</th><th scope="col">Date</th><th scope="col" class="num">Day</th><th scope="col">Segment map</th><th scope="col" class="num">Lesions</th>` +
    `<th scope="col" class="num">Target sum mm</th><th scope="col" class="num">vs baseline</th><th scope="col" class="num">vs nadir</th><th scope="col">Response</th>` +
    `<th scope="col">New</th><th scope="col">Gone</th><th scope="col">Margin alerts</th></tr></thead><tbody>` +
    s.visits.map(row).join('') +
    `</tbody></table>` +
    (s.visitsLeftOut.length ? `<p class="b-left-out">Visits ${ids(s.visitsLeftOut)} are left out of this table; the chart shows them.</p>` : '') +
    (s.visits.some((v) => !v.targetSumComplete) ? `<p class="b-left-out">* a target was not evaluable: the sum is of the others.</p>` : '') +
    `</section>`
  );
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

function lesionTable(s: BoardSummary): string {
  const t = s.lesionTable;
  const head = t.visits.map((v) => `<th scope="col" class="nw">${esc(v.id)} <span class="b-muted">${esc(v.date)}</span></th>`).join('');
  const rows = t.rows.map(
    (r) =>
      `<tr data-track="${esc(r.id)}"><th scope="row">${esc(r.id)}</th><td>${r.segmentPath.map((x) => esc(x ?? 'outside')).join(' → ') || '—'}</td>` +
      `<td>${r.target ? 'target' : 'non-target'}${r.newAt ? `, new at ${esc(r.newAt)}` : ''}</td>${r.cells.map(cellText).join('')}</tr>`,
  );
  return (
    `<section><h2>Lesion tracks <span class="b-h2-note">lesion id and longest axial diameter (mm) per visit${t.viable ? ', then the viable (enhancing) diameter (mm, mRECIST)' : ''}; <span class="b-mark"></span>margin alert</span></h2>` +
    `<table><thead><tr><th scope="col">Track</th><th scope="col">Segment</th><th scope="col">Role</th>${head}</tr></thead><tbody>` +
    (rows.length ? rows.join('') : `<tr><td colspan="${3 + t.visits.length}">No lesions at any visit.</td></tr>`) +
    `</tbody></table>` +
    (t.visitsLeftOut.length ? `<p class="b-left-out">Visits ${ids(t.visitsLeftOut)} are left out of this table; the chart shows them.</p>` : '') +
    (t.tracksLeftOut.length ? `<p class="b-left-out">Tracks ${ids(t.tracksLeftOut)} are left out of this page; the case-form export lists every lesion.</p>` : '') +
    `</section>`
  );
}

function alertsBlock(s: BoardSummary): string {
  const items = s.alerts.map(
    (a) =>
      `<li${a.latest ? ' class="b-alert"' : ''}>${esc(a.visit)} ${esc(a.date)} · ${esc(a.track)} (${ids(a.lesions)}) in ${esc(a.segment ?? 'outside')}: ` +
      `${alertDistance(a.marginMm, a.nearestOtherSegment)}</li>`,
  );
  return (
    `<section class="b-col-half"><h2>Margin alerts <span class="b-h2-note">lesion closer than ${esc(s.marginMm)} mm to another segment</span></h2>` +
    (items.length ? `<ul class="b-list">${items.join('')}</ul>` : `<p>No margin alert at any visit.</p>`) +
    (s.alertsLeftOut ? `<p class="b-left-out">${s.alertsLeftOut} earlier alert(s) left out; see the visits table.</p>` : '') +
    `</section>`
  );
}

/** A margin of 0 means the lesion reaches into the other segment (brief: measures). */
function alertDistance(marginMm: number | null, other: string | null): string {
  if (marginMm === null) return 'margin not measured';
  if (marginMm === 0 && other) return `reaches into ${esc(other)} (0 mm)`;
  return `${esc(mm(marginMm))} mm${other ? ` from ${esc(other)}` : ''}`;
}

function remnantBlock(r: BoardRemnant | null): string {
  if (!r) return `<section class="b-col-half"><h2>Remnant</h2><p class="b-muted">No resection proposed for this page.</p></section>`;
  const minimums = r.minimums.map((m) => `${share(m.minimumShare)} ${esc(m.context)} (${m.met ? 'above' : 'below'})`).join(', ');
  const crossing = r.lesionsCrossingCut.map((c) => `${esc(c.label)} (${share(c.keptShare)} stays)`).join(', ');
  return (
    `<section class="b-col-half" data-testid="board-remnant"><h2>Remnant <span class="b-h2-note">${esc(r.visit)} ${esc(r.date)}${r.estimated ? ', tumour volumes estimated from diameters' : ''}</span></h2>` +
    `<ul class="b-list"><li><b>${esc(r.resection)}</b>: removes ${ids(r.removedSegments)}; remnant ${ids(r.remnantSegments)}</li>` +
    `<li>Remnant ${esc(oneDecimal(r.remnantMl))} mL of ${esc(oneDecimal(r.tumourFreeLiverMl))} mL tumour-free liver (${share(r.remnantShare)}); ` +
    `${r.compared.kind === 'standardised' ? 'standardised remnant' : 'measured share'} ${share(r.compared.value)}${r.overFull ? ' (over 100%: see below)' : ''}</li>` +
    `<li>Commonly quoted minimums (common practice, from memory): ${minimums}</li>` +
    `<li>Lesions wholly in the remnant: ${ids(r.lesionsInRemnant)}${crossing ? `; crossing the cut: ${crossing}` : ''}` +
    `${r.alertLesionsAtTransection.length ? `; close to the cut: ${ids(r.alertLesionsAtTransection)}` : ''}</li>` +
    (r.overFull ? `<li>${esc(r.overFull)}</li>` : '') +
    `<li class="b-muted">${esc(REMNANT_SCOPE)}</li></ul></section>`
  );
}

/**
 * A complete HTML file: the page with its stylesheet and its fonts (`fontFaceCss`, the shipped fonts
 * as data URLs), safe to open anywhere (its own CSP forbids scripts and fetches).
 */
export function boardDocument(s: BoardSummary, page: PageSize, fontFaceCss: string): string {
  return (
    `<!doctype html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n` +
    `<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; font-src data:">\n` +
    `<title>Board summary ${esc(s.patient.label)}</title>\n<style>\n${fontFaceCss}\n${boardCss(page)}\nhtml, body { margin: 0; background: #ffffff; }\n</style>\n</head>\n<body>\n` +
    `${boardSheetHtml(s)}\n</body>\n</html>\n`
  );
}
