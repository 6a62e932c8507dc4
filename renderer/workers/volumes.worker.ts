/// <reference lib="webworker" />
// Decodes one visit's volumes for the viewer off the window's thread: the scan, its segment map (imported,
// or built from liver mask and landmarks with the core's own functions, as the analysis does) and the
// lesion mask's lesions, all brought onto the scan's grid and handed over without copying. The scan goes
// first, as soon as it is decoded, so the viewer draws it while the overlays are made.
import { describeLiver } from '../../src/followup/liver-shape';
import { transformPoint } from '../../src/geometry/mat4';
import type { ManifestVisit } from '../../src/manifest/manifest';
import type { PatientFiles } from '../../src/patient/load';
import { parseLandmarks } from '../../src/segments/landmarks';
import { proposeLandmarks } from '../../src/segments/propose';
import { lesionsFromMask } from '../../src/lesions/components';
import { visitSegmentMap } from '../../src/patient/visit-map';
import { resampleLabels } from '../../src/segments/resample';
import type { Volume } from '../../src/volume/volume';
import { resampleNearest } from '../../src/volume/resample';
import { storedPatient } from '../analysis/store-source';
import { errorText } from '../error-text';
import { appDb } from '../store/db';
import { getSetting } from '../store/patients';
import type { LandmarkProposal, VisitOverlays, VisitScan, VisitVolumes, VolumesRequest } from '../viewer/volume-messages';
import { summariseValues } from '../viewer/window-level';
import { serveJob, type Part, type Progress } from './job';

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

/** The earlier visit's landmarks carried onto this visit's liver (core `proposeLandmarks`). */
async function propose(earlier: ManifestVisit, liver: Volume, files: PatientFiles, label: string): Promise<LandmarkProposal | null> {
  const landmarks = parseLandmarks(await files.text(earlier.landmarks!), files.name(earlier.landmarks!));
  const before = describeLiver((await files.volume(earlier.liver!)).volume);
  const now = describeLiver(liver);
  if (!before || !now) return null;
  const p = proposeLandmarks({ landmarks, liver: before }, { liver: now }, label);
  if (!p) return null;
  const a = p.alignment;
  return { fromVisit: earlier.id, set: p.set, method: a.method, residualMm: a.residualMm, rotationDeg: a.rotationDeg, warnings: a.warnings };
}

async function load({ patientId, visitId }: VolumesRequest, progress: Progress, part: Part): Promise<VisitOverlays> {
  const { manifest, files } = await storedPatient(appDb(), patientId);
  const v = manifest.visits.find((x) => x.id === visitId);
  if (!v) throw new Error(`visit ${visitId} is not among ${patientId}'s stored visits`);
  const total = 4;
  progress(0, total, 'reading the scan');
  const loaded = await files.volume(v.scan);
  const scan = loaded.volume;
  const first: VisitScan = {
    patientId,
    visitId,
    dims: [...scan.dims],
    affine: [...scan.affine],
    inverse: [...scan.inverse],
    spacingMm: [...scan.spacingMm],
    scan: scan.data,
    slope: scan.slope,
    inter: scan.inter,
    values: summariseValues(scan.data, scan.slope, scan.inter),
    warnings: loaded.warnings,
  };
  // Below, only growing a liver from a seed reads the scan's voxels; otherwise they are handed over and
  // the rest needs only the scan's grid.
  part(first, v.liverSeedMm ? [] : [scan.data.buffer as ArrayBuffer]);
  const warnings: string[] = [];

  progress(1, total, v.segments !== undefined ? 'reading the segment map' : v.landmarks !== undefined ? 'building the segment map from the landmarks' : 'reading the liver mask');
  let segments: VisitVolumes['segments'] = null;
  let segmentProblem: string | null = null;
  // A scan alone, or a liver awaiting its landmarks, has no map yet: the landmark panel says what to do.
  if (v.segments !== undefined || v.landmarks !== undefined) {
    try {
      const read = { volume: async (_role: string, p: string) => (await files.volume(p)).volume, text: (_role: string, p: string) => files.text(p), name: files.name };
      const { map, source, warnings: mapWarnings } = await visitSegmentMap(v, read, scan);
      warnings.push(...mapWarnings);
      const names = new Set(map.scheme.values());
      segments = { codes: resampleLabels(map, scan), splitIV: names.has('IVa') || names.has('IVb'), source };
    } catch (e) {
      segmentProblem = errorText(e);
    }
  }
  // Only a visit that could switch to landmarks needs it; a built map has read the liver already.
  const liver = v.liver !== undefined && v.landmarks === undefined ? (await files.volume(v.liver)).volume : null;
  const liverBoxMm = liver ? liverBox(liver) : null;
  let proposal: LandmarkProposal | null = null;
  if (liver && v.segments === undefined) {
    // The nearest earlier visit with a landmark set (and so a liver mask) lends its points.
    const earlier = manifest.visits.filter((x) => x.date < v.date && x.landmarks !== undefined && x.liver !== undefined).at(-1);
    if (earlier) {
      progress(1, total, `proposing landmarks from visit ${earlier.id}`);
      try {
        proposal = await propose(earlier, liver, files, v.id);
      } catch (e) {
        warnings.push(`landmarks could not be proposed from visit ${earlier.id}: ${errorText(e)}`);
      }
    }
  }

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
  return { segments, segmentProblem, lesions, viable, liverBoxMm, proposal, warnings };
}

serveJob(load, (v) => [v.segments?.codes, v.lesions?.labels, v.viable].flatMap((a) => (a ? [a.buffer as ArrayBuffer] : [])));
