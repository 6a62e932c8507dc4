import { inflateCapacity, type Inflate } from './nifti-read.js';

/**
 * Gzip through the web-standard CompressionStream/DecompressionStream, available in browsers,
 * workers and Node 20, so the renderer's workers need no bundled inflater.
 */

/** Streams accept views of ordinary ArrayBuffers only; a shared buffer is copied. */
function plainBuffer(bytes: Uint8Array): Uint8Array<ArrayBuffer> {
  return bytes.buffer instanceof ArrayBuffer ? (bytes as Uint8Array<ArrayBuffer>) : new Uint8Array(bytes);
}

/** Inflates into one buffer sized up front, stopping (and cancelling the stream) at maxOutputBytes. */
export const webInflate: Inflate = async (gz, maxOutputBytes) => {
  const stream = new DecompressionStream('gzip');
  const writer = stream.writable.getWriter();
  // Errors surface on the reading side; keep these promises from being reported as unhandled.
  writer.write(plainBuffer(gz)).catch(() => undefined);
  writer.close().catch(() => undefined);
  const reader = stream.readable.getReader();
  const cap = inflateCapacity(gz, maxOutputBytes);
  let out = new Uint8Array(cap);
  let n = 0;
  for (;;) {
    const { done, value } = (await reader.read()) as { done: boolean; value?: Uint8Array };
    if (done || !value) break;
    const take = Math.min(value.length, cap - n);
    out.set(take === value.length ? value : value.subarray(0, take), n);
    n += take;
    if (n >= cap) {
      await reader.cancel().catch(() => undefined);
      break;
    }
  }
  if (n < cap) out = out.subarray(0, n);
  return out;
};

/** Gzips bytes (e.g. an encoded NIfTI) for a .nii.gz download or store. */
export async function webGzip(bytes: Uint8Array): Promise<Uint8Array> {
  const stream = new CompressionStream('gzip');
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
  }
  const out = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.length;
  }
  return out;
}
