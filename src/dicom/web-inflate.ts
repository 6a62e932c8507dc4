import { webTransform } from '../volume/web-gzip.js';
import type { InflateRaw } from './parse.js';

/**
 * Raw inflate through the web-standard DecompressionStream ("deflate-raw"), available in browsers,
 * workers and Node 20, for Deflated Explicit VR Little Endian files (PS3.5 A.5).
 */
export const webInflateRaw: InflateRaw = async (deflated, maxOutputBytes) => {
  const out = await webTransform(new DecompressionStream('deflate-raw'), deflated, maxOutputBytes);
  if (out === null) throw new Error(`inflates to more than ${maxOutputBytes} bytes`);
  return out;
};
