/**
 * The typefaces of the app and of every output, shipped with the project from npm (@fontsource
 * packages, SIL Open Font License 1.1) so a page looks, and breaks, the same on every machine: no
 * output names a font the machine must already have, only these families and a generic fallback.
 * Atkinson Hyperlegible (Braille Institute) was drawn for low-vision readers to keep look-alike
 * characters apart (0/O, 1/l/I, 5/S, 8/B); small digits in dense tables need exactly that.
 */
export interface ShippedFont {
  family: string;
  /** The npm package the files and the licence come from. */
  pkg: string;
  /** The package's stylesheets used, one per weight and style (each covers Latin and Latin Extended). */
  faces: readonly string[];
  generic: 'sans-serif' | 'monospace';
}

export const SANS_FONT: ShippedFont = {
  family: 'Atkinson Hyperlegible Next',
  pkg: '@fontsource/atkinson-hyperlegible-next',
  faces: ['400', '400-italic', '700'],
  generic: 'sans-serif',
};

export const MONO_FONT: ShippedFont = {
  family: 'Atkinson Hyperlegible Mono',
  pkg: '@fontsource/atkinson-hyperlegible-mono',
  faces: ['400', '700'],
  generic: 'monospace',
};

export const SHIPPED_FONTS: readonly ShippedFont[] = [SANS_FONT, MONO_FONT];

/** A CSS font-family value: the shipped family, then only the generic fallback. */
export function fontStack(font: ShippedFont): string {
  return `'${font.family}', ${font.generic}`;
}
