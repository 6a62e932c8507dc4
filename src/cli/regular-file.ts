import { constants, type Stats } from 'node:fs';
import { open, stat, type FileHandle } from 'node:fs/promises';
import { resolve } from 'node:path';
import { badFile } from '../errors.js';

/**
 * Only regular files are read or replaced. A device (/dev/zero, /dev/urandom) reports a size of 0
 * and never ends; opening a FIFO waits for a writer for ever. Opening without blocking and checking
 * the opened file itself (not the name, which a link or a swap could redirect) refuses both at once.
 */
export async function openRegularFile(path: string): Promise<FileHandle> {
  const fh = await open(path, constants.O_RDONLY | constants.O_NONBLOCK);
  try {
    const s = await fh.stat();
    if (!s.isFile()) throw notRegular(path, s);
    return fh;
  } catch (e) {
    await fh.close().catch(() => undefined);
    throw e;
  }
}

function notRegular(path: string, s: Stats) {
  const what = s.isDirectory() ? 'a folder' : s.isFIFO() ? 'a pipe' : s.isCharacterDevice() || s.isBlockDevice() ? 'a device' : s.isSocket() ? 'a socket' : 'not a regular file';
  return badFile(path, `is ${what}, not a regular file; give a file saved on disk`);
}

/**
 * Refuses an output name that is not a regular file where something exists under it, or that is one
 * of the inputs (the same file once links are followed), before any output is written.
 */
export async function checkOutputFile(path: string, inputs: readonly (string | undefined)[]): Promise<void> {
  const out = await stat(path).catch(() => null);
  if (out === null) return;
  if (!out.isFile()) throw badFile(path, `cannot be written: it is ${out.isDirectory() ? 'a folder' : 'not a regular file'}; name a new file or an existing regular file`);
  for (const input of inputs) {
    if (input === undefined) continue;
    const s = await stat(input).catch(() => null);
    if (s && s.dev === out.dev && s.ino === out.ino) throw badFile(path, `is also an input (${input}); write the output to another file`);
  }
}

/** Refuses an output folder that exists and is not a folder on disk (a device, /proc, a file). */
export async function checkOutputFolder(path: string): Promise<void> {
  // Kernel folders take no files, or hang a writer; say so rather than trying.
  if (/^\/(proc|sys|dev)(\/|$)/.test(resolve(path))) throw badFile(path, 'cannot be used as the output folder: it is a system folder, not storage');
  const s = await stat(path).catch(() => null);
  if (s !== null && !s.isDirectory()) throw badFile(path, 'cannot be used as the output folder: it is not a folder');
}
