import type { NonTargetCall, OutsideLiverCall } from './recist.js';

/**
 * What a reader says about a visit that the images alone cannot: the response rules take these as
 * given. Falciform measures the liver; the rest of the body, and judgements RECIST 1.1 leaves to a
 * reader, come from here.
 */
export type NewLesionCall = 'equivocal' | 'unequivocal';
export const NEW_LESION_CALLS: readonly NewLesionCall[] = ['equivocal', 'unequivocal'];

export interface VisitReaderCalls {
  /** By lesion id at this visit: whether a lesion first seen after baseline is unequivocally new. */
  newLesions?: Record<string, NewLesionCall>;
  /** Lesion ids at this visit the reader judges present but too small to measure (recorded as 5 mm). */
  tooSmall?: string[];
  /** Tracks (as "A", or "v1:L2" for the track holding L2 at v1; the old "T1" is read as "A") absent from this visit's mask that the reader confirms gone. */
  confirmedGone?: string[];
  /** The non-target lesions as a whole. */
  nonTarget?: NonTargetCall;
  /** Disease outside the liver; not given means not assessed. */
  outsideLiver?: OutsideLiverCall;
}

/** Said on every screen and output that shows a response. */
export const LIVER_SCOPE_STATEMENT =
  'Falciform assesses the liver; non-target calls and disease outside the liver are taken from the reader.';
