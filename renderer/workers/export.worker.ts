/// <reference lib="webworker" />
// Encodes one visit's segment map as NIfTI-1 .nii.gz for export, off the window's thread: the visit is
// loaded from the store through the shared loader, so the map is the one the analysis used.
import { segmentMapNifti } from '../../src/report/segment-map-export';
import { loadVisitWithMap } from '../../src/report/visit-maps';
import { webGzip } from '../../src/volume/web-gzip';
import { storedPatient } from '../analysis/store-source';
import type { ExportRequest } from '../report/export-segment-map';
import { appDb } from '../store/db';
import { getSetting } from '../store/patients';
import { serveJob } from './job';

serveJob(
  async ({ patientId, visitId }: ExportRequest) => {
    const { manifest, files } = await storedPatient(appDb(), patientId);
    const { segmentMap } = await loadVisitWithMap(manifest, patientId, files, visitId, { maxLesions: await getSetting(appDb(), 'maxLesions') });
    // The header's description says DEMO for a demo patient, as the command line's export does.
    return webGzip(segmentMapNifti(segmentMap, visitId, manifest.patient.demo === true));
  },
  (bytes) => [bytes.buffer as ArrayBuffer],
);
