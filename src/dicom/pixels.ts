import { badFile } from '../errors.js';
import { PLATFORM_LITTLE_ENDIAN, swapBytesInPlace, viewVoxels } from '../volume/nifti-datatype.js';
import type { Datatype, VoxelArray } from '../volume/volume.js';
import type { DicomFileInfo, PixelFormat } from './parse.js';
import { dicomParser, type DataSet } from './parser-lib.js';
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

/**
 * The stored values of one frame, in DICOM order (columns fastest, which is NIfTI's i), as a typed
 * array of the stored type: written into `into` (the frame's bytes inside a volume) when given, else
 * into a fresh buffer. Pixel data is copied out of the file so the file's bytes can be released;
 * big-endian data is swapped to the platform's order.
 */
export function decodeFrame(parsed: { info: DicomFileInfo; dataSet: DataSet }, frame: number, into?: Uint8Array): VoxelArray {
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
  if (into && into.length !== frameBytes) throw badFile(info.file, `holds ${frameBytes} bytes per frame where ${into.length} were expected`);
  const out = into ?? new Uint8Array(frameBytes);
  if (transferSyntax(info.syntaxUid).encoding === 'rle') {
    if (!element.encapsulatedPixelData) throw badFile(info.file, 'says RLE Lossless but its pixel data is not encapsulated');
    let encoded: Uint8Array;
    try {
      const fragments = element.fragments ?? [];
      // PS3.5 A.4.2: each RLE frame is one fragment; the offset table is then optional.
      encoded = fragments.length === info.numberOfFrames && (element.basicOffsetTable ?? []).length === 0
        ? dicomParser.readEncapsulatedPixelDataFromFragments(dataSet, element, frame, 1) as Uint8Array
        : dicomParser.readEncapsulatedImageFrame(dataSet, element, frame) as Uint8Array;
    } catch (e) {
      throw badFile(info.file, `has RLE frame ${frame + 1} that cannot be found (${e instanceof Error ? e.message : String(e)})`);
    }
    decodeRleFrame(encoded, out, pixels, bytesPerSample, info.file);
    if (!PLATFORM_LITTLE_ENDIAN) swapBytesInPlace(out, bytesPerSample);
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
