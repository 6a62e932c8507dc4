import { constants } from 'node:fs';
import { open, readdir, rename, writeFile, type FileHandle } from 'node:fs/promises';
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
  // One file at a time, each checked and read through the same open handle: the size is the opened
  // file's own (a link's target, not the link), and a device or pipe is refused before any read.
  let total = 0;
  const opened: OpenedFile[] = [];
  for (const f of files) {
    const fh = await openRegular(f.path);
    try {
      total += (await fh.stat()).size;
      if (total > maxBytes) throw new Error(`the chosen files exceed ${Math.round(maxBytes / 1024 ** 2)} MiB`);
      const bytes = await fh.readFile();
      opened.push({ relativePath: f.relativePath, bytes: new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength) });
    } finally {
      await fh.close().catch(() => undefined);
    }
  }
  return opened;
}

/**
 * Opens without blocking (a FIFO would otherwise wait for a writer for ever) and refuses anything the
 * opened handle shows is not a regular file: a device never ends, a pipe may never start. The main
 * process is packaged on its own, so it keeps this check rather than importing the command line's.
 */
async function openRegular(path: string): Promise<FileHandle> {
  const fh = await open(path, constants.O_RDONLY | constants.O_NONBLOCK);
  if ((await fh.stat()).isFile()) return fh;
  await fh.close().catch(() => undefined);
  throw new Error(`${basename(path)} is not a regular file (a device, pipe or folder); choose a file saved on disk`);
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
