import { lstat, readdir, readFile, rename, writeFile } from 'node:fs/promises';
import { basename, join, relative } from 'node:path';
import type { OpenedFile } from './bridge-api.js';

/**
 * Reads the files the user chose (or every file under a chosen folder, without following links
 * and skipping hidden entries), refusing once the total passes maxBytes so a wrong folder choice
 * cannot exhaust memory.
 */
export async function readChosenFiles(paths: string[], folder: boolean, maxBytes: number): Promise<OpenedFile[]> {
  const files: { path: string; relativePath: string }[] = [];
  if (folder) {
    for (const root of paths) await walk(root, root, files);
  } else {
    for (const p of paths) files.push({ path: p, relativePath: basename(p) });
  }
  let total = 0;
  for (const f of files) {
    total += (await lstat(f.path)).size;
    if (total > maxBytes) throw new Error(`the chosen files exceed ${Math.round(maxBytes / 1024 ** 2)} MiB`);
  }
  return Promise.all(files.map(async (f) => ({ relativePath: f.relativePath, bytes: new Uint8Array(await readFile(f.path)) })));
}

async function walk(root: string, dir: string, out: { path: string; relativePath: string }[]): Promise<void> {
  for (const entry of await readdir(dir, { withFileTypes: true })) {
    if (entry.name.startsWith('.')) continue;
    const full = join(dir, entry.name);
    if (entry.isDirectory()) await walk(root, full, out);
    else if (entry.isFile()) out.push({ path: full, relativePath: relative(root, full).split('\\').join('/') });
  }
}

/** Writes next to the target first, then renames, so an interrupted save never leaves half a file. */
export async function writeFileAtomic(path: string, bytes: Uint8Array): Promise<void> {
  const temp = `${path}.${process.pid}.partial`;
  await writeFile(temp, bytes);
  await rename(temp, path);
}
