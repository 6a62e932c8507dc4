import { inflateCapacity, type Inflate } from './nifti-read.js';

/**
 * Gzip through the web-standard CompressionStream/DecompressionStream, available in browsers,
 * workers and Node 20, so the renderer's workers need no bundled inflater.
 */

/** Streams accept views of ordinary ArrayBuffers only; a shared buffer is copied. */
function plainBuffer(bytes: Uint8Array): Uint8Array<ArrayBuffer> {
  return bytes.buffer instanceof ArrayBuffer ? (bytes as Uint8Array<ArrayBuffer>) : new Uint8Array(bytes);
}

/**
 * Inflates into one buffer sized up front, stopping (and cancelling the stream) at maxOutputBytes.
 * The input goes in growing slices while the output is read, so a header read stops after the first
 * slice instead of inflating the whole file (a stream inflates all of a chunk it is handed).
 */
export const webInflate: Inflate = async (gz, maxOutputBytes) => {
  const stream = new DecompressionStream('gzip');
  const writer = stream.writable.getWriter();
  const input = plainBuffer(gz);
  let stopped = false;
  // Errors surface on the reading side; the feeding side only stops.
  void (async () => {
    for (let at = 0, slice = 64 * 1024; at < input.length && !stopped; slice = Math.min(slice * 4, 16 * 1024 * 1024)) {
      const end = Math.min(input.length, at + slice);
      await writer.write(input.subarray(at, end));
      at = end;
    }
    if (!stopped) await writer.close();
  })().catch(() => undefined);
  const reader = stream.readable.getReader();
  const cap = inflateCapacity(gz.length, maxOutputBytes);
  let out = new Uint8Array(cap);
  let n = 0;
  for (;;) {
    const { done, value } = (await reader.read()) as { done: boolean; value?: Uint8Array };
    if (done || !value) break;
    const take = Math.min(value.length, cap - n);
    out.set(take === value.length ? value : value.subarray(0, take), n);
    n += take;
    if (n >= cap) {
      stopped = true;
      await reader.cancel().catch(() => undefined);
      break;
    }
  }
  if (n < cap) out = out.subarray(0, n);
  return out;
};

/** Gzips bytes (e.g. an encoded NIfTI) for a .nii.gz download or store. */
export async function webGzip(bytes: Uint8Array): Promise<Uint8Array> {
  return (await webTransform(new CompressionStream('gzip'), bytes, Infinity)) as Uint8Array;
}

/**
 * Runs bytes whole through a compression or decompression stream and joins its output; null when
 * the output would pass maxOutputBytes (the stream is cancelled there).
 */
export async function webTransform(
  stream: CompressionStream | DecompressionStream, bytes: Uint8Array, maxOutputBytes: number,
): Promise<Uint8Array | null> {
  const writer = stream.writable.getWriter();
  writer.write(plainBuffer(bytes)).catch(() => undefined);
  writer.close().catch(() => undefined);
  const reader = stream.readable.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = (await reader.read()) as { done: boolean; value?: Uint8Array };
    if (done || !value) break;
    chunks.push(value);
    total += value.length;
    if (total > maxOutputBytes) {
      await reader.cancel().catch(() => undefined);
      return null;
    }
  }
  const out = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.length;
  }
  return out;
}
