import { badFile } from '../errors.js';
import type { Vec3 } from '../geometry/mat4.js';
import { dicomParser, type DataSet } from './parser-lib.js';
import { transferSyntax } from './transfer-syntax.js';

/**
 * One DICOM Part 10 file's header read into plain facts: what series it belongs to, how its pixels are
 * stored, and where each frame lies (Image Plane module, PS3.3 C.7.6.2, or for enhanced multi-frame
 * files the Plane Position/Orientation and Pixel Measures functional groups, PS3.3 C.7.6.16).
 */

/** Raw-deflate inflater (RFC 1951, no zlib or gzip framing) supplied by the platform. */
export type InflateRaw = (deflated: Uint8Array, maxOutputBytes: number) => Promise<Uint8Array>;

export interface DicomFacts {
  studyUid?: string;
  seriesUid: string;
  seriesNumber?: number;
  seriesDescription?: string;
  /** ISO 8601 date from StudyDate (0008,0020). */
  studyDate?: string;
  modality?: string;
  sopClassUid?: string;
  imageType: string[];
  sliceThicknessMm?: number;
  contrastAgent?: string;
  kvp?: number;
  manufacturer?: string;
  manufacturerModel?: string;
  patientId?: string;
  patientName?: string;
  /** ISO 8601 date from PatientBirthDate (0010,0030). */
  patientBirthDate?: string;
  /**
   * Set when LossyImageCompression (0028,2110) is "01": the image has been lossy-compressed at some
   * point (PS3.3 C.7.6.1.1.5), in words with the method (0028,2114) and ratio (0028,2112) when given.
   */
  lossyCompression?: string;
}

export interface PixelFormat {
  rows: number;
  columns: number;
  bitsAllocated: number;
  bitsStored: number;
  signed: boolean;
  samplesPerPixel: number;
  photometric: string;
}

/** Where one frame lies; all in DICOM patient coordinates (LPS mm). */
export interface FramePlane {
  frame: number;
  positionLps?: Vec3;
  /** Row direction cosines then column direction cosines (ImageOrientationPatient). */
  orientation?: readonly number[];
  /** Spacing between rows, then between columns (PixelSpacing), mm. */
  pixelSpacingMm?: readonly [number, number];
  slope: number;
  inter: number;
}

export interface DicomFileInfo {
  file: string;
  syntaxUid: string;
  syntaxName: string;
  facts: DicomFacts;
  /** Absent when the file holds no pixel data (a report, a DICOMDIR, a structure set). */
  pixel?: PixelFormat;
  numberOfFrames: number;
  frames: FramePlane[];
  /** True when positions came from per-frame functional groups (enhanced multi-frame). */
  enhanced: boolean;
}

export interface ParsedDicom {
  info: DicomFileInfo;
  dataSet: DataSet;
}

const DICM_OFFSET = 128;

/** A DICOM Part 10 file: the 128-byte preamble, then "DICM" (PS3.10 section 7.1). */
export function isDicomPart10(bytes: Uint8Array): boolean {
  return bytes.length >= DICM_OFFSET + 4 &&
    bytes[128] === 0x44 && bytes[129] === 0x49 && bytes[130] === 0x43 && bytes[131] === 0x4d;
}

function problemText(e: unknown): string {
  if (e instanceof Error) return e.message;
  if (typeof e === 'string') return e;
  const inner = (e as { exception?: unknown }).exception;
  return inner !== undefined ? problemText(inner) : String(e);
}

function damaged(file: string, e: unknown) {
  const why = problemText(e).replace(/^dicomParser[.:]\w+:\s*/, '');
  if (/overrun|end of buffer|past the end/i.test(why)) return badFile(file, 'is cut short: its DICOM data runs past the end of the file');
  return badFile(file, `is a damaged DICOM file (${why})`);
}

/**
 * Parses a Part 10 file's header and locates its pixel data (not decoded here). Deflated files are
 * inflated first with `inflateRaw`, capped at `maxInflatedBytes`.
 */
export async function parseDicomFile(bytes: Uint8Array, file: string, inflateRaw: InflateRaw, maxInflatedBytes: number): Promise<ParsedDicom> {
  let meta: DataSet;
  let syntaxUid: string | undefined;
  try {
    meta = dicomParser.readPart10Header(bytes);
    syntaxUid = meta.string('x00020010');
  } catch (e) {
    throw damaged(file, e);
  }
  if (!syntaxUid) throw badFile(file, 'has no transfer syntax (0002,0010) in its file meta information');
  const syntax = transferSyntax(syntaxUid);
  let whole = bytes;
  if (syntax.encoding === 'deflated') {
    const start = (meta as unknown as { position: number }).position;
    let inflated: Uint8Array;
    try {
      inflated = await inflateRaw(bytes.subarray(start), maxInflatedBytes);
    } catch (e) {
      throw badFile(file, `has a deflated data set that cannot be inflated (${problemText(e)})`);
    }
    whole = new Uint8Array(start + inflated.length);
    whole.set(bytes.subarray(0, start), 0);
    whole.set(inflated, start);
  }
  let dataSet: DataSet;
  try {
    // The inflater hook receives the already-inflated bytes: dicom-parser's own is synchronous.
    dataSet = dicomParser.parseDicom(whole, { inflater: (arr: Uint8Array) => arr } as never);
  } catch (e) {
    throw damaged(file, e);
  }
  try {
    // Element values are read lazily; a damaged length or value surfaces here.
    return { info: describe(dataSet, file, syntax), dataSet };
  } catch (e) {
    throw damaged(file, e);
  }
}

function str(ds: DataSet | undefined, tag: string): string | undefined {
  const s = ds?.string(tag);
  return s === undefined || s === '' ? undefined : s;
}

function num(ds: DataSet | undefined, tag: string, index = 0): number | undefined {
  if (!ds?.elements[tag] || ds.elements[tag].length === 0) return undefined;
  const x = ds.floatString(tag, index);
  return x === undefined || !Number.isFinite(x) ? undefined : x;
}

function nums(ds: DataSet | undefined, tag: string, count: number): number[] | undefined {
  const out: number[] = [];
  for (let n = 0; n < count; n++) {
    const x = num(ds, tag, n);
    if (x === undefined) return undefined;
    out.push(x);
  }
  return out;
}

function isoDate(da: string | undefined): string | undefined {
  const m = da?.match(/^(\d{4})\.?(\d{2})\.?(\d{2})$/);
  return m ? `${m[1]}-${m[2]}-${m[3]}` : undefined;
}

/** The first item's data set of a sequence, when present. */
function item(ds: DataSet | undefined, tag: string): DataSet | undefined {
  return ds?.elements[tag]?.items?.[0]?.dataSet;
}

function plane(ds: DataSet | undefined, frame: number, fallback?: FramePlane): FramePlane {
  const position = nums(ds, 'x00200032', 3);
  const orientation = nums(ds, 'x00200037', 6);
  const spacing = nums(ds, 'x00280030', 2);
  return {
    frame,
    positionLps: position ? [position[0], position[1], position[2]] : fallback?.positionLps,
    orientation: orientation ?? fallback?.orientation,
    pixelSpacingMm: spacing ? [spacing[0], spacing[1]] : fallback?.pixelSpacingMm,
    slope: num(ds, 'x00281053') ?? fallback?.slope ?? 1,
    inter: num(ds, 'x00281052') ?? fallback?.inter ?? 0,
  };
}

/** A frame's plane from the per-frame functional group, else the shared one (PS3.3 C.7.6.16). */
function enhancedPlane(perFrame: DataSet | undefined, shared: DataSet | undefined, frame: number): FramePlane {
  const pick = (seq: string) => item(perFrame, seq) ?? item(shared, seq);
  const position = nums(pick('x00209113'), 'x00200032', 3);
  const orientation = nums(pick('x00209116'), 'x00200037', 6);
  const spacing = nums(pick('x00289110'), 'x00280030', 2);
  const transform = pick('x00289145');
  return {
    frame,
    positionLps: position ? [position[0], position[1], position[2]] : undefined,
    orientation,
    pixelSpacingMm: spacing ? [spacing[0], spacing[1]] : undefined,
    slope: num(transform, 'x00281053') ?? 1,
    inter: num(transform, 'x00281052') ?? 0,
  };
}

function lossyHistory(ds: DataSet): string | undefined {
  if (str(ds, 'x00282110')?.trim() !== '01') return undefined;
  const method = str(ds, 'x00282114')?.split('\\').map((m) => m.trim()).filter(Boolean).join(', ');
  const ratio = str(ds, 'x00282112')?.split('\\').map((r) => r.trim()).filter(Boolean).join(', ');
  return ['Lossy Image Compression 01', method && `method ${method}`, ratio && `ratio ${ratio}`].filter(Boolean).join(', ');
}

function describe(ds: DataSet, file: string, syntax: { uid: string; name: string }): DicomFileInfo {
  const facts: DicomFacts = {
    studyUid: str(ds, 'x0020000d'),
    seriesUid: str(ds, 'x0020000e') ?? '(no series UID)',
    seriesNumber: num(ds, 'x00200011'),
    seriesDescription: str(ds, 'x0008103e'),
    studyDate: isoDate(str(ds, 'x00080020')),
    modality: str(ds, 'x00080060'),
    sopClassUid: str(ds, 'x00080016') ?? str(ds, 'x00020002'),
    imageType: (ds.elements.x00080008 ? ds.string('x00080008') ?? '' : '').split('\\').map((s) => s.trim().toUpperCase()).filter(Boolean),
    sliceThicknessMm: num(ds, 'x00180050') ?? num(item(item(ds, 'x52009229'), 'x00289110'), 'x00180050'),
    contrastAgent: str(ds, 'x00180010'),
    kvp: num(ds, 'x00180060'),
    manufacturer: str(ds, 'x00080070'),
    manufacturerModel: str(ds, 'x00081090'),
    patientId: str(ds, 'x00100020'),
    patientName: str(ds, 'x00100010')?.replace(/\^+/g, ' ').trim(),
    patientBirthDate: isoDate(str(ds, 'x00100030')),
    lossyCompression: lossyHistory(ds),
  };
  const hasPixels = ds.elements.x7fe00010 !== undefined;
  const pixel: PixelFormat | undefined = hasPixels
    ? {
        rows: ds.uint16('x00280010') ?? 0,
        columns: ds.uint16('x00280011') ?? 0,
        bitsAllocated: ds.uint16('x00280100') ?? 0,
        bitsStored: ds.uint16('x00280101') ?? ds.uint16('x00280100') ?? 0,
        signed: ds.uint16('x00280103') === 1,
        samplesPerPixel: ds.uint16('x00280002') ?? 1,
        photometric: str(ds, 'x00280004') ?? 'MONOCHROME2',
      }
    : undefined;
  const numberOfFrames = Math.max(1, Math.round(num(ds, 'x00280008') ?? 1));
  const perFrame = ds.elements.x52009230?.items;
  const shared = item(ds, 'x52009229');
  const enhanced = perFrame !== undefined || shared !== undefined;
  const frames: FramePlane[] = [];
  if (enhanced) {
    for (let f = 0; f < numberOfFrames; f++) frames.push(enhancedPlane(perFrame?.[f]?.dataSet, shared, f));
  } else {
    // Classic multi-frame files (NM, ultrasound cine, RT dose) carry one position for all frames.
    const first = plane(ds, 0);
    frames.push(first);
    for (let f = 1; f < numberOfFrames; f++) frames.push({ ...first, frame: f, positionLps: undefined });
  }
  return { file, syntaxUid: syntax.uid, syntaxName: syntax.name, facts, pixel, numberOfFrames, frames, enhanced };
}
