/// <reference lib="webworker" />
// Encodes one visit's segment map as NIfTI-1 .nii.gz for export, off the window's thread: the visit is
// loaded from the store through the shared loader, so the map is the one the analysis used.
import { isFalciformError } from '../../src/errors';
import { segmentMapNifti } from '../../src/report/segment-map-export';
import { loadVisitWithMap } from '../../src/report/visit-maps';
import { webGzip } from '../../src/volume/web-gzip';
import { storedPatient } from '../analysis/store-source';
import type { ExportMessage, ExportRequest } from '../report/export-messages';
import { appDb } from '../store/db';

const scope = self as unknown as DedicatedWorkerGlobalScope;
const post = (m: ExportMessage, transfer: Transferable[] = []) => scope.postMessage(m, transfer);

scope.onmessage = async (e: MessageEvent<ExportRequest>) => {
  const { patientId, visitId } = e.data;
  try {
    const { manifest, files } = await storedPatient(appDb(), patientId);
    const { segmentMap } = await loadVisitWithMap(manifest, patientId, files, visitId);
    const bytes = await webGzip(segmentMapNifti(segmentMap, visitId));
    post({ type: 'segment-map', visitId, bytes }, [bytes.buffer]);
  } catch (err) {
    post({ type: 'error', message: isFalciformError(err) || err instanceof Error ? err.message : String(err) });
  }
};
