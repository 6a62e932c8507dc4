import type { LoadedDicom } from '../dicom/read.js';
import type { LoadedNifti } from '../volume/nifti-read.js';
import { isDicomPath, loadDicom } from './dicom-io.js';
import { loadVolume } from './node-io.js';

export type LoadedScan = { kind: 'nifti'; nifti: LoadedNifti; volume: LoadedNifti['volume']; warnings: string[] } | { kind: 'dicom'; dicom: LoadedDicom; volume: LoadedDicom['volume']; warnings: string[] };

/** A scan given as a NIfTI file, a DICOM file or a folder of DICOM files. */
export async function loadScan(path: string, opts: { series?: string; maxBytes?: number } = {}): Promise<LoadedScan> {
  if (await isDicomPath(path)) {
    const dicom = await loadDicom(path, opts);
    return { kind: 'dicom', dicom, volume: dicom.volume, warnings: dicom.warnings };
  }
  const nifti = await loadVolume(path, opts);
  return { kind: 'nifti', nifti, volume: nifti.volume, warnings: nifti.warnings };
}
