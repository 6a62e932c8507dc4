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

export function isFalciformError(e: unknown): e is FalciformError {
  return e instanceof FalciformError;
}
