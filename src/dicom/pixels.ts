import { badFile } from '../errors.js';
import { PLATFORM_LITTLE_ENDIAN, swapBytesInPlace, viewVoxels } from '../volume/nifti-datatype.js';
import type { Datatype, VoxelArray } from '../volume/volume.js';
import type { DicomFileInfo, PixelFormat } from './parse.js';
import { dicomParser, type DataSet } from './parser-lib.js';
import type { DecodedImage, DecodeImage } from './codecs.js';
import { decodeRleFrame } from './rle.js';
import { EXPLICIT_BIG_ENDIAN, transferSyntax } from './transfer-syntax.js';

/** The stored-value type of single-sample pixels (BitsAllocated and PixelRepresentation, PS3.3 C.7.6.3). */
export function storedDatatype(p: PixelFormat): Datatype | undefined {
  const table: Record<number, [Datatype, Datatype]> = { 8: ['uint8', 'int8'], 16: ['uint16', 'int16'], 32: ['uint32', 'int32'] };
  return table[p.bitsAllocated]?.[p.signed ? 1 : 0];
}

/** Why a file's pixels cannot become a Falciform volume, or undefined when they can. */
export function pixelProblem(info: DicomFileInfo): string | undefined {
  const p = info.pixel;
  if (!p) return 'holds no pixel data';
  const syntax = transferSyntax(info.syntaxUid);
  if (syntax.encoding === 'refused') return `is stored in ${syntax.name}, which Falciform does not decode`;
  if (p.samplesPerPixel !== 1) return `is a colour image (${p.photometric}, ${p.samplesPerPixel} samples per pixel), not a grey-scale scan`;
  if (!storedDatatype(p)) return `has ${p.bitsAllocated} bits allocated per pixel; 8, 16 or 32 are read`;
  if (p.rows <= 0 || p.columns <= 0) return 'gives no image size (Rows, Columns)';
  return undefined;
}

/** Where a frame's decoded values go, and the image decoder for encapsulated JPEG-LS and JPEG 2000. */
export interface FrameOptions {
  decodeImage: DecodeImage;
  /** The frame's bytes inside a volume; a fresh buffer when absent. */
  into?: Uint8Array;
}

/**
 * The stored values of one frame, in DICOM order (columns fastest, which is NIfTI's i), as a typed
 * array of the stored type: written into `opts.into` when given, else into a fresh buffer. Pixel data
 * is copied out of the file so the file's bytes can be released; big-endian data is swapped to the
 * platform's order.
 */
export async function decodeFrame(parsed: { info: DicomFileInfo; dataSet: DataSet }, frame: number, opts: FrameOptions): Promise<VoxelArray> {
  const { info, dataSet } = parsed;
  const problem = pixelProblem(info);
  if (problem) throw badFile(info.file, problem);
  const p = info.pixel as PixelFormat;
  const datatype = storedDatatype(p) as Datatype;
  const bytesPerSample = (p.bitsAllocated / 8) as 1 | 2 | 4;
  const pixels = p.rows * p.columns;
  const frameBytes = pixels * bytesPerSample;
  const element = dataSet.elements.x7fe00010;
  const bytes = dataSet.byteArray as Uint8Array;
  const { into } = opts;
  if (into && into.length !== frameBytes) throw badFile(info.file, `holds ${frameBytes} bytes per frame where ${into.length} were expected`);
  const out = into ?? new Uint8Array(frameBytes);
  const syntax = transferSyntax(info.syntaxUid);
  if (syntax.encoding === 'rle') {
    decodeRleFrame(encodedFrame(parsed, frame, syntax.name), out, pixels, bytesPerSample, info.file);
    if (!PLATFORM_LITTLE_ENDIAN) swapBytesInPlace(out, bytesPerSample);
  } else if (syntax.encoding === 'jpeg-ls' || syntax.encoding === 'jpeg-2000') {
    const encoded = encodedFrame(parsed, frame, syntax.name);
    let image: DecodedImage;
    try {
      image = await opts.decodeImage(syntax.encoding, encoded);
    } catch (e) {
      throw badFile(info.file, `has ${syntax.name} frame ${frame + 1} that cannot be decoded (${e instanceof Error ? e.message : String(e)})`);
    }
    putDecoded(image, info, frame, syntax.name, viewVoxels(datatype, out.buffer, out.byteOffset, pixels));
  } else {
    const start = element.dataOffset + frame * frameBytes;
    const available = Math.min(element.dataOffset + element.length, bytes.length) - start;
    if (available < frameBytes) {
      const have = Math.max(0, Math.min(element.length, bytes.length - element.dataOffset));
      const need = info.numberOfFrames * frameBytes;
      throw badFile(info.file, `is cut short: its pixel data holds ${have} bytes where ${p.rows}×${p.columns}×${info.numberOfFrames} pixels need ${need}`);
    }
    out.set(bytes.subarray(start, start + frameBytes));
    const bigEndian = info.syntaxUid === EXPLICIT_BIG_ENDIAN;
    if (bigEndian === PLATFORM_LITTLE_ENDIAN) swapBytesInPlace(out, bytesPerSample);
  }
  return viewVoxels(datatype, out.buffer, out.byteOffset, pixels);
}

/**
 * One frame's encoded bytes from encapsulated pixel data (PS3.5 A.4): through the Basic Offset Table
 * when there is one; else all fragments for a single frame, one fragment per frame when the counts
 * match, or frame ends found by the code streams' closing FFD9 marker (JPEG-LS EOI, JPEG 2000 EOC).
 */
function encodedFrame(parsed: { info: DicomFileInfo; dataSet: DataSet }, frame: number, syntaxName: string): Uint8Array {
  const { info, dataSet } = parsed;
  const element = dataSet.elements.x7fe00010;
  if (!element.encapsulatedPixelData) throw badFile(info.file, `says ${syntaxName} but its pixel data is not encapsulated`);
  const fragments = element.fragments ?? [];
  try {
    if ((element.basicOffsetTable ?? []).length > 0) return dicomParser.readEncapsulatedImageFrame(dataSet, element, frame) as Uint8Array;
    if (info.numberOfFrames === 1) return dicomParser.readEncapsulatedPixelDataFromFragments(dataSet, element, 0, fragments.length) as Uint8Array;
    if (fragments.length === info.numberOfFrames) return dicomParser.readEncapsulatedPixelDataFromFragments(dataSet, element, frame, 1) as Uint8Array;
    if (transferSyntax(info.syntaxUid).encoding === 'rle') throw new Error(`${fragments.length} fragments for ${info.numberOfFrames} frames, where RLE keeps one fragment per frame`);
    return dicomParser.readEncapsulatedImageFrame(dataSet, element, frame, dicomParser.createJPEGBasicOffsetTable(dataSet, element)) as Uint8Array;
  } catch (e) {
    throw badFile(info.file, `has ${syntaxName} frame ${frame + 1} that cannot be found (${e instanceof Error ? e.message : String(e)})`);
  }
}

/**
 * A decoded code stream's samples written as the frame's stored values, after checking that the code
 * stream is exact and matches the header. The header's Pixel Representation rules (PS3.5 8.2: the
 * stored bits are read as DICOM declares them); a signed image whose code stream holds its bits as
 * unsigned, as JPEG-LS always does, is sign-extended from BitsStored.
 */
function putDecoded(image: DecodedImage, info: DicomFileInfo, frame: number, syntaxName: string, dst: VoxelArray): void {
  const p = info.pixel as PixelFormat;
  const where = info.numberOfFrames > 1 ? `frame ${frame + 1}` : 'its image';
  if (!image.lossless) {
    throw badFile(info.file, `says ${syntaxName} but ${where} is coded lossy (${image.coding}); a lossy image is not taken as exact`);
  }
  if (image.width !== p.columns || image.height !== p.rows) {
    throw badFile(info.file, `has ${where} of ${image.width}×${image.height} pixels where its header says ${p.columns}×${p.rows}`);
  }
  if (image.components !== 1) throw badFile(info.file, `has ${where} with ${image.components} colour components, not a grey-scale scan`);
  if (image.bitsPerSample > p.bitsAllocated) {
    throw badFile(info.file, `has ${where} of ${image.bitsPerSample}-bit samples where ${p.bitsAllocated} bits are allocated`);
  }
  const wide = image.bitsPerSample > 8;
  const n = dst.length;
  if (image.samples.length < n * (wide ? 2 : 1)) throw badFile(info.file, `has ${where} that decodes to fewer samples than its ${p.columns}×${p.rows} pixels`);
  let raw = image.samples;
  if (wide && (raw.byteOffset % 2 !== 0 || !PLATFORM_LITTLE_ENDIAN)) {
    raw = raw.slice(0, 2 * n);
    if (!PLATFORM_LITTLE_ENDIAN) swapBytesInPlace(raw, 2);
  }
  const src = wide
    ? (image.signed ? new Int16Array(raw.buffer, raw.byteOffset, n) : new Uint16Array(raw.buffer, raw.byteOffset, n))
    : (image.signed ? new Int8Array(raw.buffer, raw.byteOffset, n) : raw.subarray(0, n));
  const extendFrom = p.signed && !image.signed && p.bitsStored < p.bitsAllocated ? p.bitsStored : 0;
  if (extendFrom > 0) {
    const sign = 2 ** (extendFrom - 1);
    const mask = 2 ** extendFrom - 1;
    for (let k = 0; k < n; k++) {
      const v = src[k] & mask;
      dst[k] = v >= sign ? v - 2 * sign : v;
    }
  } else {
    // Typed-array assignment keeps the low bits: unsigned code-stream values land as the header's type.
    dst.set(src);
  }
}
