import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { readdir, readFile } from 'node:fs/promises';
import { join, relative, resolve, sep } from 'node:path';
import { manifestInputFiles } from '../cohort/inputs.js';
import { badFile, isFalciformError } from '../errors.js';
import { parseManifest, resolveManifestPath, type Manifest } from '../manifest/manifest.js';
import { VERSION } from '../version.js';

/** The file name a patient's study manifest has in a cohort folder. */
export const MANIFEST_NAME = 'manifest.json';

/**
 * Every manifest.json under root (not following links, skipping dot folders and `skip`, the batch's
 * own output folder), as paths relative to root with "/" separators, sorted.
 */
export async function findManifests(root: string, skip: string): Promise<string[]> {
  const found: string[] = [];
  const skipAbs = resolve(skip);
  const walk = async (dir: string) => {
    let entries;
    try {
      entries = await readdir(dir, { withFileTypes: true });
    } catch (e) {
      throw badFile(dir, `cannot be read: ${e instanceof Error ? e.message : String(e)}`);
    }
    for (const d of entries) {
      if (d.name.startsWith('.')) continue;
      const path = join(dir, d.name);
      if (d.isDirectory() && resolve(path) !== skipAbs) await walk(path);
      else if (d.isFile() && d.name === MANIFEST_NAME) found.push(relative(root, path).split(sep).join('/'));
    }
  };
  await walk(root);
  return found.sort();
}

async function fileSha256(path: string): Promise<string> {
  const hash = createHash('sha256');
  try {
    for await (const chunk of createReadStream(path)) hash.update(chunk as Buffer);
    return hash.digest('hex');
  } catch {
    return 'unreadable';
  }
}

export interface PatientInputs {
  /** Hash of the software version, the manifest's bytes and each named file's path and bytes. */
  sha256: string;
  manifest: Manifest | null;
  /** Why the manifest could not be used, when it could not. */
  problem: string | null;
}

/**
 * Hashes what a patient's result depends on, so a rerun can tell a finished patient whose inputs
 * are unchanged (skipped) from one whose manifest or files changed (computed again). The version is
 * part of it: a newer Falciform recomputes everything.
 */
export async function patientInputs(manifestPath: string): Promise<PatientInputs> {
  const hash = createHash('sha256').update(`Falciform ${VERSION}\0`);
  let bytes: Buffer;
  try {
    bytes = await readFile(manifestPath);
  } catch (e) {
    return { sha256: hash.update('unreadable').digest('hex'), manifest: null, problem: `${manifestPath}: cannot be read: ${e instanceof Error ? e.message : String(e)}` };
  }
  hash.update(bytes);
  let manifest: Manifest;
  try {
    manifest = parseManifest(bytes.toString('utf8'), manifestPath);
  } catch (e) {
    if (!isFalciformError(e)) throw e;
    return { sha256: hash.digest('hex'), manifest: null, problem: e.message };
  }
  for (const rel of manifestInputFiles(manifest)) {
    hash.update(`\0${rel}\0${await fileSha256(resolveManifestPath(manifestPath, rel))}`);
  }
  return { sha256: hash.digest('hex'), manifest, problem: null };
}
