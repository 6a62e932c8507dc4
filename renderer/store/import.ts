import type { OpenedFile } from '../../main/bridge-api.js';
import { badFile, badInput } from '../../src/errors.js';
import type { Vec3 } from '../../src/geometry/mat4.js';
import { parseMarks } from '../../src/lesions/marks.js';
import { parseManifest, resolveManifestPath, type Manifest, type ManifestVisit } from '../../src/manifest/manifest.js';
import {
  INPUT_KINDS, VOLUME_ROLES, inputKey, volumeKey,
  type AuditRecord, type InputKind, type InputRecord, type PatientRecord, type TreatmentRecord, type VisitRecord,
  type VolumeRecord, type VolumeRole,
} from '../../src/model/records.js';
import { visitStoredBytes } from '../../src/model/storage-size.js';
import { LANDMARK_NAMES, checkLandmarks, parseLandmarks } from '../../src/segments/landmarks.js';
import { parseScheme } from '../../src/segments/scheme.js';
import type { SegmentScheme } from '../../src/segments/segment-map.js';
import { isGzip, readNifti } from '../../src/volume/nifti-read.js';
import { webGzip, webInflate } from '../../src/volume/web-gzip.js';
import type { FalciformDb } from './db.js';
import { ALL_FILES, NIFTI_NAME, PAIR_NAME, PAIR_PROBLEM, baseName, guessLooseFiles, textOf } from './loose-files.js';
import { compact, ownBytes, trailId } from './record-helpers.js';
import { dicomFilesOf, readDicomScan } from './dicom-import.js';
import type { DecodeImage } from '../../src/dicom/codecs.js';
import { checkMask, checkOverlap, checkPointsOnScan, type GridInfo } from '../../src/segments/import-checks.js';
import { explainWriteFailure } from './write-failure.js';

/** Everything one patient's import will write, read and checked in full beforehand. */
export interface PatientPlan {
  /** The manifest the patient came from, or the loose files' folder. */
  source: string;
  /** Patient details came from a manifest (loose files carry none beyond the id). */
  fromManifest: boolean;
  patient: PatientRecord;
  visits: VisitRecord[];
  volumes: VolumeRecord[];
  inputs: InputRecord[];
  treatments: TreatmentRecord[];
}

export interface ImportPlan {
  patients: PatientPlan[];
  warnings: string[];
  /** Chosen files the import does not use. */
  ignored: string[];
}

/** What loose files (no manifest) need from the user: they cannot say whose they are or when. */
export interface LooseVisitDetails {
  patientId: string;
  date: string;
  /** Defaults to the date. */
  visitId?: string;
  splitIV?: boolean;
  /** The DICOM series (UID, or UID:n) to take as the scan when the files hold DICOM; default by the documented rule. */
  dicomSeries?: string;
}

export interface ReadImportOptions {
  loose?: LooseVisitDetails;
  /** JPEG-LS and JPEG 2000 decoding for DICOM scans (the worker's WebAssembly codecs). */
  decodeImage?: DecodeImage;
  onProgress?: (done: number, total: number, file: string) => void;
}

export interface ImportResult {
  patients: { id: string; newPatient: boolean; visits: string[] }[];
  warnings: string[];
}

export const MANIFEST_NAME = 'manifest.json';
/** Stands for the chosen DICOM series where a loose visit's scan path would be. */
const DICOM_SCAN = 'DICOM series';
const LOOSE_DETAILS = 'the import details';

/** The chosen files' manifests: every file named manifest.json (one per patient folder). */
export function findManifests(files: OpenedFile[]): OpenedFile[] {
  return files.filter((f) => baseName(f.relativePath).toLowerCase() === MANIFEST_NAME);
}

/**
 * Reads and checks every file of an import: manifests, each NIfTI file decoded in full (so a
 * truncated one is caught), landmark sets, marks and schemes parsed, masks checked against their
 * scan. Writes nothing; the first problem throws, naming the file.
 */
export async function readImport(files: OpenedFile[], opts: ReadImportOptions = {}): Promise<ImportPlan> {
  const byPath = new Map(files.map((f) => [normalisePath(f.relativePath), f]));
  const manifests = findManifests(files);
  const used = new Set<string>();
  const warnings: string[] = [];
  const now = new Date().toISOString();
  const jobs: { manifest: Manifest; source: string; fromManifest: boolean; lookup: Lookup; dicom?: DicomScanSource; dicomFolder?: DicomFolder }[] = [];

  if (manifests.length > 0) {
    for (const m of manifests) {
      used.add(normalisePath(m.relativePath));
      const manifest = parseManifest(textOf(m), m.relativePath, { scanOnly: true });
      // A visit's scan may name a folder of DICOM files (as for the command line).
      const dicomFolder: DicomFolder = (rel) => {
        const prefix = `${normalisePath(resolveManifestPath(m.relativePath, rel))}/`;
        const under = files.filter((f) => normalisePath(f.relativePath).startsWith(prefix));
        const found = dicomFilesOf(under);
        for (const f of under) used.add(normalisePath(f.relativePath));
        return found.length > 0 ? found : undefined;
      };
      jobs.push({ manifest, source: m.relativePath, fromManifest: true, lookup: manifestLookup(m.relativePath, byPath), dicomFolder });
    }
  } else {
    if (files.length === 0) throw badInput(ALL_FILES, 'are none: choose a patient folder or a visit\'s files');
    if (!opts.loose) {
      throw badInput(ALL_FILES, `hold no ${MANIFEST_NAME}; give the patient id and visit date to import them as one visit`);
    }
    const guess = guessLooseFiles(files);
    warnings.push(...guess.notes);
    // DICOM files (any names) give the scan; they are read as one series, not looked up one by one.
    const dicomFiles = dicomFilesOf(files);
    let dicom: DicomScanSource | undefined;
    if (dicomFiles.length > 0) {
      if (guess.files.scan !== undefined) throw badInput(ALL_FILES, `hold both a NIfTI scan (${guess.files.scan}) and DICOM images; keep one`);
      guess.files.scan = DICOM_SCAN;
      dicom = { files: dicomFiles, series: opts.loose.dicomSeries };
      for (const f of dicomFiles) used.add(normalisePath(f.relativePath));
    }
    const manifest = parseManifest(JSON.stringify(looseManifest(guess.files, opts.loose)), LOOSE_DETAILS, { scanOnly: true });
    jobs.push({ manifest, source: commonFolder(files) ?? 'loose files', fromManifest: false, dicom, lookup: (_visit, _field, path) => byPath.get(normalisePath(path)) ?? missing(path) });
  }

  const seen = new Map<string, string>();
  for (const j of jobs) {
    const other = seen.get(j.manifest.patient.id);
    if (other !== undefined) throw badFile(j.source, `names patient ${j.manifest.patient.id}, as ${other} does; one manifest per patient`);
    seen.set(j.manifest.patient.id, j.source);
  }

  const total = jobs.reduce((n, j) => n + j.manifest.visits.reduce((m, v) => m + filesOfVisit(v).length, 0), 0);
  const progress = { done: 0, total, report: opts.onProgress };
  const patients: PatientPlan[] = [];
  for (const j of jobs) {
    const lookup: Lookup = (visit, field, path) => {
      const f = j.lookup(visit, field, path);
      used.add(normalisePath(f.relativePath));
      progress.report?.(progress.done++, progress.total, f.relativePath);
      return f;
    };
    const dicom = j.dicom && { ...j.dicom, onProgress: (done: number, total: number, what: string) => progress.report?.(progress.done, progress.total, `${what}: ${done} of ${total}`) };
    const folder = j.dicomFolder && { find: j.dicomFolder, onProgress: (done: number, total: number, what: string) => progress.report?.(progress.done, progress.total, `${what}: ${done} of ${total}`) };
    const decodeImage = opts.decodeImage ?? noImageDecoder;
    patients.push({ ...(await planPatient(j.manifest, j.source, lookup, warnings, now, decodeImage, dicom, folder)), fromManifest: j.fromManifest });
  }
  progress.report?.(progress.total, progress.total, '');
  const ignored = files.map((f) => f.relativePath).filter((p) => !used.has(normalisePath(p)) && !baseName(p).startsWith('.'));
  const strayVolumes = ignored.filter((p) => NIFTI_NAME.test(p));
  if (strayVolumes.length > 0) warnings.push(`not named by any manifest, left out: ${strayVolumes.join(', ')}`);
  return { patients, warnings, ignored };
}

/**
 * Writes a checked plan in one transaction. A patient already stored gains the plan's visits when
 * none of them is stored yet (a later visit imported on its own); a visit id already stored refuses
 * the whole import. Any failure, a full disk included, aborts the transaction: nothing is written.
 */
export async function commitImport(db: FalciformDb, plan: ImportPlan): Promise<ImportResult> {
  const result: ImportResult = { patients: [], warnings: [...plan.warnings] };
  const writing = { what: null as string | null };
  try {
    await db.transaction('rw', [db.patients, db.visits, db.volumes, db.inputs, db.treatments, db.audit], async () => {
      for (const p of plan.patients) {
        const id = p.patient.id;
        writing.what = `patient ${id}`;
        const stored = await db.patients.get(id);
        if (stored) {
          const already = await db.visits.bulkGet(p.visits.map((v) => [id, v.id] as [string, string]));
          const clash = p.visits.filter((_, n) => already[n] !== undefined).map((v) => v.id);
          if (clash.length > 0) {
            throw badInput(
              `patient ${id}`,
              `is already stored with visit${clash.length > 1 ? 's' : ''} ${clash.join(', ')}; nothing was imported. ` +
                'To import them again, back up and delete the patient first',
            );
          }
          if (p.fromManifest && differs(stored, p.patient)) result.warnings.push(`patient ${id} was already stored; its stored details (margin, targets, body measures) were kept`);
        } else {
          await db.patients.add(p.patient);
        }
        await db.visits.bulkAdd(p.visits);
        for (const v of p.volumes) {
          writing.what = v.fileName;
          await db.volumes.add(v);
        }
        writing.what = `patient ${id}`;
        await db.inputs.bulkAdd(p.inputs);
        const knownTreatments = new Set((await db.treatments.where('patientId').equals(id).toArray()).map((t) => t.id));
        await db.treatments.bulkAdd(p.treatments.filter((t) => !knownTreatments.has(t.id)));
        await db.audit.bulkAdd(importTrail(p, !stored));
        result.patients.push({ id, newPatient: !stored, visits: p.visits.map((v) => v.id) });
      }
      writing.what = null;
    });
  } catch (e) {
    throw explainWriteFailure(e, writing.what ?? `patient ${plan.patients.map((p) => p.patient.id).join(', ')}`, 'imported');
  }
  return result;
}

type Lookup = (visit: string, field: string, path: string) => OpenedFile;

/** The DICOM files under a manifest-relative folder, or undefined when it holds none. */
type DicomFolder = (rel: string) => OpenedFile[] | undefined;

interface DicomScanSource {
  files: OpenedFile[];
  series?: string;
  onProgress?: (done: number, total: number, what: string) => void;
}

function manifestLookup(manifestPath: string, byPath: Map<string, OpenedFile>): Lookup {
  return (visit, field, rel) => {
    if (rel.startsWith('/') || /^[A-Za-z]:[\\/]/.test(rel)) {
      throw badFile(manifestPath, `visit ${visit}: ${field} "${rel}" is an absolute path; write it relative to the manifest's folder`);
    }
    const path = normalisePath(resolveManifestPath(manifestPath, rel));
    const f = byPath.get(path);
    if (f) return f;
    const near = [...byPath.keys()].find((p) => p.toLowerCase() === path.toLowerCase());
    const hint = near ? ` (there is ${near}; names must match exactly)` : '';
    throw badFile(manifestPath, `visit ${visit}: ${field} file "${rel}" is not among the chosen files${hint}`);
  };
}

function missing(path: string): never {
  throw badInput(ALL_FILES, `lost ${path} while reading`);
}

/** Where no image decoder was handed in: a JPEG-LS or JPEG 2000 frame is refused, naming its file. */
const noImageDecoder: DecodeImage = (codec) => Promise.reject(new Error(`no ${codec === 'jpeg-ls' ? 'JPEG-LS' : 'JPEG 2000'} decoder is loaded here`));

async function planPatient(
  manifest: Manifest, source: string, lookup: Lookup, warnings: string[], now: string, decodeImage: DecodeImage, dicom?: DicomScanSource,
  folder?: { find: DicomFolder; onProgress: DicomScanSource['onProgress'] },
): Promise<Omit<PatientPlan, 'fromManifest'>> {
  const patientId = manifest.patient.id;
  const patient: PatientRecord = compact({
    id: patientId,
    birthYear: manifest.patient.birthYear,
    heightCm: manifest.patient.heightCm,
    weightKg: manifest.patient.weightKg,
    sex: manifest.patient.sex,
    demo: manifest.patient.demo,
    marginMm: manifest.marginMm,
    criteria: manifest.criteria,
    targets: manifest.targets,
    resection: manifest.resection,
    protocol: manifest.protocol,
    createdAt: now,
    importedFrom: source,
  });
  const plan: Omit<PatientPlan, 'fromManifest'> = { source, patient, visits: [], volumes: [], inputs: [], treatments: [] };
  for (const visit of manifest.visits) {
    const inputs: InputRecord[] = [];
    const volumes: VolumeRecord[] = [];
    let dicomFacts: VisitRecord['dicom'];
    // The JSON inputs first: the scheme is needed to check the segment map.
    let scheme: SegmentScheme | 'default' = 'default';
    const points: { file: string; points: { name: string; at: Vec3 }[] }[] = [];
    for (const kind of INPUT_KINDS) {
      const path = kind === 'scheme' ? (visit.scheme === 'default' ? undefined : visit.scheme) : visit[kind];
      if (path === undefined) continue;
      const f = lookup(visit.id, kind, path);
      const text = textOf(f);
      const name = f.relativePath;
      if (kind === 'scheme') scheme = parseScheme(text, name);
      if (kind === 'landmarks') {
        const set = parseLandmarks(text, name);
        checkLandmarks(set, name);
        points.push({ file: name, points: LANDMARK_NAMES.map((n) => ({ name: n, at: set.points[n] })) });
      }
      if (kind === 'marks') points.push({ file: name, points: parseMarks(text, name).map((m) => ({ name: `mark "${m.id}"`, at: m.centreMm })) });
      inputs.push({ key: inputKey(patientId, visit.id, kind), patientId, visitId: visit.id, kind, fileName: name, text });
    }
    for (const role of VOLUME_ROLES) {
      const path = visit[role];
      if (path === undefined) continue;
      const dicomScan = role !== 'scan' ? undefined : dicom && path === DICOM_SCAN ? dicom : folder && { files: folder.find(path), series: undefined, onProgress: folder.onProgress };
      if (dicomScan?.files) {
        const read = await readDicomScan(dicomScan.files, dicomScan.series, { patientId, visitId: visit.id }, dicomScan.onProgress, decodeImage);
        warnings.push(...read.warnings);
        volumes.push(read.record);
        dicomFacts = read.facts;
        continue;
      }
      const f = lookup(visit.id, role, path);
      const { record, warnings: w } = await readVolume(f, role, patientId, visit.id, scheme);
      warnings.push(...w);
      volumes.push(record);
    }
    const grid = (r: VolumeRecord): GridInfo => ({ file: r.fileName, dims: r.dims, affine: r.affine });
    const scan = grid(volumes.find((v) => v.role === 'scan') as VolumeRecord);
    for (const v of volumes) if (v.role !== 'scan') checkOverlap(grid(v), scan);
    for (const p of points) checkPointsOnScan(p.points, p.file, scan);

    const record = compact({
      patientId,
      id: visit.id,
      date: visit.date,
      volumes: volumes.map((v) => v.role),
      inputs: inputs.map((i) => i.kind),
      scheme: visit.scheme === undefined ? undefined : visit.scheme === 'default' ? ('default' as const) : ('file' as const),
      splitIV: visit.splitIV,
      note: visit.note,
      dicom: dicomFacts,
      readerCalls: visit.readerCalls,
    });
    plan.visits.push({ ...record, storedBytes: visitStoredBytes(record, volumes, inputs) });
    plan.volumes.push(...volumes);
    plan.inputs.push(...inputs);
  }
  const kinds = new Map<string, number>();
  for (const t of manifest.treatments ?? []) {
    const base = `${t.date}-${t.kind}`;
    const n = (kinds.get(base) ?? 0) + 1;
    kinds.set(base, n);
    plan.treatments.push({ patientId, id: n === 1 ? base : `${base}-${n}`, date: t.date, kind: t.kind, label: t.label });
  }
  return plan;
}

/** Decodes a NIfTI file in full and keeps it gzip-compressed: the bytes as they came for a .nii.gz. */
async function readVolume(
  f: OpenedFile,
  role: VolumeRole,
  patientId: string,
  visitId: string,
  scheme: SegmentScheme | 'default',
): Promise<{ record: VolumeRecord; warnings: string[] }> {
  const name = f.relativePath;
  if (PAIR_NAME.test(name)) throw badFile(name, PAIR_PROBLEM);
  const gz = isGzip(f.bytes);
  // readNifti may byte-swap a plain file's voxels in place; the stored bytes must stay as they came.
  const loaded = await readNifti(gz ? f.bytes : f.bytes.slice(), name, { inflate: webInflate });
  if (loaded.info.pair) throw badFile(name, PAIR_PROBLEM);
  const warnings = [...loaded.warnings];
  if (role !== 'scan') warnings.push(...checkMask(loaded.volume, role, name, scheme));
  const bytes = gz ? ownBytes(f.bytes) : await webGzip(f.bytes);
  const record: VolumeRecord = {
    key: volumeKey(patientId, visitId, role),
    patientId,
    visitId,
    role,
    fileName: name,
    bytes,
    dims: [...loaded.info.dims],
    affine: [...loaded.info.affine],
    datatype: loaded.info.datatype,
    volumeBytes: loaded.info.volumeBytes,
    importedBytes: f.bytes.byteLength,
  };
  return { record, warnings };
}

/** The files a manifest visit names, as written in the manifest. */
export function filesOfVisit(v: ManifestVisit): string[] {
  const paths: (string | undefined)[] = [...VOLUME_ROLES.map((r) => v[r]), v.landmarks, v.marks, v.scheme === 'default' ? undefined : v.scheme];
  return paths.filter((p): p is string => p !== undefined);
}

/** The one-visit manifest that loose files stand for, so they pass the same checks as a folder. */
function looseManifest(files: Partial<Record<VolumeRole | InputKind, string>>, d: LooseVisitDetails): object {
  if (files.scan === undefined) throw badInput(ALL_FILES, 'hold no scan; put "scan" in the image\'s file name (e.g. scan.nii.gz)');
  const planes = files.liver !== undefined && files.landmarks !== undefined;
  const { scheme, ...rest } = files;
  const visit = { id: d.visitId?.trim() || d.date, date: d.date, ...rest, scheme, splitIV: d.splitIV };
  // A scan alone is a visit too: its liver, landmarks and lesions are made in the viewer.
  if (Object.values(rest).filter((x) => x !== undefined).length === 1) {
    return { patient: { id: d.patientId.trim() }, visits: [{ id: visit.id, date: visit.date, scan: files.scan }] };
  }
  if (files.segments === undefined && !planes) {
    throw badInput(ALL_FILES, 'hold no segment map ("segments" in a file name) and no liver mask with a landmark set');
  }
  if (files.segments !== undefined && planes) {
    throw badInput(ALL_FILES, `hold both a segment map (${files.segments}) and a liver mask with landmarks; keep one way of giving the segments`);
  }
  if (files.lesions === undefined && files.marks === undefined) {
    throw badInput(ALL_FILES, 'hold no lesion mask ("lesions" in a file name) and no marks file');
  }
  if (files.lesions !== undefined && files.marks !== undefined) {
    throw badInput(ALL_FILES, `hold both a lesion mask (${files.lesions}) and a marks file (${files.marks}); keep one`);
  }
  return { patient: { id: d.patientId.trim() }, visits: [visit] };
}

/** Folder and file paths compared the same way: forward slashes, no "." or ".." steps. */
export function normalisePath(path: string): string {
  const out: string[] = [];
  for (const part of path.replace(/\\/g, '/').split('/')) {
    if (part === '' || part === '.') continue;
    if (part === '..') out.pop();
    else out.push(part);
  }
  return out.join('/');
}

function commonFolder(files: OpenedFile[]): string | null {
  const tops = new Set(files.map((f) => normalisePath(f.relativePath).split('/')).map((parts) => (parts.length > 1 ? parts[0] : '')));
  const [only] = tops;
  return tops.size === 1 && only ? only : null;
}

function differs(a: PatientRecord, b: PatientRecord): boolean {
  const keys = ['birthYear', 'heightCm', 'weightKg', 'sex', 'marginMm', 'criteria'] as const;
  return keys.some((k) => a[k] !== b[k]) || JSON.stringify(a.targets ?? null) !== JSON.stringify(b.targets ?? null);
}

function importTrail(p: PatientPlan, newPatient: boolean): AuditRecord[] {
  const at = new Date().toISOString();
  const patientId = p.patient.id;
  const trail: AuditRecord[] = [];
  if (newPatient) {
    trail.push({ id: trailId(), at, patientId, entity: 'patient', entityId: patientId, field: '*', oldValue: null, newValue: { source: p.source }, action: 'import' });
  }
  for (const v of p.visits) {
    const files = [...p.volumes, ...p.inputs].filter((r) => r.visitId === v.id).map((r) => r.fileName);
    trail.push({ id: trailId(), at, patientId, entity: 'visit', entityId: v.id, field: 'files', oldValue: null, newValue: files, action: 'import' });
    if (v.dicom) trail.push({ id: trailId(), at, patientId, entity: 'visit', entityId: v.id, field: 'dicomSeries', oldValue: null, newValue: v.dicom.seriesUid, action: 'import' });
  }
  return trail;
}
