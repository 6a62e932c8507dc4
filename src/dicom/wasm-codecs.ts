import type { DecodedImage, DecodeImage, ImageCodec } from './codecs.js';

/**
 * The DecodeImage of @cornerstonejs/codec-charls (CharLS) and @cornerstonejs/codec-openjpeg
 * (OpenJPEG), both Emscripten WebAssembly builds. How a module is instantiated differs by platform
 * (a file beside the script in Node, a bundled asset URL in the app), so the platform hands in the
 * module loaders; everything after instantiation is here, once. Each module is loaded on first use.
 */

interface FrameInfo {
  width: number;
  height: number;
  bitsPerSample: number;
  componentCount: number;
  isSigned?: boolean;
}

interface WasmDecoder {
  getEncodedBuffer(length: number): Uint8Array;
  decode(): void;
  getFrameInfo(): FrameInfo;
  getDecodedBuffer(): Uint8Array;
  delete(): void;
}

export interface CharlsModule {
  JpegLSDecoder: new () => WasmDecoder & { getNearLossless(): number };
}

export interface OpenJpegModule {
  J2KDecoder: new () => WasmDecoder & { getIsReversible(): boolean };
}

export interface CodecLoaders {
  charls: () => Promise<CharlsModule>;
  openjpeg: () => Promise<OpenJpegModule>;
}

/** Emscripten module options that keep the codecs' own log lines (OpenJPEG's "[INFO] …") quiet. */
export const QUIET_MODULE = { print: () => undefined, printErr: () => undefined };

/**
 * A module loaded on first use and kept; dropped after a failed load or decode, because an Emscripten
 * module that aborted on a damaged stream stays unusable, so the next frame gets a fresh instance.
 */
function cached<T>(load: () => Promise<T>): { get: () => Promise<T>; drop: () => void } {
  let p: Promise<T> | undefined;
  const drop = () => { p = undefined; };
  return {
    get: () => {
      p ??= load().catch((e: unknown) => {
        drop();
        throw e;
      });
      return p;
    },
    drop,
  };
}

/** Emscripten throws C++ exceptions as bare numbers or pointers; give them words. */
function reason(e: unknown): Error {
  if (e instanceof Error) return e;
  return new Error(typeof e === 'string' ? e : 'the decoder stopped on a damaged code stream');
}

function run<D extends WasmDecoder>(decoder: D, encoded: Uint8Array, describe: (d: D) => { lossless: boolean; coding: string }): DecodedImage {
  try {
    decoder.getEncodedBuffer(encoded.length).set(encoded);
    decoder.decode();
    const info = decoder.getFrameInfo();
    // Copied out of the module's memory before the decoder frees it.
    const samples = decoder.getDecodedBuffer().slice();
    return {
      width: info.width,
      height: info.height,
      components: info.componentCount,
      bitsPerSample: info.bitsPerSample,
      signed: info.isSigned === true,
      samples: new Uint8Array(samples.buffer, samples.byteOffset, samples.byteLength),
      ...describe(decoder),
    };
  } catch (e) {
    throw reason(e);
  } finally {
    decoder.delete();
  }
}

export function wasmDecodeImage(loaders: CodecLoaders): DecodeImage {
  const charls = cached(loaders.charls);
  const openjpeg = cached(loaders.openjpeg);
  const jpegLs = async (encoded: Uint8Array) => {
    const m = await charls.get();
    return run(new m.JpegLSDecoder(), encoded, (d) => {
      const near = d.getNearLossless();
      return { lossless: near === 0, coding: `NEAR=${near}` };
    });
  };
  const jpeg2000 = async (encoded: Uint8Array) => {
    const m = await openjpeg.get();
    return run(new m.J2KDecoder(), encoded, (d) => {
      const reversible = d.getIsReversible();
      return { lossless: reversible, coding: reversible ? 'reversible 5-3 wavelet' : 'irreversible 9-7 wavelet' };
    });
  };
  return async (codec: ImageCodec, encoded: Uint8Array): Promise<DecodedImage> => {
    const [decode, module] = codec === 'jpeg-ls' ? [jpegLs, charls] : [jpeg2000, openjpeg];
    try {
      return await decode(encoded);
    } catch (e) {
      module.drop();
      throw e;
    }
  };
}
