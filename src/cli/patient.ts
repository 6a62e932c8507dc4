import { parseManifest, resolveManifestPath } from '../manifest/manifest.js';
import { loadPatientFrom, type LoadedPatient, type LoadOptions, type PatientFiles } from '../patient/load.js';
import { loadVolume, readTextFile } from './node-io.js';

export { followupOfPatient, type LoadedPatient, type LoadedVisit } from '../patient/load.js';

/** Reads a study manifest and every file it names from disk, relative to the manifest. */
export async function loadPatient(manifestPath: string, opts: LoadOptions = {}): Promise<LoadedPatient> {
  const manifest = parseManifest(await readTextFile(manifestPath), manifestPath);
  return loadPatientFrom(manifest, manifestPath, diskFiles(manifestPath), opts);
}

/** A manifest's files on disk, relative to the manifest. */
export function diskFiles(manifestPath: string): PatientFiles {
  const resolve = (rel: string) => resolveManifestPath(manifestPath, rel);
  return { name: resolve, volume: (rel) => loadVolume(resolve(rel)), text: (rel) => readTextFile(resolve(rel)) };
}
