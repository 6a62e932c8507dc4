/// <reference lib="webworker" />
// Decodes one visit's volumes for the viewer off the window's thread: the scan, its segment map (imported,
// or built from liver mask and landmarks with the core's own functions, as the analysis does) and the
// lesion mask's lesions, all brought onto the scan's grid and handed over without copying.
import { transformPoint } from '../../src/geometry/mat4';
import { lesionsFromMask } from '../../src/lesions/components';
import { visitSegmentMap } from '../../src/patient/visit-map';
import { resampleLabels } from '../../src/segments/resample';
import type { Volume } from '../../src/volume/volume';
import { resampleNearest } from '../../src/volume/resample';
import { storedPatient } from '../analysis/store-source';
import { errorText } from '../error-text';
import { appDb } from '../store/db';
import { getSetting } from '../store/patients';
import type { VisitVolumes, VolumesRequest } from '../viewer/volume-messages';
import { summariseValues } from '../viewer/window-level';
import { serveJob, type Progress } from './job';

/** World box around the liver mask's voxels (for placing a first landmark set). */
function liverBox(liver: Volume): VisitVolumes['liverBoxMm'] {
  const [nx, ny, nz] = liver.dims;
  const lo = [Infinity, Infinity, Infinity], hi = [-Infinity, -Infinity, -Infinity];
  const { data, slope, inter } = liver;
  let n = 0;
  for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++, n++) {
    if (!(data[n] * slope + inter > 0)) continue;
    if (i < lo[0]) lo[0] = i; if (i > hi[0]) hi[0] = i;
    if (j < lo[1]) lo[1] = j; if (j > hi[1]) hi[1] = j;
    if (k < lo[2]) lo[2] = k; if (k > hi[2]) hi[2] = k;
  }
  if (lo[0] === Infinity) return null;
  const min: [number, number, number] = [Infinity, Infinity, Infinity], max: [number, number, number] = [-Infinity, -Infinity, -Infinity];
  for (const i of [lo[0], hi[0]]) for (const j of [lo[1], hi[1]]) for (const k of [lo[2], hi[2]]) {
    transformPoint(liver.affine, [i, j, k]).forEach((w, r) => {
      if (w < min[r]) min[r] = w;
      if (w > max[r]) max[r] = w;
    });
  }
  return { min, max };
}

async function load({ patientId, visitId }: VolumesRequest, progress: Progress): Promise<VisitVolumes> {
  const { manifest, files } = await storedPatient(appDb(), patientId);
  const v = manifest.visits.find((x) => x.id === visitId);
  if (!v) throw new Error(`visit ${visitId} is not among ${patientId}'s stored visits`);
  const total = 4;
  const warnings: string[] = [];
  progress(0, total, 'reading the scan');
  const loaded = await files.volume(v.scan);
  warnings.push(...loaded.warnings);
  const scan = loaded.volume;
  const values = summariseValues(scan.data, scan.slope, scan.inter);

  progress(1, total, v.segments !== undefined ? 'reading the segment map' : 'building the segment map from the landmarks');
  let segments: VisitVolumes['segments'] = null;
  let segmentProblem: string | null = null;
  try {
    const read = { volume: async (_role: string, p: string) => (await files.volume(p)).volume, text: (_role: string, p: string) => files.text(p), name: files.name };
    const { map, source, warnings: mapWarnings } = await visitSegmentMap(v, read, scan);
    warnings.push(...mapWarnings);
    const names = new Set(map.scheme.values());
    segments = { codes: resampleLabels(map, scan), splitIV: names.has('IVa') || names.has('IVb'), source };
  } catch (e) {
    segmentProblem = errorText(e);
  }
  // Only a visit that could switch to landmarks needs it; a built map has read the liver already.
  const liverBoxMm = v.liver !== undefined && v.landmarks === undefined ? liverBox((await files.volume(v.liver)).volume) : null;

  progress(2, total, 'outlining the lesions');
  let lesions: VisitVolumes['lesions'] = null;
  if (v.lesions !== undefined) {
    const mask = (await files.volume(v.lesions)).volume;
    const found = lesionsFromMask(mask, files.name(v.lesions), await getSetting(appDb(), 'maxLesions'));
    // One byte a voxel unless a mask holds more than 255 lesions.
    const own = found.lesions.length < 256 ? new Uint8Array(mask.data.length) : new Uint16Array(mask.data.length);
    // Ids as the analysis numbers them: L1, L2, … in the order lesionsFromMask gives.
    found.lesions.forEach((l, n) => { for (const voxel of l.voxels) own[voxel] = n + 1; });
    lesions = { labels: resampleNearest(own, mask, scan), ids: found.lesions.map((_, n) => `L${n + 1}`) };
  }

  let viable: Uint8Array | null = null;
  if (v.viable !== undefined) {
    const mask = (await files.volume(v.viable)).volume;
    const own = new Uint8Array(mask.data.length);
    const { data, slope, inter } = mask;
    for (let n = 0; n < own.length; n++) {
      const x = data[n] * slope + inter;
      if (x !== 0 && x === x) own[n] = 1;
    }
    viable = resampleNearest(own, mask, scan);
  }

  progress(3, total, 'preparing the display');
  return {
    patientId,
    visitId,
    dims: [...scan.dims],
    affine: [...scan.affine],
    inverse: [...scan.inverse],
    spacingMm: [...scan.spacingMm],
    scan: scan.data,
    slope: scan.slope,
    inter: scan.inter,
    values,
    segments,
    segmentProblem,
    lesions,
    viable,
    liverBoxMm,
    warnings,
  };
}

serveJob(load, (v) => [v.scan, v.segments?.codes, v.lesions?.labels, v.viable].flatMap((a) => (a ? [a.buffer as ArrayBuffer] : [])));
