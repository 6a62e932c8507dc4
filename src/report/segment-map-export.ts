import type { SegmentMap } from '../segments/segment-map.js';
import { VERSION } from '../version.js';
import { encodeNifti, type WriteDatatype } from '../volume/nifti-write.js';
import type { Volume } from '../volume/volume.js';

/**
 * A visit's segment map as an uncompressed NIfTI-1 file, on the map's own grid and affine with the
 * label values the analysis read (an imported map keeps its own values and scaling bit for bit; a
 * built one has the default scheme's). Gzip it for a .nii.gz.
 */
export function segmentMapNifti(map: SegmentMap, visitId: string, demo = false): Uint8Array {
  const labels = map.labels;
  return encodeNifti(labels, exportDatatype(labels), {
    // The 80-byte descrip field: a demo patient's map says so wherever the file travels.
    description: `Falciform ${VERSION} segment map ${visitId}${demo ? ' DEMO' : ''}; not a medical device`,
  });
}

/** The stored type when the writer has it; else the smallest that holds every label value exactly. */
export function exportDatatype(v: Volume): WriteDatatype {
  if (v.datatype === 'uint8' || v.datatype === 'int16' || v.datatype === 'float32') return v.datatype;
  let lo = Infinity, hi = -Infinity, whole = true;
  const { data, slope, inter } = v;
  for (let n = 0; n < data.length; n++) {
    const x = data[n] * slope + inter;
    if (x < lo) lo = x;
    if (x > hi) hi = x;
    if (whole && !Number.isInteger(x)) whole = false;
  }
  if (whole && lo >= 0 && hi <= 255) return 'uint8';
  if (whole && lo >= -32768 && hi <= 32767) return 'int16';
  return 'float32';
}

/** The file name of a visit's exported map. */
export const segmentMapFileName = (visitId: string) => `segments-${visitId}.nii.gz`;
