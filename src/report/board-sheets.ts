/**
 * How the board page's sections are spread over sheets. Every height is one the page's CSS enforces
 * (fixed line heights, one-line table rows; board-style.ts) or, for wrapping text, an upper bound from
 * the shipped font's own widths (text-measure.ts), so the plan is the same wherever the page is drawn
 * and a sheet never spills onto the next. Rows that do not fit continue on the next sheet under their
 * section's heading, marked as continued, with the table header repeated; nothing is dropped.
 */

/** One section that may run over sheets: a heading (and table header), rows, and lines under the last row. */
export interface FlowSection {
  id: string;
  /** Heading and table header, mm; `continued` when the part starts after the first row. */
  headMm(continued: boolean): number;
  /** Each row's height, mm; an empty section has one row (its "none" line). */
  rowsMm: readonly number[];
  /** Lines under the last row, mm. */
  footMm: number;
}

export interface SheetPart {
  section: string;
  /** Rows [from, to) of the section. */
  from: number;
  to: number;
  continued: boolean;
  continues: boolean;
}

export interface SheetPlan {
  parts: SheetPart[];
}

export interface SheetFrame {
  /** Height of a sheet's content box, mm. */
  sheetMm: number;
  /** What sits above the sections on the first sheet and on the others, mm. */
  firstTopMm: number;
  laterTopMm: number;
  /** What sits below them on every sheet (the notes box or the "continued on" line, and the footer), mm. */
  bottomMm: number;
}

export function planSheets(frame: SheetFrame, sections: readonly FlowSection[]): SheetPlan[] {
  const sheets: SheetPlan[] = [{ parts: [] }];
  let room = frame.sheetMm - frame.firstTopMm - frame.bottomMm;
  const newSheet = () => {
    sheets.push({ parts: [] });
    room = frame.sheetMm - frame.laterTopMm - frame.bottomMm;
  };
  for (const sec of sections) {
    let from = 0;
    while (from < sec.rowsMm.length) {
      const continued = from > 0;
      let used = sec.headMm(continued);
      let to = from;
      while (to < sec.rowsMm.length) {
        const foot = to + 1 === sec.rowsMm.length ? sec.footMm : 0;
        if (used + sec.rowsMm[to] + foot > room) break;
        used += sec.rowsMm[to];
        to++;
      }
      if (to === sec.rowsMm.length) used += sec.footMm;
      const current = sheets[sheets.length - 1];
      if (to === from) {
        // Not one row fits here: the section starts on a fresh sheet, where a row taller than a
        // whole sheet (none is, by the CSS) would still be placed alone.
        if (current.parts.length > 0) {
          newSheet();
          continue;
        }
        to = from + 1;
        used = room;
      }
      current.parts.push({ section: sec.id, from, to, continued, continues: to < sec.rowsMm.length });
      room -= used;
      from = to;
      if (from < sec.rowsMm.length) newSheet();
    }
  }
  return sheets;
}
