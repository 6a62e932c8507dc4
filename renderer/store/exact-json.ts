import { badInput } from '../../src/errors.js';

/**
 * JSON that gives back exactly what went in, for records bound for a backup. Plain JSON writes -0
 * as 0, and an affine read from a float header can hold -0; JSON's grammar does allow "-0", which
 * JSON.parse reads back as -0, so -0 is written that way. Values JSON cannot carry (NaN, Infinity,
 * undefined in a list, dates, maps, byte arrays) are refused rather than changed.
 */
export function toExactJson(value: unknown, what: string): string {
  check(value, what, 0);
  return JSON.stringify(value, (_key, v: unknown) => (Object.is(v, -0) ? NEG_ZERO : v)).replaceAll(JSON.stringify(NEG_ZERO), '-0');
}

// A string no record holds (check() refuses U+0001 anywhere), standing in for -0 until the text is written.
const NEG_ZERO = '\u0001neg-zero\u0001';

function check(v: unknown, what: string, depth: number): void {
  if (depth > 64) throw refuse(what, 'is nested too deeply');
  if (v === null || typeof v === 'boolean') return;
  if (typeof v === 'string') {
    if (v.includes('\u0001')) throw refuse(what, 'holds a control character U+0001');
    return;
  }
  if (typeof v === 'number') {
    if (!Number.isFinite(v)) throw refuse(what, `holds the number ${v}`);
    return;
  }
  if (Array.isArray(v)) {
    for (const x of v) {
      if (x === undefined) throw refuse(what, 'holds an undefined list entry');
      check(x, what, depth + 1);
    }
    return;
  }
  if (typeof v === 'object' && Object.getPrototypeOf(v) === Object.prototype) {
    for (const [k, x] of Object.entries(v as object)) {
      if (k.includes('\u0001')) throw refuse(what, 'holds a control character U+0001');
      if (x !== undefined) check(x, what, depth + 1);
    }
    return;
  }
  throw refuse(what, `holds a ${Object.prototype.toString.call(v).slice(8, -1)}`);
}

function refuse(what: string, problem: string): Error {
  return badInput(what, `${problem}, which a backup cannot carry exactly`);
}
