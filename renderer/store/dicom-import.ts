import type { OpenedFile } from '../../main/bridge-api.js';
import type { DecodeImage } from '../../src/dicom/codecs.js';
import { isDicomPart10 } from '../../src/dicom/parse.js';
import { readDicomVolume, scanDicom, type DicomScan } from '../../src/dicom/read.js';
import { chooseStack, type SeriesEntry } from '../../src/dicom/series.js';
import { webInflateRaw } from '../../src/dicom/web-inflate.js';
import { badInput } from '../../src/errors.js';
import { volumeKey, type DicomVisitFacts, type VolumeRecord } from '../../src/model/records.js';
import { parseNiftiHeader } from '../../src/volume/nifti-header.js';
import { encodeNifti } from '../../src/volume/nifti-write.js';
import { webGzip } from '../../src/volume/web-gzip.js';
import { exactWriteType } from '../../src/volume/write-type.js';
import { compact } from './record-helpers.js';

/**
 * A DICOM series as a visit's scan in the app: the chosen files' DICOM series are listed with the
 * default choice, the header's patient ID and study date proposed, and the chosen series read into a
 * volume that is stored as NIfTI (the DICOM files themselves are not kept).
 */

/** What the import dialog shows before anything is read in full. */
export interface DicomProposal {
  series: SeriesEntry[];
  /** The series taken by default, when one can be. */
  defaultId?: string;
  patientId?: string;
  /** Shown in the dialog so the user can check whose files these are; never stored. */
  patientName?: string;
  patientBirthDate?: string;
  studyDate?: string;
  warnings: string[];
}

export const ALL_DICOM = 'the chosen DICOM files';

export function dicomFilesOf(files: OpenedFile[]): OpenedFile[] {
  return files.filter((f) => isDicomPart10(f.bytes));
}

function scanOf(files: OpenedFile[], onProgress?: (done: number, total: number) => void): Promise<DicomScan> {
  const sources = files.map((f) => ({ name: f.relativePath, bytes: () => Promise.resolve(f.bytes) }));
  return scanDicom(sources, { inflateRaw: webInflateRaw, onProgress: (_phase, done, total) => onProgress?.(done, total) });
}

/** The header's patient ID, refusing an import whose DICOM files name more than one patient. */
function onePatient(scan: DicomScan): string | undefined {
  const ids = new Set(scan.files.filter((f) => f?.pixel).map((f) => f!.facts.patientId ?? ''));
  if (ids.size > 1) {
    throw badInput(ALL_DICOM, `belong to ${ids.size} different patients (patient IDs ${[...ids].map((i) => i || 'none').join(', ')}); import one patient's files at a time`);
  }
  return [...ids][0] || undefined;
}

export async function proposeDicom(files: OpenedFile[]): Promise<DicomProposal> {
  const scan = await scanOf(dicomFilesOf(files));
  const patientId = onePatient(scan);
  const { chosen, entries } = chooseStack(scan.stacks);
  const facts = chosen?.facts ?? scan.files.find((f) => f)?.facts;
  return compact({
    series: entries,
    defaultId: chosen?.id,
    patientId,
    patientName: facts?.patientName,
    patientBirthDate: facts?.patientBirthDate,
    studyDate: facts?.studyDate,
    warnings: scan.warnings,
  });
}

/** Reads the chosen series in full and returns the scan's volume record and the visit's header facts. */
export async function readDicomScan(
  files: OpenedFile[],
  series: string | undefined,
  at: { patientId: string; visitId: string },
  onProgress: ((done: number, total: number, what: string) => void) | undefined,
  decodeImage: DecodeImage,
): Promise<{ record: VolumeRecord; facts: DicomVisitFacts; warnings: string[] }> {
  const dicom = dicomFilesOf(files);
  const scan = await scanOf(dicom, (done, total) => onProgress?.(done, total, 'reading DICOM headers'));
  onePatient(scan);
  const loaded = await readDicomVolume(scan, {
    inflateRaw: webInflateRaw,
    decodeImage,
    series,
    label: ALL_DICOM,
    onProgress: (_phase, done, total) => onProgress?.(done, total, 'reading DICOM slices'),
  });
  const { volume, facts, chosen } = loaded;
  const raw = encodeNifti(volume, exactWriteType(volume), { description: 'from DICOM' });
  const fileName = `DICOM series ${facts.seriesNumber ?? ''} ${facts.seriesDescription ?? ''}`.replace(/\s+/g, ' ').trim();
  // The record describes the stored NIfTI as a later read will see it (float32 sform, written type).
  const { info } = parseNiftiHeader(raw, fileName);
  const bytes = await webGzip(raw);
  const chosenFiles = new Set(scan.stacks.find((s) => s.id === chosen.id)?.slices.map((r) => r.fileIndex));
  const record: VolumeRecord = {
    key: volumeKey(at.patientId, at.visitId, 'scan'),
    patientId: at.patientId,
    visitId: at.visitId,
    role: 'scan',
    fileName,
    bytes,
    dims: [...info.dims],
    affine: [...info.affine],
    datatype: info.datatype,
    volumeBytes: info.volumeBytes,
    importedBytes: dicom.filter((_, n) => chosenFiles.has(n)).reduce((sum, f) => sum + f.bytes.byteLength, 0),
  };
  const visitFacts: DicomVisitFacts = compact({
    seriesUid: chosen.uid,
    studyDate: facts.studyDate,
    modality: facts.modality,
    seriesDescription: facts.seriesDescription,
    sliceThicknessMm: facts.sliceThicknessMm,
    contrastAgent: facts.contrastAgent,
    kvp: facts.kvp,
    manufacturerModel: facts.manufacturerModel,
  });
  return { record, facts: visitFacts, warnings: loaded.warnings };
}
