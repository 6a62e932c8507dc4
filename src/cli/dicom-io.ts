import { open, readdir, stat } from 'node:fs/promises';
import { createRequire } from 'node:module';
import { join, relative } from 'node:path';
import { inflateRawSync } from 'node:zlib';
import { badFile } from '../errors.js';
import type { InflateRaw } from '../dicom/parse.js';
import { readDicom, type DicomSource, type LoadedDicom } from '../dicom/read.js';
import { QUIET_MODULE, wasmDecodeImage, type CharlsModule, type OpenJpegModule } from '../dicom/wasm-codecs.js';

/** node:zlib raw inflate for Deflated Explicit VR Little Endian, capped like the NIfTI inflater. */
export const nodeInflateRaw: InflateRaw = async (deflated, maxOutputBytes) => {
  const out = inflateRawSync(deflated, { maxOutputLength: Math.min(maxOutputBytes, 2 ** 31 - 1) });
  return new Uint8Array(out.buffer, out.byteOffset, out.byteLength);
};

type ModuleFactory<M> = (options: object) => Promise<M>;
const require = createRequire(import.meta.url);

/**
 * JPEG-LS and JPEG 2000 through the WebAssembly codecs, each module found beside its script in
 * node_modules (the decode-only builds).
 */
export const nodeDecodeImage = wasmDecodeImage({
  charls: () => (require('@cornerstonejs/codec-charls/decodewasmjs') as ModuleFactory<CharlsModule>)(QUIET_MODULE),
  openjpeg: () => (require('@cornerstonejs/codec-openjpeg/decodewasmjs') as ModuleFactory<OpenJpegModule>)(QUIET_MODULE),
});

async function isFolder(path: string): Promise<boolean> {
  try {
    return (await stat(path)).isDirectory();
  } catch {
    return false;
  }
}

/** True when PATH is a folder, or a file with the DICOM Part 10 marker ("DICM" at byte 128). */
export async function isDicomPath(path: string): Promise<boolean> {
  if (await isFolder(path)) return true;
  // A device or a pipe is never opened here (it could block for ever); the reader refuses it by name.
  if (!(await stat(path).then((s) => s.isFile(), () => false))) return false;
  let fh;
  try {
    fh = await open(path, 'r');
    const head = new Uint8Array(132);
    const { bytesRead } = await fh.read(head, 0, 132, 0);
    return bytesRead === 132 && head[128] === 0x44 && head[129] === 0x49 && head[130] === 0x43 && head[131] === 0x4d;
  } catch {
    return false;
  } finally {
    await fh?.close().catch(() => undefined);
  }
}

/** Every regular file under a folder, in a stable order (names mean nothing to the reader). */
async function filesUnder(root: string): Promise<string[]> {
  const out: string[] = [];
  const walk = async (dir: string) => {
    let entries;
    try {
      entries = await readdir(dir, { withFileTypes: true });
    } catch (e) {
      throw badFile(dir, `cannot be read: ${e instanceof Error ? e.message : String(e)}`);
    }
    entries.sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
    for (const e of entries) {
      if (e.name.startsWith('.')) continue;
      const p = join(dir, e.name);
      if (e.isDirectory()) await walk(p);
      else if (e.isFile()) out.push(p);
    }
  };
  await walk(root);
  return out;
}

/**
 * Files read into one scratch buffer, grown as needed and reused for the next file: the reader keeps
 * only plain facts from the header pass and copies pixels into the volume before it asks for the next
 * file, so a 300-file series costs one file's worth of read buffers instead of 300 for the collector.
 */
function diskSources(paths: string[], shown: (p: string) => string): DicomSource[] {
  let scratch = new Uint8Array(0);
  return paths.map((path) => ({
    name: shown(path),
    async bytes() {
      let fh;
      try {
        fh = await open(path, 'r');
        const { size } = await fh.stat();
        if (scratch.length < size) scratch = new Uint8Array(Math.max(size, scratch.length * 2));
        let at = 0;
        while (at < size) {
          const { bytesRead } = await fh.read(scratch, at, size - at, at);
          if (bytesRead === 0) break;
          at += bytesRead;
        }
        return scratch.subarray(0, at);
      } catch (e) {
        throw badFile(shown(path), `cannot be read: ${e instanceof Error ? e.message : String(e)}`);
      } finally {
        await fh?.close().catch(() => undefined);
      }
    },
  }));
}

/** Reads a DICOM file, or every DICOM file under a folder, into the chosen series' volume. */
export async function loadDicom(path: string, opts: { series?: string; maxBytes?: number } = {}): Promise<LoadedDicom> {
  const folder = await isFolder(path);
  const paths = folder ? await filesUnder(path) : [path];
  if (folder && paths.length === 0) throw badFile(path, 'is an empty folder');
  const sources = diskSources(paths, (p) => (folder ? join(path, relative(path, p)) : p));
  return readDicom(sources, path, { inflateRaw: nodeInflateRaw, decodeImage: nodeDecodeImage, maxBytes: opts.maxBytes, series: opts.series });
}
