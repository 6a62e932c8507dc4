import { randomBytes } from 'node:crypto';
import { rename, unlink, writeFile } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';
import { createGunzip, gzipSync, type Gunzip } from 'node:zlib';
import { badFile, isFalciformError } from '../errors.js';
import type { Volume } from '../volume/volume.js';
import { checkBudget, DEFAULT_MAX_BYTES, inflateCapacity, isGzip, readNifti, type Inflate, type LoadedNifti, type NiftiInfo } from '../volume/nifti-read.js';
import { HEADER_BYTES_NEEDED, parseNiftiHeader } from '../volume/nifti-header.js';
import { encodeNifti, type WriteDatatype } from '../volume/nifti-write.js';
import { checkOutputFile, openRegularFile } from './regular-file.js';

/** Compressed bytes are read from disk in pieces of at most this size while they inflate. */
const READ_PIECE = 4 * 1024 ** 2;

/**
 * Gzip data still on disk: the file, and where in it the bytes not yet handed over begin.
 */
interface RestOnDisk { path: string; from: number }

/**
 * node:zlib inflater for readNifti, on libuv's thread pool: the output buffer is sized to the cap, so
 * zlib inflates straight into it piece after piece (no chunks to gather, no copy) and stops when it
 * is full. A gzip bomb therefore never costs more than what the header justified, and several files
 * inflate at once on the pool while the main thread waits. The input is `gz`, then, for a file given
 * in part, the rest of the file read from disk in pieces, so a large compressed file is never held
 * whole; `gzipSize` is then the whole file's size (for the cap).
 */
function inflateInto(gz: Uint8Array, maxOutputBytes: number, rest?: RestOnDisk, gzipSize = gz.length): Promise<Uint8Array> {
  return new Promise((resolve, reject) => {
    const cap = inflateCapacity(gzipSize, maxOutputBytes);
    let out: Uint8Array | undefined;
    let n = 0;
    let settled = false;
    const finish = (err?: Error) => {
      if (settled) return;
      settled = true;
      if (err) reject(err);
      else resolve(out ? out.subarray(0, n) : new Uint8Array(0));
    };
    // zlib's minimum output chunk is 64 bytes. It writes each piece's output just after the last in
    // its own buffer of chunkSize, handing out views of it.
    const z = createGunzip({ chunkSize: Math.max(64, cap) });
    z.on('data', (chunk: Buffer) => {
      if (settled) return;
      const take = Math.min(chunk.length, cap - n);
      if (n === 0 && chunk.byteOffset === 0 && chunk.buffer.byteLength === cap) {
        // The usual case: zlib's own buffer of exactly the cap; keep it and let zlib fill it.
        out = new Uint8Array(chunk.buffer, 0, cap);
      } else if (!(out && chunk.buffer === out.buffer && chunk.byteOffset === n)) {
        // Small (pooled) or multi-member output: gather into a buffer of the cap.
        out ??= new Uint8Array(cap);
        out.set(chunk.subarray(0, take), n);
      }
      n += take;
      if (n >= cap) {
        finish();
        z.destroy();
      }
    });
    z.on('end', () => finish());
    z.on('error', (e) => finish(e));
    if (!rest) {
      z.end(gz);
      return;
    }
    z.write(gz);
    // A header read needs a few hundred bytes; the voxels need big pieces so each costs little.
    const piece = Math.min(READ_PIECE, Math.max(64 * 1024, maxOutputBytes));
    feed(z, rest, piece, () => settled).catch((e: unknown) => finish(e instanceof Error ? e : new Error(String(e))));
  });
}

/**
 * Writes the rest of a file into the inflater piece by piece: the next piece is read while zlib
 * inflates this one, so two pieces' memory is all the reading holds. Stops when the inflater has what it needs.
 */
async function feed(z: Gunzip, rest: RestOnDisk, piece: number, stopped: () => boolean): Promise<void> {
  const fh = await openRegularFile(rest.path);
  // Two buffers in turn: one is read into while zlib inflates the other (its write has called back
  // by the time it is read into again), so no piece is left for the garbage collector.
  const buffers = [Buffer.allocUnsafe(piece), Buffer.allocUnsafe(piece)];
  let turn = 0;
  const read = async (at: number) => {
    const buf = buffers[turn];
    turn ^= 1;
    const { bytesRead } = await fh.read(buf, 0, piece, at);
    return buf.subarray(0, bytesRead);
  };
  let next: Promise<Buffer> | undefined;
  try {
    let at = rest.from;
    next = read(at);
    for (;;) {
      const buf = await next;
      next = undefined;
      if (buf.length === 0 || stopped()) break;
      at += buf.length;
      next = read(at);
      await new Promise<void>((resolve, reject) => z.write(buf, (e) => (e ? reject(e) : resolve())));
    }
    if (!stopped()) z.end();
  } finally {
    await next?.catch(() => undefined);
    await fh.close().catch(() => undefined);
  }
}

/** node:zlib inflater for readNifti of bytes held in memory (see inflateInto). */
export const nodeInflate: Inflate = (gz, maxOutputBytes) => inflateInto(gz, maxOutputBytes);

function cannotRead(path: string, e: unknown) {
  if (isFalciformError(e)) return e;
  const code = (e as { code?: string }).code;
  const why =
    code === 'ENOENT' ? 'no such file' :
    code === 'EACCES' || code === 'EPERM' ? 'permission denied' :
    code === 'EISDIR' ? 'is a folder, not a file' :
    e instanceof Error ? e.message : String(e);
  return badFile(path, `cannot be read: ${why}`);
}

/** Reads at most `limit` bytes from the start of a file (all of it when limit is Infinity). */
async function readPrefix(path: string, limit: number): Promise<Uint8Array> {
  let fh;
  try {
    fh = await openRegularFile(path);
    const { size } = await fh.stat();
    if (!(limit < size)) {
      // View the Buffer's memory rather than copying the whole file.
      const whole = await fh.readFile();
      return new Uint8Array(whole.buffer, whole.byteOffset, whole.byteLength);
    }
    const buf = new Uint8Array(limit);
    let at = 0;
    while (at < limit) {
      const { bytesRead } = await fh.read(buf, at, limit - at, at);
      if (bytesRead === 0) break;
      at += bytesRead;
    }
    return at < limit ? buf.subarray(0, at) : buf;
  } catch (e) {
    throw cannotRead(path, e);
  } finally {
    await fh?.close().catch(() => undefined);
  }
}

/** What readNifti is handed of an image file: its bytes, or for a large gzip file its first bytes and size. */
interface ImageStart { bytes: Uint8Array; gzipSize?: number }

/**
 * Reads what readNifti needs of an image file. An uncompressed single file is read only up to the end
 * of its first volume, after its header passed the budget check, so a 4-D series or a lying header
 * does not pull the whole file into memory. A gzipped file of up to READ_PIECE is read whole; a
 * larger one only its first bytes, the inflater reading the rest from disk as far as needed.
 */
async function readImageFile(path: string, budget: number): Promise<ImageStart> {
  const head = await readPrefix(path, HEADER_BYTES_NEEDED);
  if (isGzip(head)) {
    const size = await fileSize(path);
    return size > READ_PIECE ? { bytes: head, gzipSize: size } : { bytes: await readPrefix(path, Infinity) };
  }
  const { info } = parseNiftiHeader(head, path);
  if (info.pair) return { bytes: head };
  checkBudget(info, path, budget);
  return { bytes: await readPrefix(path, info.voxOffset + info.volumeBytes) };
}

async function fileSize(path: string): Promise<number> {
  let fh;
  try {
    fh = await openRegularFile(path);
    return (await fh.stat()).size;
  } catch (e) {
    throw cannotRead(path, e);
  } finally {
    await fh?.close().catch(() => undefined);
  }
}

/** The inflater for what readImageFile gave: reading on from disk when it gave only the start. */
function inflaterFor(path: string, start: ImageStart): Inflate {
  const { gzipSize } = start;
  if (gzipSize === undefined) return nodeInflate;
  return (gz, max) => inflateInto(gz, max, { path, from: gz.length }, gzipSize);
}

/** The header's facts when they can be read, else undefined (readNifti then reports the problem). */
async function tryHeader(start: ImageStart, path: string) {
  const { bytes } = start;
  try {
    const head = isGzip(bytes) ? await inflaterFor(path, start)(bytes, HEADER_BYTES_NEEDED) : bytes;
    return parseNiftiHeader(head, path).info;
  } catch {
    return undefined;
  }
}

function pairImageNames(headerPath: string): string[] {
  const stem = headerPath.replace(/\.hdr(\.gz)?$/i, '');
  return stem === headerPath ? [`${headerPath}.img`, `${headerPath}.img.gz`] : [`${stem}.img`, `${stem}.img.gz`, `${stem}.IMG`];
}

/** Loads the first 3-D volume of a .nii, .nii.gz or .hdr/.img pair (given either file of the pair). */
export async function loadVolume(path: string, opts: { maxBytes?: number; onHeader?: (info: NiftiInfo) => void } = {}): Promise<LoadedNifti> {
  const budget = opts.maxBytes ?? DEFAULT_MAX_BYTES;
  const givenImage = /\.img(\.gz)?$/i.test(path);
  const headerPath = givenImage ? path.replace(/\.img(\.gz)?$/i, '.hdr') : path;
  let start = await readImageFile(headerPath, budget);
  const info = await tryHeader(start, headerPath);
  // A pair's header is a few hundred bytes; it is read whole.
  if (info?.pair && start.gzipSize !== undefined) start = { bytes: await readPrefix(headerPath, Infinity) };
  let imageBytes: Uint8Array | undefined;
  let imageFile: string | undefined;
  if (info?.pair) {
    checkBudget(info, headerPath, budget);
    const end = info.voxOffset + info.volumeBytes;
    for (const name of givenImage ? [path] : pairImageNames(headerPath)) {
      let found: Uint8Array;
      try {
        found = await readPrefix(name, end);
      } catch {
        continue;
      }
      imageBytes = isGzip(found) && found.length === end ? await readPrefix(name, Infinity) : found;
      imageFile = name;
      break;
    }
    if (!imageBytes) throw badFile(pairImageNames(headerPath)[0], 'cannot be read: the .img data file of this .hdr/.img pair is missing');
  }
  return readNifti(start.bytes, headerPath, {
    inflate: inflaterFor(headerPath, start), gzipSize: start.gzipSize, maxBytes: budget, imageBytes, imageFile, onHeader: opts.onHeader,
  });
}

/**
 * Writes a volume as NIfTI-1, gzipped unless the name ends in ".nii". Written to a temporary file in
 * the same folder and renamed, so a failure never leaves a half-written image under the final name.
 */
export async function saveVolume(path: string, volume: Volume, datatype: WriteDatatype): Promise<void> {
  const raw = encodeNifti(volume, datatype);
  await writeFileAtomic(path, /\.nii$/i.test(path) ? raw : gzipSync(raw));
}

/** Writes beside the final name and renames, so a failure never leaves a half-written file. */
export async function writeFileAtomic(path: string, bytes: Uint8Array): Promise<void> {
  await checkOutputFile(path, []);
  const tmp = join(dirname(path), `.${basename(path)}.${randomBytes(6).toString('hex')}.tmp`);
  try {
    await writeFile(tmp, bytes);
    await rename(tmp, path);
  } catch (e) {
    await unlink(tmp).catch(() => undefined);
    const why = e instanceof Error ? e.message : String(e);
    throw badFile(path, `cannot be written: ${why}`);
  }
}

/** Reads a UTF-8 text file (JSON manifests, landmark sets, marks). */
export async function readTextFile(path: string): Promise<string> {
  try {
    const fh = await openRegularFile(path);
    try {
      return await fh.readFile('utf8');
    } finally {
      await fh.close().catch(() => undefined);
    }
  } catch (e) {
    throw cannotRead(path, e);
  }
}
