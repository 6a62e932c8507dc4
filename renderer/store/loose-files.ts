import type { OpenedFile } from '../../main/bridge-api.js';
import { badFile, badInput } from '../../src/errors.js';
import type { InputKind, VolumeRole } from '../../src/model/records.js';

/** What each loose file was taken for, by its name (volumes) or its content (JSON inputs). */
export interface LooseGuess {
  files: Partial<Record<VolumeRole | InputKind, string>>;
  /** Files that are neither NIfTI nor JSON (notes, thumbnails), left out of the import. */
  ignored: string[];
  notes: string[];
}

export const NIFTI_NAME = /\.nii(\.gz)?$/i;
export const PAIR_NAME = /\.(hdr|img)(\.gz)?$/i;
export const PAIR_PROBLEM = 'is part of a .hdr/.img pair; convert the pair to one .nii.gz file, then import';
export const ALL_FILES = 'the chosen files';

const decoder = new TextDecoder('utf-8', { fatal: true });

/** Reads a JSON input file's text; a file that is not UTF-8 is named. */
export function textOf(file: OpenedFile): string {
  try {
    return decoder.decode(file.bytes);
  } catch {
    throw badFile(file.relativePath, 'is not UTF-8 text');
  }
}

export function baseName(path: string): string {
  return path.slice(Math.max(path.lastIndexOf('/'), path.lastIndexOf('\\')) + 1);
}

/**
 * Sorts files dropped without a manifest into one visit's roles. Volumes go by words in their
 * names, JSON files by their content; a volume whose name says nothing is the scan when it is the
 * only such volume. Two files for one role, or a file that fits no role, stop the import.
 */
export function guessLooseFiles(files: OpenedFile[]): LooseGuess {
  const found: Partial<Record<VolumeRole | InputKind, string>> = {};
  const ignored: string[] = [];
  const notes: string[] = [];
  const unnamed: string[] = [];
  const assign = (role: VolumeRole | InputKind, path: string) => {
    const other = found[role];
    if (other !== undefined) {
      throw badInput(ALL_FILES, `both ${other} and ${path} look like the visit's ${role}; keep one, or import the folder with a manifest.json`);
    }
    found[role] = path;
  };
  for (const f of files) {
    const path = f.relativePath;
    const base = baseName(path);
    if (base.startsWith('.')) continue;
    if (PAIR_NAME.test(base)) throw badFile(path, PAIR_PROBLEM);
    if (NIFTI_NAME.test(base)) {
      const role = roleFromName(base);
      if (role) assign(role, path);
      else unnamed.push(path);
    } else if (/\.json$/i.test(base)) {
      assign(jsonKind(f), path);
    } else {
      ignored.push(path);
    }
  }
  if (unnamed.length === 1 && found.scan === undefined) {
    found.scan = unnamed[0];
    notes.push(`${unnamed[0]} was taken as the scan`);
  } else if (unnamed.length > 0) {
    throw badFile(unnamed[0], 'cannot tell from its name what this volume is; put scan, segments, liver, caudate, lesions or viable in the file name');
  }
  return { files: found, ignored, notes };
}

/** A volume's role from the words of its name; the more specific roles are tried first. */
export function roleFromName(name: string): VolumeRole | null {
  const words = name.toLowerCase().replace(NIFTI_NAME, '').split(/[^a-z0-9]+/).filter(Boolean);
  const has = (test: (w: string) => boolean) => words.some(test);
  if (has((w) => w.startsWith('caudate'))) return 'caudate';
  if (has((w) => w === 'viable' || w.startsWith('enhanc'))) return 'viable';
  if (has((w) => w.startsWith('lesion') || w.startsWith('tumo') || w.startsWith('metast') || w === 'mets')) return 'lesions';
  if (has((w) => w.startsWith('segment') || w === 'seg' || w === 'segs' || w === 'couinaud')) return 'segments';
  if (has((w) => w.startsWith('liver'))) return 'liver';
  if (has((w) => ['scan', 'ct', 'mr', 'mri', 'image', 'img', 'venous', 'arterial', 'portal', 't1', 't2'].includes(w))) return 'scan';
  return null;
}

function jsonKind(file: OpenedFile): InputKind {
  let json: unknown;
  try {
    json = JSON.parse(textOf(file));
  } catch (e) {
    if (e instanceof SyntaxError) throw badFile(file.relativePath, `is not valid JSON (${e.message})`);
    throw e;
  }
  const keys = typeof json === 'object' && json !== null && !Array.isArray(json) ? Object.keys(json) : [];
  if (keys.includes('points')) return 'landmarks';
  if (keys.includes('marks')) return 'marks';
  if (keys.includes('labels')) return 'scheme';
  if (keys.includes('visits')) throw badFile(file.relativePath, 'looks like a study manifest; name it manifest.json so the folder imports as a patient');
  throw badFile(file.relativePath, 'is not a landmark set, a marks file or a segment scheme (no "points", "marks" or "labels")');
}
