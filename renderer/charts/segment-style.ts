import type { SegmentName } from '../../src/segments/segment-map.js';
import { segmentColour } from '../../src/report/palette.js';

/**
 * How a segment is drawn in the charts: the core palette's one segment colour (grey outside every segment),
 * a dash for IVb (it shares IV's colour), and a dark outline for colours too light to see as thin
 * lines or small dots on white (Okabe-Ito yellow).
 */

export const OUTLINE_INK = '#3b4348';

export { segmentColour };

/**
 * SVG stroke-dasharray for the segment's lines, where its colour alone does not tell it apart: IVb
 * from IV's colour, and V and VII from II (orange, yellow and vermillion are close for some readers).
 */
const DASHES: Partial<Record<SegmentName, string>> = { IVb: '6 3', V: '8 3 2 3', VII: '2 3' };
export function segmentDash(segment: SegmentName | null): string | undefined {
  return segment === null ? undefined : DASHES[segment];
}

/** Relative luminance (WCAG 2 definition) of a #rrggbb colour. */
export function luminance(hex: string): number {
  const [r, g, b] = [1, 3, 5].map((at) => {
    const c = parseInt(hex.slice(at, at + 2), 16) / 255;
    return c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  });
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

/** A colour with under 1.5:1 contrast against white needs an outline to be seen. */
export function needsOutline(segment: SegmentName | null): boolean {
  return (1.05 / (luminance(segmentColour(segment)) + 0.05)) < 1.5;
}
