/// <reference lib="webworker" />
// Reads and checks an import (every NIfTI decoded in full) off the window's thread; the window then
// writes the checked plan in one transaction.
import type { OpenedFile } from '../../main/bridge-api';
import { readImport, type LooseVisitDetails } from '../store/import';
import { webDecodeImage } from './image-codecs';
import { serveJob } from './job';

export type ImportRequest = { files: OpenedFile[]; loose?: LooseVisitDetails };

serveJob(
  ({ files, loose }: ImportRequest, progress) => readImport(files, { loose, onProgress: progress, decodeImage: webDecodeImage }),
  (plan) => plan.patients.flatMap((p) => p.volumes.map((v) => v.bytes.buffer as ArrayBuffer)),
);
