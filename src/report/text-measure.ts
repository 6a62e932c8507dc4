import { BOLD_ADVANCES, ITALIC_ADVANCES, REGULAR_ADVANCES } from './font-metrics.js';

/**
 * Widths and wrapped line counts of text set in the shipped sans face, from its own advance widths
 * (src/report/font-metrics.ts, read from the WOFF files), so the board page can be planned without a
 * browser and comes out the same wherever it is drawn. Counts are upper bounds: each width is taken
 * a little wide (kerning and ligatures only narrow this face's text by less than that), a character the
 * table lacks counts as the widest glyph, and lines break only at spaces, or anywhere inside a word
 * longer than a line, as the page's CSS (`overflow-wrap: anywhere`) lets the browser do too; a
 * browser that finds more places to break needs no more lines.
 */
export type Face = 'regular' | 'bold' | 'italic';

const TABLES = { regular: REGULAR_ADVANCES, bold: BOLD_ADVANCES, italic: ITALIC_ADVANCES } as const;
const PT_MM = 25.4 / 72;
/** Headroom on every measured width. */
const WIDTH_SAFETY = 1.03;

function advanceEm(face: Face, ch: string): number {
  const t = TABLES[face];
  const cp = ch.codePointAt(0)!;
  const w = cp >= 0x20 && cp - 0x20 < t.widths.length ? t.widths[cp - 0x20] : 0;
  return (w || t.widest) / t.unitsPerEm;
}

export function textWidthMm(text: string, sizePt: number, face: Face = 'regular'): number {
  let em = 0;
  for (const ch of text) em += advanceEm(face, ch);
  return em * sizePt * PT_MM * WIDTH_SAFETY;
}

/** Lines the text takes in a box `widthMm` wide; an empty text takes one. */
export function lineCount(text: string, widthMm: number, sizePt: number, face: Face = 'regular'): number {
  const space = textWidthMm(' ', sizePt, face);
  let lines = 1;
  let used = 0;
  for (const word of text.split(/\s+/).filter((w) => w.length > 0)) {
    let w = textWidthMm(word, sizePt, face);
    const need = used === 0 ? w : used + space + w;
    if (need <= widthMm) {
      used = need;
      continue;
    }
    if (used > 0) lines++;
    // A word wider than the line is broken anywhere (overflow-wrap: anywhere).
    while (w > widthMm) {
      lines++;
      w -= widthMm;
    }
    used = w;
  }
  return lines;
}
