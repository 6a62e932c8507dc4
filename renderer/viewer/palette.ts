import { SEGMENT_COLOURS } from '../../src/report/palette.js';
import { SEGMENT_CODES } from '../../src/segments/scheme.js';
import type { SegmentName } from '../../src/segments/segment-map.js';

/**
 * Segment colours on the images: the app's one assignment from the Okabe–Ito palette (Okabe M,
 * Ito K. Color Universal Design (CUD), 2008), shared with the diagram and the board summary so a
 * segment looks the same everywhere. IVb keeps IV's colour and is drawn striped, so a split map
 * still tells IVa from IVb on the image.
 */
/**
 * On the images segment I takes a light grey instead of the palette's black: a black wash only darkens
 * the dark grey liver on a CT window and vanishes. The charts, diagram and board keep black (on white).
 */
export const IMAGE_SEGMENT_COLOURS: Readonly<Record<SegmentName, string>> = { ...SEGMENT_COLOURS, I: '#d9d9d9' };
export { SEGMENT_COLOURS };

/** Largest default-scheme code (IVb). */
export const MAX_CODE = 9;

/** Code drawn in stripes. */
export const STRIPED_CODE = SEGMENT_CODES.IVb;

/** RGB of each default-scheme code, 3 bytes per code (0, background, unused), for the slice compositor. */
export const CODE_RGB: Uint8Array = (() => {
  const out = new Uint8Array((MAX_CODE + 1) * 3);
  for (const [name, code] of Object.entries(SEGMENT_CODES) as [SegmentName, number][]) {
    const hex = IMAGE_SEGMENT_COLOURS[name];
    out.set([1, 3, 5].map((at) => parseInt(hex.slice(at, at + 2), 16)), code * 3);
  }
  return out;
})();

/** Segment name of a default-scheme code; code 4 is IVa when the map splits IV. */
export function segmentOfCode(code: number, splitIV: boolean): SegmentName | null {
  if (code === SEGMENT_CODES.IV) return splitIV ? 'IVa' : 'IV';
  for (const [name, c] of Object.entries(SEGMENT_CODES) as [SegmentName, number][]) {
    if (c === code && name !== 'IV' && name !== 'IVa') return name;
  }
  return null;
}

/** Segments in reading order for a legend. */
export function legendSegments(splitIV: boolean): SegmentName[] {
  return ['I', 'II', 'III', ...(splitIV ? (['IVa', 'IVb'] as const) : (['IV'] as const)), 'V', 'VI', 'VII', 'VIII'];
}
