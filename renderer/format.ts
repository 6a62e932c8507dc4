/**
 * Numbers as the screens and charts write them: a dash where there is no value, the unit after a
 * space. Values pass as the analysis gives them unless `digits` asks for a fixed number of places.
 */
type Maybe = number | null | undefined;

const DASH = '—';
const shown = (x: number, digits?: number) => (digits === undefined ? String(x) : x.toFixed(digits));

/** A length measured on a visit (unrounded in the analysis), as the tables show it: one decimal. */
export const oneDecimal = (x: Maybe) => (x === null || x === undefined ? DASH : x.toFixed(1));

export const fmtMm = (x: Maybe, digits?: number) => (x === null || x === undefined ? DASH : `${shown(x, digits)} mm`);

export const fmtMl = (x: Maybe, digits?: number) => (x === null || x === undefined ? DASH : `${shown(x, digits)} mL`);

/** A change in percent, with its sign when it grows. */
export const fmtPct = (x: Maybe, digits?: number) => (x === null || x === undefined ? DASH : `${x > 0 ? '+' : ''}${shown(x, digits)}%`);
