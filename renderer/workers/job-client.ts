import { useEffect, useState, type DependencyList } from 'react';
import { FalciformError } from '../../src/errors';
import { errorText } from '../error-text';
import type { JobReply, Progress } from './job';

export interface JobOptions {
  /** What failed, in words, when the worker itself stops (a script error, no memory). */
  crashed: string;
  /** Buffers of the request to hand over rather than copy. */
  transfer?: Transferable[];
  onProgress?: Progress;
  /** Receives a first part of the result the worker sends ahead of the rest. */
  onPart?(part: unknown): void;
  /** Ends the worker; the promise then never settles. */
  signal?: AbortSignal;
}

/** Sends one request to a fresh worker and ends the worker when it answers. */
export function runJob<R>(worker: Worker, request: unknown, opts: JobOptions): Promise<R> {
  return new Promise<R>((resolve, reject) => {
    const end = () => worker.terminate();
    opts.signal?.addEventListener('abort', end);
    worker.onmessage = (e: MessageEvent<JobReply<R>>) => {
      const m = e.data;
      if (m.type === 'progress') return opts.onProgress?.(m.done, m.total, m.step);
      if (m.type === 'part') return opts.onPart?.(m.part);
      end();
      if (m.type === 'result') resolve(m.result);
      else reject(m.falciform ? new FalciformError(m.falciform.kind, m.falciform.file, m.falciform.problem) : new Error(m.message));
    };
    worker.onerror = (e) => {
      end();
      reject(new Error(e.message || opts.crashed));
    };
    worker.postMessage(request, [...new Set(opts.transfer ?? [])]);
  });
}

export type JobState =
  | { status: 'running'; done: number; total: number; step: string }
  | { status: 'ready' }
  | { status: 'failed'; message: string };

/** Results of earlier runs a job may reuse instead of starting a worker. */
export interface JobMemo<R> {
  /** A result still valid for this request, or null. */
  kept(): R | null;
  /** Called as a run starts; the function it returns receives that run's result. */
  keep(): (result: R) => void;
}

/**
 * For a job whose worker sends a first part ahead of its result: what to show from the part (null
 * keeps showing `shown`, the value on screen), and the whole value from the part and the result.
 */
export interface JobParts<R> {
  early(part: unknown, shown: R | null): R | null;
  whole(part: unknown, result: unknown): R;
}

/**
 * Runs a job in a worker of `start` whenever `deps` change, following its progress, unless `memo`
 * has a valid result. The last result stays available while a new run is under way, unless `parts`
 * shows the new run's first part early; a run overtaken by the next one is ended.
 */
export function useJob<R>(start: () => Worker, request: unknown, crashed: string, deps: DependencyList, memo?: JobMemo<R>, parts?: JobParts<R>): { state: JobState; last: R | null } {
  const [state, setState] = useState<JobState>(() =>
    memo?.kept() ? { status: 'ready' } : { status: 'running', done: 0, total: 1, step: 'starting' });
  const [last, setLast] = useState<R | null>(() => memo?.kept() ?? null);
  useEffect(() => {
    const earlier = memo?.kept();
    if (earlier) {
      setLast(earlier);
      setState({ status: 'ready' });
      return;
    }
    const keep = memo?.keep();
    const stop = new AbortController();
    const live = () => !stop.signal.aborted;
    let part: { value: unknown } | null = null;
    runJob<unknown>(start(), request, {
      crashed,
      signal: stop.signal,
      onProgress: (done, total, step) => { if (live()) setState({ status: 'running', done, total, step }); },
      onPart: (value) => {
        if (!live() || !parts) return;
        part = { value };
        const shown = parts.early(value, last);
        if (shown) setLast(shown);
      },
    }).then(
      (reply) => {
        if (!live()) return;
        const result = parts && part ? parts.whole(part.value, reply) : (reply as R);
        keep?.(result);
        setLast(result);
        setState({ status: 'ready' });
      },
      (e: unknown) => { if (live()) setState({ status: 'failed', message: errorText(e) }); },
    );
    return () => stop.abort();
    // The caller names what the run depends on; start, request, memo, parts and the value shown are
    // read from that render.
  }, deps);
  return { state, last };
}
