import type { InflateRaw } from './parse.js';

/**
 * Raw inflate through the web-standard DecompressionStream ("deflate-raw"), available in browsers,
 * workers and Node 20, for Deflated Explicit VR Little Endian files (PS3.5 A.5).
 */
export const webInflateRaw: InflateRaw = async (deflated, maxOutputBytes) => {
  const stream = new DecompressionStream('deflate-raw');
  const writer = stream.writable.getWriter();
  const input = deflated.buffer instanceof ArrayBuffer ? (deflated as Uint8Array<ArrayBuffer>) : new Uint8Array(deflated);
  writer.write(input).catch(() => undefined);
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
      throw new Error(`inflates to more than ${maxOutputBytes} bytes`);
    }
  }
  const out = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.length;
  }
  return out;
};
