import type { OpenedFile } from '../../main/bridge-api';
import { runJob } from '../workers/job-client';
import type { ImportRequest } from '../workers/import.worker';
import type { ImportPlan, ReadImportOptions } from './import';

/**
 * `readImport` in a worker, so decoding a folder of scans never freezes the window. The chosen
 * files' bytes are handed over (not copied); errors come back as the same FalciformError.
 */
export function readImportInWorker(files: OpenedFile[], opts: ReadImportOptions = {}): Promise<ImportPlan> {
  const request: ImportRequest = { files, ...(opts.loose ? { loose: opts.loose } : {}) };
  return runJob<ImportPlan>(new Worker(new URL('../workers/import.worker.ts', import.meta.url), { type: 'module' }), request, {
    crashed: 'the import stopped unexpectedly',
    transfer: files.map((f) => f.bytes.buffer as ArrayBuffer),
    onProgress: opts.onProgress,
  });
}
