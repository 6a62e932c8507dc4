import { badFile } from '../errors.js';

/**
 * Decodes one RLE Lossless frame (DICOM PS3.5 Annex G) of single-sample pixels into `out`, as
 * little-endian bytes of `bytesPerSample` each. The frame starts with a 64-byte header (segment count,
 * then 15 segment offsets); segment s holds byte plane s of every pixel, most significant plane first
 * (G.2), each PackBits-coded (G.3.1): a header byte n in 0..127 copies the next n+1 bytes, -127..-1
 * repeats the next byte 1-n times, -128 does nothing.
 */
export function decodeRleFrame(frame: Uint8Array, out: Uint8Array, pixels: number, bytesPerSample: number, file: string): void {
  if (frame.length < 64) throw badFile(file, 'has an RLE frame shorter than its 64-byte header');
  const view = new DataView(frame.buffer, frame.byteOffset, frame.byteLength);
  const segments = view.getUint32(0, true);
  if (segments !== bytesPerSample) {
    throw badFile(file, `has ${segments} RLE segments per frame where ${bytesPerSample} are needed for its pixel size`);
  }
  for (let s = 0; s < segments; s++) {
    const start = view.getUint32(4 + 4 * s, true);
    const end = s + 1 < segments ? view.getUint32(8 + 4 * s, true) : frame.length;
    if (start < 64 || end > frame.length || end < start) throw badFile(file, `has an RLE segment offset outside its frame`);
    // Plane s is the (bytesPerSample - 1 - s)-th byte of a little-endian sample.
    const plane = bytesPerSample - 1 - s;
    let o = 0;
    let p = start;
    while (p < end && o < pixels) {
      const n = frame[p++];
      if (n < 128) {
        const count = Math.min(n + 1, pixels - o, end - p);
        for (let c = 0; c < count; c++) out[(o + c) * bytesPerSample + plane] = frame[p + c];
        p += n + 1;
        o += count;
      } else if (n > 128) {
        const count = Math.min(257 - n, pixels - o);
        const b = frame[p++];
        for (let c = 0; c < count; c++) out[(o + c) * bytesPerSample + plane] = b;
        o += count;
      }
    }
    if (o < pixels) throw badFile(file, `has an RLE segment that ends after ${o} of ${pixels} pixels`);
  }
}
