/**
 * The few kinds of error the core raises. Each message names the file (or input) and the problem in
 * words a clinician or research nurse can act on; the shells decide how to show it.
 */
export type ErrorKind = 'bad-file' | 'bad-landmarks' | 'too-large' | 'bad-input';

export class FalciformError extends Error {
  readonly kind: ErrorKind;
  readonly file: string;
  readonly problem: string;

  constructor(kind: ErrorKind, file: string, problem: string) {
    super(`${file}: ${problem}`);
    this.name = 'FalciformError';
    this.kind = kind;
    this.file = file;
    this.problem = problem;
  }
}

export const badFile = (file: string, problem: string) => new FalciformError('bad-file', file, problem);
export const badLandmarks = (file: string, problem: string) => new FalciformError('bad-landmarks', file, problem);
export const tooLarge = (file: string, problem: string) => new FalciformError('too-large', file, problem);
export const badInput = (what: string, problem: string) => new FalciformError('bad-input', what, problem);

/**
 * A message as one short line for a terminal or a status bar: control characters escaped (a value
 * read from a file may hold newlines or terminal escapes) and the middle of a long message left out
 * (a file may hold megabytes on one line), keeping the start, which names the file, and the end.
 */
export function oneLine(message: string, maxChars = 400): string {
  // eslint-disable-next-line no-control-regex -- the control characters are what this escapes
  const escaped = message.replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029]/g, (c) =>
    c === '\n' ? '\\n' : c === '\r' ? '\\r' : c === '\t' ? '\\t' : `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`);
  if (escaped.length <= maxChars) return escaped;
  const tail = Math.floor(maxChars / 4);
  const head = maxChars - tail;
  return `${escaped.slice(0, head)} … [${escaped.length - head - tail} characters left out] … ${escaped.slice(-tail)}`;
}

export function isFalciformError(e: unknown): e is FalciformError {
  return e instanceof FalciformError;
}
