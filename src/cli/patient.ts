import { parseManifest, resolveManifestPath } from '../manifest/manifest.js';
import { loadPatientFrom, type LoadedPatient, type LoadOptions, type PatientFiles } from '../patient/load.js';
import { readTextFile } from './node-io.js';
import { loadScan } from './scan-io.js';

export { followupOfPatient, type LoadedPatient, type LoadedVisit } from '../patient/load.js';

/** Reads a study manifest and every file it names from disk, relative to the manifest. */
export async function loadPatient(manifestPath: string, opts: LoadOptions = {}): Promise<LoadedPatient> {
  const manifest = parseManifest(await readTextFile(manifestPath), manifestPath);
  return loadPatientFrom(manifest, manifestPath, diskFiles(manifestPath), opts);
}

/** A manifest's files on disk, relative to the manifest; a visit's scan may be a DICOM folder. */
export function diskFiles(manifestPath: string): PatientFiles {
  const resolve = (rel: string) => resolveManifestPath(manifestPath, rel);
  return { name: resolve, volume: (rel) => loadScan(resolve(rel)), text: (rel) => readTextFile(resolve(rel)) };
}
