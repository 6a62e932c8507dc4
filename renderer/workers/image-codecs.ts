import charlsWasm from '@cornerstonejs/codec-charls/decodewasm?url';
import openjpegWasm from '@cornerstonejs/codec-openjpeg/decodewasm?url';
import { QUIET_MODULE, wasmDecodeImage, type CharlsModule, type OpenJpegModule } from '../../src/dicom/wasm-codecs.js';

/**
 * JPEG-LS and JPEG 2000 decoding in the app's workers: the codecs' WebAssembly files are bundled as
 * assets of the app (served from its own origin, compiled under the CSP's 'wasm-unsafe-eval'), and
 * each module's script is fetched only when a file first needs it.
 */
type Factory<M> = { default: (options: object) => Promise<M> };

export const webDecodeImage = wasmDecodeImage({
  charls: async () => ((await import('@cornerstonejs/codec-charls/decodewasmjs')) as Factory<CharlsModule>).default({ ...QUIET_MODULE, locateFile: () => charlsWasm }),
  openjpeg: async () => ((await import('@cornerstonejs/codec-openjpeg/decodewasmjs')) as Factory<OpenJpegModule>).default({ ...QUIET_MODULE, locateFile: () => openjpegWasm }),
});
