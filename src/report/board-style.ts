/**
 * The board summary's stylesheet, shared by the command line (a <style> in the file) and the app (a
 * constructable stylesheet, since the app's CSP allows no inline styles). Every rule is scoped to
 * .board-sheet so the app's own screens are untouched. One page: the page is filled top to bottom
 * in small type, and the content is capped in the summary model, not clipped here.
 */
import { MONO_FONT, SANS_FONT, fontStack } from './fonts.js';

export type PageSize = 'A4' | 'Letter';

export const PAGE_SIZES: readonly PageSize[] = ['A4', 'Letter'];

/** Printable width and height inside the page margins, mm. */
const PAGE_MARGIN_MM = 9;
const PAGE_MM: Record<PageSize, [number, number]> = { A4: [210, 297], Letter: [215.9, 279.4] };

function printableMm(page: PageSize): [number, number] {
  const [w, h] = PAGE_MM[page];
  return [w - 2 * PAGE_MARGIN_MM, h - 2 * PAGE_MARGIN_MM];
}

/**
 * The @page rule for one paper size. The layout is made for A4; on Letter, which is 18 mm shorter,
 * the A4 sheet is drawn smaller by the ratio of the printable heights, so it stays one page.
 */
function pageRule(page: PageSize): string {
  const rule = `@page { size: ${page === 'A4' ? 'A4' : 'letter'} portrait; margin: ${PAGE_MARGIN_MM}mm; }`;
  if (page === 'A4') return rule;
  // The A4 layout width is kept too: the charts scale with the width, and a wider sheet is a taller one.
  const zoom = Math.floor((printableMm('Letter')[1] / printableMm('A4')[1]) * 1000) / 1000;
  return `${rule}\n.board-sheet { zoom: ${zoom}; width: ${printableMm('A4')[0]}mm; margin: 0 auto; }`;
}

/**
 * The sheet fills the A4 printable height (less a little for rounding), so the space the content
 * leaves goes to the notes box above the footer and the footer sits at the foot of the page.
 */
const SHEET_MIN_HEIGHT_MM = 297 - 2 * PAGE_MARGIN_MM - 3;

const BOARD_CSS = `
.board-sheet {
  --b-ink: #1d2327; --b-muted: #55616a; --b-line: #c9cfca; --b-soft: #f1f3f1; --b-warn: #fff2cc; --b-warn-ink: #5c4100;
  box-sizing: border-box; color: var(--b-ink); background: #ffffff;
  display: flex; flex-direction: column; min-height: ${SHEET_MIN_HEIGHT_MM}mm;
  font-family: ${fontStack(SANS_FONT)}; font-size: 8.2pt; line-height: 1.22;
  -webkit-print-color-adjust: exact; print-color-adjust: exact;
}
.board-sheet *, .board-sheet *::before, .board-sheet *::after { box-sizing: border-box; }
.board-sheet h1, .board-sheet h2, .board-sheet p, .board-sheet ul { margin: 0; padding: 0; }
.board-sheet ul { list-style: none; }
.board-sheet .b-head { display: flex; align-items: flex-end; gap: 4mm; border-bottom: 0.5mm solid var(--b-ink); padding-bottom: 1.2mm; }
.board-sheet .b-kind { font-size: 7pt; letter-spacing: 0.08em; text-transform: uppercase; color: var(--b-muted); }
.board-sheet h1 { font-size: 14pt; line-height: 1.1; font-family: ${fontStack(MONO_FONT)}; }
.board-sheet .b-facts { color: var(--b-muted); margin-top: 0.5mm; }
.board-sheet .b-facts span + span::before { content: ' · '; }
.board-sheet .b-made { margin-left: auto; text-align: right; color: var(--b-muted); white-space: nowrap; }
.board-sheet .b-demo { margin-left: 1.5mm; font-family: ${fontStack(SANS_FONT)}; font-size: 7pt; font-weight: normal; border: 0.2mm solid var(--b-line); border-radius: 1mm; padding: 0 1mm; vertical-align: middle; }
.board-sheet .b-caution { margin: 1.5mm 0; padding: 1mm 2mm; background: var(--b-warn); color: var(--b-warn-ink); border-left: 1mm solid var(--b-warn-ink); font-weight: bold; }
.board-sheet .b-pseudonym { margin: 0 0 1.5mm; padding: 0.8mm 2mm; border: 0.2mm dashed var(--b-muted); }
.board-sheet .b-headline { display: flex; flex-wrap: wrap; align-items: baseline; gap: 1mm 3mm; margin-bottom: 1.5mm; }
.board-sheet .b-category { font-size: 12pt; font-weight: bold; border: 0.4mm solid var(--b-ink); border-radius: 1mm; padding: 0 1.6mm; }
.board-sheet .b-headline .b-sub { color: var(--b-muted); }
.board-sheet .b-computed { color: var(--b-muted); border-bottom: 0.2mm dotted var(--b-muted); }
.board-sheet h2 { font-size: 8.4pt; margin: 0 0 0.6mm; border-bottom: 0.2mm solid var(--b-line); padding-bottom: 0.3mm; }
.board-sheet h2 .b-h2-note { font-weight: normal; color: var(--b-muted); }
.board-sheet section { break-inside: avoid; margin-bottom: 1.8mm; }
.board-sheet .b-row { display: flex; gap: 3mm; align-items: flex-start; }
/* The chart (470 × 244) and the segment diagram (640 × 440) come out equally tall at these widths. */
.board-sheet .b-col-chart { flex: 1.32 1 0; min-width: 0; }
.board-sheet .b-col-diagram { flex: 1 1 0; min-width: 0; }
.board-sheet .b-col-half { flex: 1 1 0; min-width: 0; }
.board-sheet svg { display: block; width: 100%; height: auto; }
.board-sheet svg text { font-family: ${fontStack(SANS_FONT)}; fill: var(--b-ink); }
.board-sheet svg .tick { font-size: 10px; }
.board-sheet svg .axis-title { font-size: 10px; fill: var(--b-muted); }
.board-sheet svg .legend { font-size: 10px; }
.board-sheet svg .note-text { font-size: 9px; fill: var(--b-muted); }
.board-sheet table { width: 100%; border-collapse: collapse; font-variant-numeric: tabular-nums; }
.board-sheet th, .board-sheet td { text-align: left; padding: 0.25mm 1mm; border-bottom: 0.2mm solid var(--b-line); vertical-align: top; }
.board-sheet thead th { font-weight: normal; color: var(--b-muted); background: var(--b-soft); }
.board-sheet tbody th { font-weight: bold; }
.board-sheet td.num, .board-sheet th.num { text-align: right; white-space: nowrap; }
.board-sheet .nw { white-space: nowrap; }
.board-sheet .b-cat { font-weight: bold; }
.board-sheet .b-alert { font-weight: bold; }
/* The alert mark is drawn, not a character: the shipped fonts have no triangle glyph, and a glyph taken
   from a machine font would make the page depend on that machine. */
.board-sheet .b-alert::before, .board-sheet .b-mark { content: ''; display: inline-block; width: 0; height: 0; margin-right: 0.8mm;
  border-left: 0.75mm solid transparent; border-right: 0.75mm solid transparent; border-bottom: 1.3mm solid currentColor; vertical-align: 0.05em; }
.board-sheet .b-muted { color: var(--b-muted); }
.board-sheet .b-left-out { color: var(--b-muted); font-style: italic; margin-top: 0.4mm; }
.board-sheet .b-list li { padding: 0.25mm 0; border-bottom: 0.2mm solid var(--b-line); }
.board-sheet .b-warnings { color: var(--b-muted); font-size: 6.8pt; }
.board-sheet .b-notes { flex: 1 1 0; min-height: 5mm; margin: 0; border-top: 0.3mm solid var(--b-line);
  background: repeating-linear-gradient(to bottom, transparent 0, transparent 7.5mm, var(--b-line) 7.5mm, var(--b-line) 7.7mm); }
.board-sheet .b-notes p { color: var(--b-muted); padding-top: 0.4mm; }
.board-sheet .b-foot { display: flex; gap: 4mm; border-top: 0.3mm solid var(--b-ink); padding-top: 0.8mm; color: var(--b-muted); font-size: 6.8pt; }
.board-sheet .b-foot span:last-child { margin-left: auto; }
`;

/** The whole stylesheet for one paper size, as the printed file carries it. */
export function boardCss(page: PageSize): string {
  return `${pageRule(page)}\n${BOARD_CSS}`;
}
