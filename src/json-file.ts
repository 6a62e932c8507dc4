import { badFile, type FalciformError } from './errors.js';

/**
 * The small JSON files a reader hands in (landmark sets, schemes, marks, reference sets): parsed
 * with an error that names the file, and wrong values described in a message without writing
 * them out.
 */

export function parseJsonFile(
  text: string,
  file: string,
  fail: (file: string, problem: string) => FalciformError = badFile,
): unknown {
  try {
    return JSON.parse(withoutBom(text));
  } catch (e) {
    throw fail(file, `not valid JSON (${(e as Error).message})`);
  }
}

/** Text without a leading UTF-8 byte-order mark, which some Windows editors write and JSON.parse refuses. */
export function withoutBom(text: string): string {
  return text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
}

export function isJsonObject(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

/**
 * A wrong value as a message shows it. Lists and objects are named, not written out: JSON.stringify
 * recurses, so a value nested a few thousand deep (which JSON.parse accepts) overflowed the stack.
 */
export function describeJsonValue(x: unknown): string {
  if (Array.isArray(x)) return 'a list';
  if (typeof x === 'object' && x !== null) return 'an object';
  const shown = JSON.stringify(x) ?? String(x);
  return shown.length > QUOTE_CHARS ? `${shown.slice(0, QUOTE_CHARS)}… (${shown.length} characters)` : shown;
}

/** How much of a value from a file an error message quotes. */
const QUOTE_CHARS = 200;
