/// <reference lib="webworker" />
// Grows a liver mask from a seed, or one lesion from a click, on a stored visit's scan, off the
// window's thread, with the core's growers (the same as `falciform liver` and `falciform lesion`).
// The result comes back as .nii.gz bytes on the scan's grid, so accepting it only stores them.
import { paintBalls, strokeDabs } from '../../src/image/brush';
import { growLesion } from '../../src/image/grow-lesion';
import { growLiver } from '../../src/image/grow-liver';
import { visitSegmentMap } from '../../src/patient/visit-map';
import { encodeNifti } from '../../src/volume/nifti-write';
import { resampleNearest } from '../../src/volume/resample';
import { makeVolume, voxelIndexAtWorld, type Volume } from '../../src/volume/volume';
import { webGzip } from '../../src/volume/web-gzip';
import { storedPatient } from '../analysis/store-source';
import { appDb } from '../store/db';
import type { GrowRequest, GrowResult } from '../viewer/grow-messages';
import { serveJob } from './job';

async function grow(req: GrowRequest, progress: (done: number, total: number, step: string) => void): Promise<GrowResult> {
  const { manifest, files } = await storedPatient(appDb(), req.patientId);
  const v = manifest.visits.find((x) => x.id === req.visitId);
  if (!v) throw new Error(`visit ${req.visitId} is not among ${req.patientId}'s stored visits`);
  if (req.kind === 'brush') {
    const path = req.role === 'liver' ? v.liver : v.lesions;
    if (path === undefined) throw new Error(req.role === 'liver' ? 'this visit has no liver mask to edit; grow one first' : 'this visit has no lesion mask to edit; grow a lesion first');
    progress(0, 100, 'reading the mask');
    const mask = labelsAsBytes((await files.volume(path)).volume);
    const centre = voxelIndexAtWorld(mask, req.pathMm[0]);
    const labels = new Set<number>();
    for (let n = 0; n < mask.data.length; n++) if (mask.data[n]) labels.add(mask.data[n]);
    // Adding to a lesion mask extends the lesion under the brush, or a binary mask's one value.
    const value = req.erase ? 0 : req.role === 'liver' ? 1 : centre >= 0 && mask.data[centre] ? mask.data[centre] : labels.size === 1 ? [...labels][0] : Math.max(0, ...labels) + 1;
    const dabs = strokeDabs(req.pathMm, req.radiusMm);
    const { data, changed } = paintBalls(mask, dabs, req.radiusMm, value);
    const bytes = await webGzip(encodeNifti(makeVolume(mask.dims, data, mask.affine, 'uint8'), 'uint8'));
    return { kind: 'brush', role: req.role, erase: req.erase, pathMm: req.pathMm, dabs: dabs.length, radiusMm: req.radiusMm, changed, bytes, dims: [...mask.dims], affine: [...mask.affine] };
  }
  progress(0, 100, 'reading the scan');
  const scan = (await files.volume(v.scan)).volume;
  const grid = { dims: [...scan.dims], affine: [...scan.affine] };
  if (req.kind === 'liver') {
    const r = growLiver({ scan, seedsMm: [req.seedMm], params: req.params, onProgress: (f, step) => progress(Math.round(5 + 90 * f), 100, step) });
    progress(95, 100, 'compressing the mask');
    const bytes = await webGzip(encodeNifti(r.mask, 'uint8'));
    return { kind: 'liver', seedMm: req.seedMm, volumeMl: r.volumeMl, noiseLevel: r.noiseLevel, params: r.params, warnings: r.warnings, bytes, ...grid };
  }
  progress(10, 100, 'reading the liver');
  const liver = await visitLiver(v, files, scan);
  progress(30, 100, 'growing the lesion');
  const r = growLesion({ scan, liver, seedMm: req.seedMm, params: req.params });
  progress(80, 100, 'adding it to the lesion mask');
  const merged = v.lesions !== undefined ? addToMask((await files.volume(v.lesions)).volume, r.mask, scan) : r.mask;
  const bytes = await webGzip(encodeNifti(merged, 'uint8'));
  const l = r.lesion;
  return {
    kind: 'lesion', seedMm: req.seedMm, lesionKind: r.kind, lesionValue: r.lesionValue, liverValue: r.liverValue, threshold: r.threshold,
    volumeMl: l.volumeMl ?? 0, longestAxialMm: l.longestAxialMm, shortAxisMm: l.shortAxisMm, endpointsMm: l.longestAxialEndpointsMm,
    reachedLimit: r.reachedLimit, params: r.params, warnings: r.warnings, bytes, ...grid,
  };
}

/** The visit's liver: its liver mask, else every labelled voxel of its segment map. */
async function visitLiver(v: Awaited<ReturnType<typeof storedPatient>>['manifest']['visits'][number], files: Awaited<ReturnType<typeof storedPatient>>['files'], scan: Volume): Promise<Volume> {
  if (v.liver !== undefined) return (await files.volume(v.liver)).volume;
  const read = { volume: async (_r: string, p: string) => (await files.volume(p)).volume, text: (_r: string, p: string) => files.text(p), name: files.name };
  return (await visitSegmentMap(v, read, scan)).liver;
}

/** A mask's labels (after scaling) as one byte a voxel on its own grid. */
function labelsAsBytes(mask: Volume): Volume {
  const out = new Uint8Array(mask.data.length);
  for (let n = 0; n < out.length; n++) {
    const x = mask.data[n] * mask.slope + mask.inter;
    if (x < 0 || x > 255 || !Number.isInteger(x)) throw new Error('the mask holds values that do not fit one byte; it cannot be edited with the brush');
    out[n] = x;
  }
  return makeVolume(mask.dims, out, mask.affine, 'uint8');
}

/**
 * The stored lesion mask brought onto the scan's grid with the new lesion added: under the mask's
 * own value when it is binary, as a new label when it holds one label per lesion.
 */
function addToMask(old: Volume, lesion: Volume, scan: Volume): Volume {
  const values = resampleNearest(old.data, old, scan);
  const labels = new Set<number>();
  for (let n = 0; n < values.length; n++) if (values[n] !== 0) labels.add(values[n] * old.slope + old.inter);
  const label = labels.size <= 1 ? (labels.values().next().value ?? 1) : Math.max(...labels) + 1;
  if (label > 255 || !Number.isInteger(label)) throw new Error('the lesion mask holds labels that do not fit one byte; add this lesion as a mark');
  const out = new Uint8Array(values.length);
  for (let n = 0; n < values.length; n++) out[n] = lesion.data[n] ? label : values[n] * old.slope + old.inter;
  return makeVolume(scan.dims, out, scan.affine, 'uint8');
}

serveJob(grow, (r) => [r.bytes.buffer as ArrayBuffer]);
