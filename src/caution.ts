/** Shown on every screen and in every report and export. */
export const CAUTION =
  'Research and decision-support tool, not a medical device. Segment assignments and measurements must be ' +
  'checked by a qualified reader; local protocols and licensed practice decide.';
