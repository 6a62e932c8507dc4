/** Shown on every screen and in every report and export. */
export const CAUTION =
  'Research and decision-support tool, not a medical device. Segment assignments and measurements must be ' +
  'checked by a qualified reader; local protocols and licensed practice decide.';

/** Said beside every response category shown or exported: it is worked out, not read by a person. */
export const COMPUTED_RESPONSE =
  'Response computed by Falciform from the recorded diameters under the named criteria, not a reader\'s assessment; ' +
  'a qualified reader confirms it.';
