import { badFile, isFalciformError, tooLarge } from '../errors.js';
import { DEFAULT_MAX_BYTES } from '../volume/nifti-read.js';
import { bytesPerVoxel } from '../volume/nifti-datatype.js';
import { makeVolume, type Datatype, type Volume, type VoxelArray } from '../volume/volume.js';
import { isDicomPart10, parseDicomFile, type DicomFacts, type DicomFileInfo, type InflateRaw } from './parse.js';
import type { DecodeImage } from './codecs.js';
import { decodeFrame, storedDatatype } from './pixels.js';
import { chooseStack, groupStacks, stackGeometry, stackName, type SeriesEntry, type Stack } from './series.js';

/**
 * Reads DICOM files (a folder's worth, in any order, under any names) into one Falciform volume.
 * Two passes keep memory near the volume's size: the first parses every header and keeps only plain
 * facts; the second reads the chosen series' files again, one at a time, into the volume.
 */

/**
 * One file offered to the reader: its name for messages and a way to get its bytes, read on demand.
 * The reader is done with one file's bytes before it asks for the next, so a source may hand out the
 * same reused buffer each time.
 */
export interface DicomSource {
  name: string;
  bytes(): Promise<Uint8Array>;
}

export interface DicomReadOptions {
  inflateRaw: InflateRaw;
  /** Decoder for JPEG-LS and JPEG 2000 pixel data; loaded only when a chosen file needs it. */
  decodeImage: DecodeImage;
  /** Memory budget for the voxel data, in bytes. */
  maxBytes?: number;
  /** Called after each file of a pass. */
  onProgress?: (phase: 'headers' | 'slices', done: number, total: number) => void;
}

export interface DicomScan {
  sources: DicomSource[];
  /** Parallel to `sources`; undefined for files that are not DICOM or could not be read. */
  files: (DicomFileInfo | undefined)[];
  stacks: Stack[];
  warnings: string[];
}

export interface LoadedDicom {
  volume: Volume;
  series: SeriesEntry[];
  chosen: SeriesEntry;
  /** Header facts of the chosen series (from its first slice). */
  facts: DicomFacts;
  warnings: string[];
}

const MEDIA_DIRECTORY = '1.2.840.10008.1.3.10';

function listed(names: string[], max = 5): string {
  return names.slice(0, max).join(', ') + (names.length > max ? ` and ${names.length - max} more` : '');
}

/**
 * Parses every source's header. A single source that is not DICOM, or is damaged, is an error; in a
 * folder such files are skipped with a warning, and the series checks catch a slice that went missing.
 */
export async function scanDicom(sources: DicomSource[], opts: Omit<DicomReadOptions, 'decodeImage'>): Promise<DicomScan> {
  const maxBytes = opts.maxBytes ?? DEFAULT_MAX_BYTES;
  const files: (DicomFileInfo | undefined)[] = [];
  const notDicom: string[] = [];
  const damaged: string[] = [];
  const warnings: string[] = [];
  for (let n = 0; n < sources.length; n++) {
    const src = sources[n];
    const bytes = await src.bytes();
    if (!isDicomPart10(bytes)) {
      if (sources.length === 1) throw badFile(src.name, 'is not a DICOM file (no "DICM" marker after the 128-byte preamble)');
      notDicom.push(src.name);
      files.push(undefined);
      continue;
    }
    try {
      const { info } = await parseDicomFile(bytes, src.name, opts.inflateRaw, maxBytes);
      files.push(info);
    } catch (e) {
      if (sources.length === 1 || !isFalciformError(e)) throw e;
      damaged.push(e.message);
      files.push(undefined);
    }
    opts.onProgress?.('headers', n + 1, sources.length);
  }
  if (notDicom.length > 0) warnings.push(`${notDicom.length} file(s) are not DICOM and were ignored: ${listed(notDicom)}`);
  for (const d of damaged) warnings.push(`skipped ${d}`);
  const dirs = files.filter((f) => f?.facts.sopClassUid === MEDIA_DIRECTORY);
  if (dirs.length > 0) warnings.push(`${dirs.map((f) => f!.file).join(', ')}: DICOMDIR index not needed (files are found by their content)`);
  const stacks = groupStacks(files);
  return { sources, files, stacks, warnings };
}

/** The chosen series of a scan read into a volume, or an error naming the series and slice at fault. */
export async function readDicomVolume(scan: DicomScan, opts: DicomReadOptions & { series?: string; label: string }): Promise<LoadedDicom> {
  const { chosen, entries, why } = chooseStack(scan.stacks, opts.series);
  if (!chosen) {
    if (scan.stacks.length === 0) throw badFile(opts.label, 'holds no DICOM images');
    const reasons = entries.map((e) => `${stackName({ id: e.id, facts: { seriesUid: e.uid, seriesNumber: e.number, seriesDescription: e.description, imageType: [] } })}: ${e.why}`);
    throw badFile(opts.label, `${why}; ${listed(reasons, 4)}`);
  }
  const geometry = stackGeometry(chosen);
  if ('problem' in geometry) {
    const others = entries.filter((e) => !e.taken && e.why === 'another series was taken').length;
    throw badFile(opts.label, `${geometry.problem}${others > 0 && opts.series === undefined ? `; pick another series with --series UID (${others} other volumetric series found)` : ''}`);
  }
  const volume = await fillVolume(scan, chosen, geometry.affine, opts);
  const chosenEntry = entries.find((e) => e.taken) as SeriesEntry;
  const warnings = [...scan.warnings, ...geometry.warnings];
  const lossy = chosen.slices.find((r) => r.file.facts.lossyCompression)?.file;
  if (lossy) {
    warnings.push(`${stackName(chosen)}: ${lossy.file} says its image was lossy-compressed before (${lossy.facts.lossyCompression}); its values are what the file holds, not the original acquisition's`);
  }
  const volumetric = entries.filter((e) => e.taken || e.why === 'another series was taken').length;
  if (volumetric > 1 && opts.series === undefined) {
    warnings.push(`${volumetric} volumetric series found; took ${stackName(chosen)} by the default rule (most slices, then thinnest spacing, then lowest series number)`);
  }
  return { volume, series: entries, chosen: chosenEntry, facts: chosen.facts, warnings };
}

async function fillVolume(scan: DicomScan, stack: Stack, affine: readonly number[], opts: DicomReadOptions & { label: string }): Promise<Volume> {
  const nx = stack.columns;
  const ny = stack.rows;
  const nz = stack.slices.length;
  const pixels = nx * ny;
  const types = new Set(stack.slices.map((r) => storedDatatype(r.file.pixel!)));
  const first = stack.slices[0].plane;
  const uniform = types.size === 1 && stack.slices.every((r) => r.plane.slope === first.slope && r.plane.inter === first.inter);
  // Stored values and one scaling when every slice shares them (exact, as NIfTI's scl_slope/scl_inter);
  // else physical values as float32.
  const datatype: Datatype = uniform ? ([...types][0] as Datatype) : 'float32';
  const budget = opts.maxBytes ?? DEFAULT_MAX_BYTES;
  const need = pixels * nz * bytesPerVoxel(datatype);
  if (need > budget) throw tooLarge(opts.label, `${stackName(stack)} needs ${Math.ceil(need / 1024 ** 2)} MiB of voxel data, over the ${Math.floor(budget / 1024 ** 2)} MiB budget`);
  const data = makeArray(datatype, pixels * nz);
  // Each file is read once, all its frames of this stack with it.
  const byFile = new Map<number, number[]>();
  stack.slices.forEach((r, k) => {
    const list = byFile.get(r.fileIndex) ?? [];
    list.push(k);
    byFile.set(r.fileIndex, list);
  });
  let done = 0;
  for (const [fileIndex, ks] of byFile) {
    const src = scan.sources[fileIndex];
    const parsed = await parseDicomFile(await src.bytes(), src.name, opts.inflateRaw, budget);
    for (const k of ks) {
      const r = stack.slices[k];
      if (parsed.info.frames.length <= r.plane.frame) throw badFile(src.name, 'changed while it was being read');
      if (uniform) {
        // Decoded straight into the volume: no per-slice copy.
        await decodeFrame(parsed, r.plane.frame, { decodeImage: opts.decodeImage, into: new Uint8Array(data.buffer, k * pixels * data.BYTES_PER_ELEMENT, pixels * data.BYTES_PER_ELEMENT) });
      } else {
        const values = await decodeFrame(parsed, r.plane.frame, { decodeImage: opts.decodeImage });
        if (values.length !== pixels) throw badFile(src.name, `holds ${values.length} pixels per frame where ${pixels} were expected`);
        const { slope, inter } = r.plane;
        const at = k * pixels;
        for (let n = 0; n < pixels; n++) data[at + n] = values[n] * slope + inter;
      }
    }
    done++;
    opts.onProgress?.('slices', done, byFile.size);
  }
  return makeVolume([nx, ny, nz], data, affine, datatype, uniform ? first.slope : 1, uniform ? first.inter : 0);
}

function makeArray(t: Datatype, n: number): VoxelArray {
  switch (t) {
    case 'uint8': return new Uint8Array(n);
    case 'int8': return new Int8Array(n);
    case 'uint16': return new Uint16Array(n);
    case 'int16': return new Int16Array(n);
    case 'uint32': return new Uint32Array(n);
    case 'int32': return new Int32Array(n);
    case 'float32': return new Float32Array(n);
    case 'float64': return new Float64Array(n);
  }
}

/** Reads DICOM sources into a volume in one call (scan, choose, fill). */
export async function readDicom(sources: DicomSource[], label: string, opts: DicomReadOptions & { series?: string }): Promise<LoadedDicom> {
  const scan = await scanDicom(sources, opts);
  return readDicomVolume(scan, { ...opts, label });
}
