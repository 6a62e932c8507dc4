/**
 * The board summary's stylesheet, shared by the command line (a <style> in the file) and the app (a
 * constructable stylesheet, since the app's CSP allows no inline styles). Every rule is scoped to
 * .board-sheet so the app's own screens are untouched. Each sheet of the page is one .board-sheet,
 * filled top to bottom in small type; which rows go on which sheet is planned in board-sheets.ts.
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
 * The page's fixed measures, mm on the A4 layout (Letter draws the same layout smaller). The CSS below
 * is written from them and the sheet plan counts with them, so the two cannot disagree: text has fixed
 * line heights, table rows are one line each, and a box's height is its lines plus its padding.
 */
export const SHEET_MM = {
  /** Content width: the A4 printable width. */
  width: 210 - 2 * PAGE_MARGIN_MM,
  /** A sheet fills the printable height less a little for rounding; the notes box takes what is left. */
  height: 297 - 2 * PAGE_MARGIN_MM - 3,
  bodyPt: 8.2,
  line: 3.5,
  h2Pt: 8.4,
  /** A heading: its lines plus 0.3 padding, 0.2 rule and 0.6 space below. */
  h2Extra: 1.1,
  smallPt: 6.8,
  smallLine: 3,
  /** One table row: taller than its line, 0.25 padding above and below and 0.2 rule, so the set height rules. */
  row: 4.4,
  cellPadX: 1,
  sectionGap: 1.8,
  /** Two columns side by side: the gap and the shares of the chart and the diagram. */
  columnGap: 3,
  chartShare: 1.32,
  diagramShare: 1,
  notesMin: 5,
  /** Key images: tiles of a track's baseline and latest slice, this many to a row, each row this tall with its gap. */
  keysPerRow: 4,
  keyImage: 21,
  keyRow: 28.5,
  /** The footer: a 0.3 rule, 0.8 padding and one small line. */
  footer: 4.1,
} as const;

const G = SHEET_MM;

const BOARD_CSS = `
.board-sheet {
  --b-ink: #1d2327; --b-muted: #55616a; --b-line: #c9cfca; --b-soft: #f1f3f1; --b-warn: #fff2cc; --b-warn-ink: #5c4100;
  box-sizing: border-box; color: var(--b-ink); background: #ffffff;
  display: flex; flex-direction: column; min-height: ${G.height}mm;
  font-family: ${fontStack(SANS_FONT)}; font-size: ${G.bodyPt}pt; line-height: ${G.line}mm; overflow-wrap: anywhere;
  -webkit-print-color-adjust: exact; print-color-adjust: exact;
}
.board-sheet + .board-sheet { break-before: page; }
.board-sheet *, .board-sheet *::before, .board-sheet *::after { box-sizing: border-box; }
.board-sheet h1, .board-sheet h2, .board-sheet p, .board-sheet ul { margin: 0; padding: 0; }
.board-sheet ul { list-style: none; }
.board-sheet .b-head { display: flex; align-items: flex-end; gap: 4mm; border-bottom: 0.5mm solid var(--b-ink); padding-bottom: 1.2mm; }
.board-sheet .b-kind { font-size: 7pt; line-height: 3mm; letter-spacing: 0.08em; text-transform: uppercase; color: var(--b-muted); white-space: nowrap; }
.board-sheet h1 { font-size: 14pt; line-height: 5.5mm; font-family: ${fontStack(MONO_FONT)}; white-space: nowrap; }
.board-sheet .b-facts { color: var(--b-muted); margin-top: 0.5mm; }
.board-sheet .b-facts span + span::before { content: ' · '; }
.board-sheet .b-made { margin-left: auto; text-align: right; color: var(--b-muted); white-space: nowrap; }
.board-sheet .b-demo { margin-left: 1.5mm; font-family: ${fontStack(SANS_FONT)}; font-size: 7pt; font-weight: normal; border: 0.2mm solid var(--b-line); border-radius: 1mm; padding: 0 1mm; vertical-align: middle; }
.board-sheet .b-caution { margin: 1.5mm 0; padding: 1mm 2mm; background: var(--b-warn); color: var(--b-warn-ink); border-left: 1mm solid var(--b-warn-ink); font-weight: bold; }
.board-sheet .b-pseudonym { margin: 0 0 1.5mm; padding: 0.8mm 2mm; border: 0.2mm dashed var(--b-muted); }
.board-sheet .b-headline { display: flex; flex-wrap: wrap; align-items: center; gap: 1mm 3mm; margin-bottom: 1.5mm; }
.board-sheet .b-category { font-size: 12pt; line-height: 5mm; font-weight: bold; border: 0.4mm solid var(--b-ink); border-radius: 1mm; padding: 0 1.6mm; }
.board-sheet .b-headline .b-sub { color: var(--b-muted); }
.board-sheet .b-computed { color: var(--b-muted); border-bottom: 0.2mm dotted var(--b-muted); }
.board-sheet .b-summary { color: var(--b-muted); font-style: italic; margin-bottom: ${G.sectionGap}mm; }
.board-sheet h2 { font-size: ${G.h2Pt}pt; line-height: ${G.line}mm; margin: 0 0 0.6mm; border-bottom: 0.2mm solid var(--b-line); padding-bottom: 0.3mm; }
.board-sheet h2 .b-h2-note { font-weight: normal; color: var(--b-muted); }
.board-sheet h2 .b-continued { font-weight: normal; font-style: italic; }
.board-sheet section { break-inside: avoid; margin-bottom: ${G.sectionGap}mm; }
.board-sheet .b-row { display: flex; gap: ${G.columnGap}mm; align-items: flex-start; }
/* The chart (470 × 244) and the segment diagram (640 × 440) come out equally tall at these widths. */
.board-sheet .b-col-chart { flex: ${G.chartShare} 1 0; min-width: 0; }
.board-sheet .b-col-diagram { flex: ${G.diagramShare} 1 0; min-width: 0; }
.board-sheet svg { display: block; width: 100%; height: auto; }
.board-sheet svg text { font-family: ${fontStack(SANS_FONT)}; fill: var(--b-ink); }
.board-sheet svg .tick { font-size: 10px; }
.board-sheet svg .axis-title { font-size: 10px; fill: var(--b-muted); }
.board-sheet svg .legend { font-size: 10px; }
.board-sheet svg .note-text { font-size: 9px; fill: var(--b-muted); }
.board-sheet table { width: 100%; border-collapse: collapse; font-variant-numeric: tabular-nums; }
/* One line per row, so a row is always ${G.row} mm tall (the sheet plan counts rows). */
.board-sheet th, .board-sheet td { text-align: left; padding: 0.25mm ${G.cellPadX}mm; height: ${G.row}mm; line-height: ${G.line}mm; white-space: nowrap; border-bottom: 0.2mm solid var(--b-line); vertical-align: top; }
.board-sheet thead th { font-weight: normal; color: var(--b-muted); background: var(--b-soft); }
.board-sheet tbody th { font-weight: bold; }
.board-sheet td.num, .board-sheet th.num { text-align: right; }
.board-sheet .b-cat { font-weight: bold; }
.board-sheet .b-alert { font-weight: bold; }
/* The alert mark is drawn, not a character: the shipped fonts have no triangle glyph, and a glyph taken
   from a machine font would make the page depend on that machine. */
.board-sheet .b-alert::before, .board-sheet .b-mark { content: ''; display: inline-block; width: 0; height: 0; margin-right: 0.8mm;
  border-left: 0.75mm solid transparent; border-right: 0.75mm solid transparent; border-bottom: 1.3mm solid currentColor; vertical-align: 0.05em; }
.board-sheet .b-muted { color: var(--b-muted); }
.board-sheet .b-left-out { color: var(--b-muted); font-style: italic; margin-top: 0.4mm; }
.board-sheet .b-list li { padding: 0.25mm 0; border-bottom: 0.2mm solid var(--b-line); }
.board-sheet .b-warnings { color: var(--b-muted); font-size: ${G.smallPt}pt; line-height: ${G.smallLine}mm; }
.board-sheet .b-warnings h2 { font-size: ${G.h2Pt}pt; line-height: ${G.line}mm; }
.board-sheet .b-keys-row { display: flex; gap: 3mm; height: ${G.keyRow}mm; padding-bottom: 1.5mm; }
.board-sheet .b-key { width: ${2 * G.keyImage + 1}mm; font-size: ${G.smallPt}pt; line-height: ${G.smallLine}mm; white-space: nowrap; }
.board-sheet .b-key-title { font-weight: bold; height: ${G.smallLine}mm; }
.board-sheet .b-key-pair { display: flex; gap: 1mm; }
.board-sheet .b-key-pair figure { margin: 0; width: ${G.keyImage}mm; }
.board-sheet .b-key-pair img, .board-sheet .b-key-none { display: block; width: ${G.keyImage}mm; height: ${G.keyImage}mm; image-rendering: pixelated; }
.board-sheet .b-key-none { border: 0.2mm dashed var(--b-line); color: var(--b-muted); padding: 1mm; white-space: normal; }
.board-sheet .b-key-pair figcaption { height: ${G.smallLine}mm; color: var(--b-muted); }
.board-sheet .b-notes { flex: 1 1 0; min-height: ${G.notesMin}mm; margin: 0; border-top: 0.3mm solid var(--b-line);
  background: repeating-linear-gradient(to bottom, transparent 0, transparent 7.5mm, var(--b-line) 7.5mm, var(--b-line) 7.7mm); }
.board-sheet .b-notes p { color: var(--b-muted); padding-top: 0.4mm; }
.board-sheet .b-continues { flex: 1 1 0; min-height: ${G.notesMin}mm; font-weight: bold; border-top: 0.3mm solid var(--b-line); padding-top: 0.4mm; }
.board-sheet .b-foot { display: flex; gap: 4mm; border-top: 0.3mm solid var(--b-ink); padding-top: 0.8mm; color: var(--b-muted); font-size: ${G.smallPt}pt; line-height: ${G.smallLine}mm; white-space: nowrap; }
.board-sheet .b-foot span:last-child { margin-left: auto; }
`;

/** The whole stylesheet for one paper size, as the printed file carries it. */
export function boardCss(page: PageSize): string {
  return `${pageRule(page)}\n${BOARD_CSS}`;
}
