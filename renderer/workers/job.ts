/// <reference lib="webworker" />
import { isFalciformError, type ErrorKind } from '../../src/errors';
import { errorText } from '../error-text';

/**
 * How every worker answers the window: progress on the way, perhaps a first part worth showing early,
 * then one result or one failure. A FalciformError travels as its parts, so the window can rebuild it
 * with the file it names.
 */
export type JobReply<R> =
  | { type: 'progress'; done: number; total: number; step: string }
  | { type: 'part'; part: unknown }
  | { type: 'result'; result: R }
  | { type: 'error'; message: string; falciform?: { kind: ErrorKind; file: string; problem: string } };

export type Progress = (done: number, total: number, step: string) => void;

/** Hands the window a first part of the result before the rest is ready; `transfer` as for results. */
export type Part = (part: unknown, transfer?: Transferable[]) => void;

/**
 * Makes this worker answer each request with `run`'s result. The buffers `transferOf` names are
 * handed over, not copied; a buffer named twice is handed over once (a second listing would throw).
 */
export function serveJob<Q, R>(run: (request: Q, progress: Progress, part: Part) => Promise<R>, transferOf: (result: R) => Transferable[] = () => []): void {
  const scope = self as unknown as DedicatedWorkerGlobalScope;
  const post = (m: JobReply<R>, transfer: Transferable[] = []) => scope.postMessage(m, transfer);
  scope.onmessage = async (e: MessageEvent<Q>) => {
    try {
      const result = await run(
        e.data,
        (done, total, step) => post({ type: 'progress', done, total, step }),
        (part, transfer = []) => post({ type: 'part', part }, [...new Set(transfer)]),
      );
      post({ type: 'result', result }, [...new Set(transferOf(result))]);
    } catch (err) {
      post({
        type: 'error',
        message: errorText(err),
        ...(isFalciformError(err) ? { falciform: { kind: err.kind, file: err.file, problem: err.problem } } : {}),
      });
    }
  };
}
