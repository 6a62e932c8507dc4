import type { SegmentName } from '../segments/segment-map.js';

/**
 * Segment colours from the Okabe-Ito colour-blind-safe palette (Okabe M, Ito K. Color Universal
 * Design: how to make figures and presentations that are friendly to colorblind people, 2008).
 * Eight colours for eight segments; IVa and IVb keep IV's colour, so a split map and an unsplit one
 * read alike, and are told apart by their labels.
 */
export const OKABE_ITO = {
  black: '#000000',
  orange: '#E69F00',
  skyBlue: '#56B4E9',
  bluishGreen: '#009E73',
  yellow: '#F0E442',
  blue: '#0072B2',
  vermillion: '#D55E00',
  reddishPurple: '#CC79A7',
} as const;

export const SEGMENT_COLOURS: Readonly<Record<SegmentName, string>> = {
  I: OKABE_ITO.black,
  II: OKABE_ITO.orange,
  III: OKABE_ITO.skyBlue,
  IV: OKABE_ITO.bluishGreen,
  IVa: OKABE_ITO.bluishGreen,
  IVb: OKABE_ITO.bluishGreen,
  V: OKABE_ITO.yellow,
  VI: OKABE_ITO.blue,
  VII: OKABE_ITO.vermillion,
  VIII: OKABE_ITO.reddishPurple,
};

/** For a lesion outside every segment. */
export const OUTSIDE_COLOUR = '#7f7f7f';

export function segmentColour(s: SegmentName | null): string {
  return s === null ? OUTSIDE_COLOUR : SEGMENT_COLOURS[s];
}

/** Lines and text of the drawings. */
export const INK = '#1d2327';
/** The margin-alert ring: dark enough to read in black and white, apart from every segment colour. */
export const ALERT_INK = '#8a3b00';
/** Paper: halos behind labels, open dots. */
export const PAPER = '#ffffff';
