/**
 * Protocol settings of the response rules. Defaults follow the published text; a setting that
 * departs from it is named in every output through `protocolDepartures`, so a reader sees which
 * rules were changed. Stored in the manifest as `protocol` (all fields optional).
 */
export interface ResponseProtocol {
  /**
   * A lesion first seen after baseline and smaller than this (longest diameter, mm) is equivocal
   * until a reader calls it or it grows to this size. RECIST 1.1 section 4.3.5 (from memory) names
   * small size as the example of an equivocal new lesion but gives no number; 10 mm is the smallest
   * measurable size (section 3.1.1) and, in mRECIST, the size a new nodule must reach to count.
   */
  equivocalNewBelowMm: number;
  /**
   * mRECIST PD also needs this absolute increase of the viable sum (mm); null: no floor, as published
   * (Lencioni and Llovet 2010 give only the 20% rule, from memory). A departure when set.
   */
  mrecistPdFloorMm: number | null;
  /** CR and PR must be confirmed by a later visit (RECIST 1.1 section 4.6.1, for trials that need it). */
  confirmResponse: boolean;
  /** Least days between a response and the visit confirming it: at least 4 weeks (section 4.6.1, from memory). */
  confirmationMinDays: number;
  /**
   * Least days from baseline for SD to count as the best response (section 4.6.3: set by the
   * protocol, commonly 6–8 weeks, from memory). 42 days when the protocol says nothing.
   */
  sdMinDays: number;
}

export const DEFAULT_PROTOCOL: ResponseProtocol = {
  equivocalNewBelowMm: 10,
  mrecistPdFloorMm: null,
  confirmResponse: false,
  confirmationMinDays: 28,
  sdMinDays: 42,
};

export function withProtocolDefaults(p: Partial<ResponseProtocol> | undefined): ResponseProtocol {
  return { ...DEFAULT_PROTOCOL, ...(p ?? {}) };
}

/** The settings that differ from the defaults, in words, for screens and reports. */
export function protocolDepartures(p: ResponseProtocol): string[] {
  const out: string[] = [];
  if (p.equivocalNewBelowMm !== DEFAULT_PROTOCOL.equivocalNewBelowMm) out.push(`new lesions under ${p.equivocalNewBelowMm} mm are equivocal until called (default ${DEFAULT_PROTOCOL.equivocalNewBelowMm} mm)`);
  if (p.mrecistPdFloorMm !== null) out.push(`mRECIST progression also needs +${p.mrecistPdFloorMm} mm (not in the published mRECIST)`);
  if (p.confirmResponse) out.push(`CR/PR confirmed by a visit at least ${p.confirmationMinDays} days later`);
  else if (p.confirmationMinDays !== DEFAULT_PROTOCOL.confirmationMinDays) out.push(`confirmation interval ${p.confirmationMinDays} days (confirmation not required)`);
  if (p.sdMinDays !== DEFAULT_PROTOCOL.sdMinDays) out.push(`SD needs at least ${p.sdMinDays} days from baseline (default ${DEFAULT_PROTOCOL.sdMinDays})`);
  return out;
}
