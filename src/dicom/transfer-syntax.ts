/**
 * Transfer syntaxes by UID (DICOM PS3.5 section 10 and Annex A; UIDs as listed in PS3.6 Annex A),
 * with the way Falciform decodes each. Anything not decoded is refused by name: the lossy syntaxes
 * among them (JPEG baseline and extended, near-lossless JPEG-LS, JPEG 2000 that may be lossy) are never
 * decoded, so a lossy image is never taken for an exact one.
 */
export type PixelEncoding = 'native' | 'deflated' | 'rle' | 'jpeg-ls' | 'jpeg-2000' | 'refused';

interface Syntax {
  name: string;
  encoding: PixelEncoding;
}

const SYNTAXES: Record<string, Syntax> = {
  '1.2.840.10008.1.2': { name: 'Implicit VR Little Endian', encoding: 'native' },
  '1.2.840.10008.1.2.1': { name: 'Explicit VR Little Endian', encoding: 'native' },
  '1.2.840.10008.1.2.1.99': { name: 'Deflated Explicit VR Little Endian', encoding: 'deflated' },
  '1.2.840.10008.1.2.2': { name: 'Explicit VR Big Endian', encoding: 'native' },
  '1.2.840.10008.1.2.5': { name: 'RLE Lossless', encoding: 'rle' },
  '1.2.840.10008.1.2.1.98': { name: 'Encapsulated Uncompressed Explicit VR Little Endian', encoding: 'refused' },
  '1.2.840.10008.1.2.4.50': { name: 'JPEG Baseline (Process 1), a lossy compression', encoding: 'refused' },
  '1.2.840.10008.1.2.4.51': { name: 'JPEG Extended (Process 2 and 4), a lossy compression', encoding: 'refused' },
  '1.2.840.10008.1.2.4.57': { name: 'JPEG Lossless, Non-Hierarchical (Process 14)', encoding: 'refused' },
  '1.2.840.10008.1.2.4.70': { name: 'JPEG Lossless, Non-Hierarchical, First-Order Prediction (Process 14, Selection Value 1)', encoding: 'refused' },
  '1.2.840.10008.1.2.4.80': { name: 'JPEG-LS Lossless', encoding: 'jpeg-ls' },
  '1.2.840.10008.1.2.4.81': { name: 'JPEG-LS Lossy (Near-Lossless)', encoding: 'refused' },
  '1.2.840.10008.1.2.4.90': { name: 'JPEG 2000 Image Compression (Lossless Only)', encoding: 'jpeg-2000' },
  '1.2.840.10008.1.2.4.91': { name: 'JPEG 2000 Image Compression, possibly lossy', encoding: 'refused' },
  '1.2.840.10008.1.2.4.92': { name: 'JPEG 2000 Part 2 Multi-component (Lossless Only)', encoding: 'refused' },
  '1.2.840.10008.1.2.4.93': { name: 'JPEG 2000 Part 2 Multi-component', encoding: 'refused' },
  '1.2.840.10008.1.2.4.201': { name: 'High-Throughput JPEG 2000 (Lossless Only)', encoding: 'refused' },
  '1.2.840.10008.1.2.4.202': { name: 'High-Throughput JPEG 2000 with RPCL Options (Lossless Only)', encoding: 'refused' },
  '1.2.840.10008.1.2.4.203': { name: 'High-Throughput JPEG 2000, possibly lossy', encoding: 'refused' },
};

const VIDEO = /^1\.2\.840\.10008\.1\.2\.4\.1\d\d$/;

export function transferSyntax(uid: string): Syntax & { uid: string } {
  const known = SYNTAXES[uid];
  if (known) return { uid, ...known };
  if (VIDEO.test(uid)) return { uid, name: `an MPEG/HEVC video syntax (${uid})`, encoding: 'refused' };
  return { uid, name: `an unknown transfer syntax (${uid})`, encoding: 'refused' };
}

export const EXPLICIT_BIG_ENDIAN = '1.2.840.10008.1.2.2';
