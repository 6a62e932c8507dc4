/// <reference lib="webworker" />
// Reads and checks an import (every NIfTI decoded in full) off the window's thread; the window then
// writes the checked plan in one transaction.
import type { OpenedFile } from '../../main/bridge-api';
import { isFalciformError } from '../../src/errors';
import { readImport, type ImportPlan, type LooseVisitDetails } from '../store/import';

export type ImportRequest = { files: OpenedFile[]; loose?: LooseVisitDetails };
export type ImportReply =
  | { type: 'progress'; done: number; total: number; file: string }
  | { type: 'plan'; plan: ImportPlan }
  | { type: 'error'; kind: string | null; file: string | null; problem: string };

const scope = self as unknown as DedicatedWorkerGlobalScope;

scope.onmessage = async (e: MessageEvent<ImportRequest>) => {
  try {
    const plan = await readImport(e.data.files, {
      loose: e.data.loose,
      onProgress: (done, total, file) => scope.postMessage({ type: 'progress', done, total, file } satisfies ImportReply),
    });
    const buffers = plan.patients.flatMap((p) => p.volumes.map((v) => v.bytes.buffer as ArrayBuffer));
    scope.postMessage({ type: 'plan', plan } satisfies ImportReply, [...new Set(buffers)]);
  } catch (err) {
    const reply: ImportReply = isFalciformError(err)
      ? { type: 'error', kind: err.kind, file: err.file, problem: err.problem }
      : { type: 'error', kind: null, file: null, problem: err instanceof Error ? err.message : String(err) };
    scope.postMessage(reply);
  }
};
