/**
 * Image codecs for encapsulated pixel data, handed in by the platform as the inflater is: the core
 * names what it needs and checks what comes back; the platform supplies a decoder that runs there
 * (WebAssembly builds of CharLS and OpenJPEG, loaded from disk in Node and as bundled assets in the
 * app's workers; see wasm-codecs.ts).
 */

/** JPEG-LS (ISO/IEC 14495-1, DICOM PS3.5 A.4.3) or JPEG 2000 Part 1 (ISO/IEC 15444-1, PS3.5 A.4.4). */
export type ImageCodec = 'jpeg-ls' | 'jpeg-2000';

export interface DecodedImage {
  width: number;
  height: number;
  components: number;
  /** Sample precision in bits, from the code stream. */
  bitsPerSample: number;
  /** Samples are signed per the code stream (JPEG 2000 Ssiz; JPEG-LS samples are always unsigned). */
  signed: boolean;
  /** Samples, one byte each up to 8 bits, else two little-endian bytes each. */
  samples: Uint8Array;
  /**
   * What the code stream says of exactness: JPEG-LS NEAR = 0 (ISO/IEC 14495-1 A.2.1), JPEG 2000 the
   * reversible 5-3 wavelet (ISO/IEC 15444-1 Table A.20). Never taken from the DICOM header alone.
   */
  lossless: boolean;
  /** In words, for messages: "NEAR=2", "irreversible 9-7 wavelet". */
  coding: string;
}

/** Decodes one frame's code stream; rejects (any error) when the stream is damaged. */
export type DecodeImage = (codec: ImageCodec, encoded: Uint8Array) => Promise<DecodedImage>;
