import type { OpenedFile } from '../../main/bridge-api';
import { FalciformError, type ErrorKind } from '../../src/errors';
import type { ImportReply, ImportRequest } from '../workers/import.worker';
import type { ImportPlan, ReadImportOptions } from './import';

/**
 * `readImport` in a worker, so decoding a folder of scans never freezes the window. The chosen
 * files' bytes are handed over (not copied); errors come back as the same FalciformError.
 */
export function readImportInWorker(files: OpenedFile[], opts: ReadImportOptions = {}): Promise<ImportPlan> {
  const worker = new Worker(new URL('../workers/import.worker.ts', import.meta.url), { type: 'module' });
  return new Promise<ImportPlan>((resolve, reject) => {
    worker.onmessage = (e: MessageEvent<ImportReply>) => {
      const m = e.data;
      if (m.type === 'progress') return opts.onProgress?.(m.done, m.total, m.file);
      worker.terminate();
      if (m.type === 'plan') resolve(m.plan);
      else reject(m.kind && m.file !== null ? new FalciformError(m.kind as ErrorKind, m.file, m.problem) : new Error(m.problem));
    };
    worker.onerror = (e) => {
      worker.terminate();
      reject(new Error(e.message || 'the import stopped unexpectedly'));
    };
    const request: ImportRequest = { files, ...(opts.loose ? { loose: opts.loose } : {}) };
    worker.postMessage(request, [...new Set(files.map((f) => f.bytes.buffer as ArrayBuffer))]);
  });
}
