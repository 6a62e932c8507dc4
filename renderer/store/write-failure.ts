import { badInput, isFalciformError, tooLarge } from '../../src/errors.js';
import { errorText } from '../error-text.js';

/**
 * Turns a failed write transaction into an error a nurse can act on. IndexedDB reports a full disk
 * or an exhausted browser quota as QuotaExceededError, sometimes wrapped by Dexie (inner) or in a
 * bulk operation's failures; the transaction has been aborted, so nothing was written.
 */
export function explainWriteFailure(e: unknown, what: string, verb: string): Error {
  if (isFalciformError(e)) return e;
  if (errorNames(e).includes('QuotaExceededError')) {
    return tooLarge(
      what,
      `could not be stored: the disk or this browser's storage quota is full. Nothing was ${verb}; free some disk space ` +
        `(or delete patients you have backed up), then try again`,
    );
  }
  const why = errorText(e);
  return badInput(what, `could not be stored (${why}). Nothing was ${verb}`);
}

function errorNames(e: unknown, depth = 0): string[] {
  if (typeof e !== 'object' || e === null || depth > 4) return [];
  const o = e as { name?: unknown; inner?: unknown; failures?: unknown };
  const names = typeof o.name === 'string' ? [o.name] : [];
  names.push(...errorNames(o.inner, depth + 1));
  if (Array.isArray(o.failures)) for (const f of o.failures) names.push(...errorNames(f, depth + 1));
  return names;
}
