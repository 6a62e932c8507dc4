import { isFalciformError } from '../../src/errors.js';
import { checkLandmarks, LANDMARK_NAMES, type LandmarkName, type LandmarkSet } from '../../src/segments/landmarks.js';
import { landmarkQc, QC_MIN_CHANGE_MM } from '../../src/segments/qc.js';

/** How the viewer names each landmark: in full in lists, in short on the image. */
export const LANDMARK_LABELS: Readonly<Record<LandmarkName, { full: string; short: string }>> = {
  ivc_superior: { full: 'IVC, upper point', short: 'IVC sup' },
  ivc_inferior: { full: 'IVC, lower point', short: 'IVC inf' },
  right_hepatic_vein: { full: 'Right hepatic vein', short: 'RHV' },
  middle_hepatic_vein: { full: 'Middle hepatic vein', short: 'MHV' },
  umbilical_fissure: { full: 'Umbilical fissure', short: 'UF' },
  portal_bifurcation: { full: 'Portal bifurcation', short: 'PB' },
};

/** The core's messages name landmarks as the file does; on screen they read as words. */
export function inWords(message: string): string {
  let out = message;
  for (const name of LANDMARK_NAMES) out = out.split(name).join(LANDMARK_LABELS[name].full.toLowerCase());
  return out;
}

export interface LandmarkNotes {
  /** Messages for each landmark concerned, in words. */
  byLandmark: Partial<Record<LandmarkName, string[]>>;
  /** Messages that concern no single landmark. */
  general: string[];
}

/** The landmark a clause is about: the first one it names. */
function subjectOf(clause: string): LandmarkName | null {
  let best: LandmarkName | null = null;
  let at = Infinity;
  for (const name of LANDMARK_NAMES) {
    const k = clause.indexOf(name);
    if (k >= 0 && k < at) { at = k; best = name; }
  }
  return best;
}

function add(notes: LandmarkNotes, name: LandmarkName | null, text: string): void {
  if (name === null) notes.general.push(text);
  else (notes.byLandmark[name] ??= []).push(text);
}

/**
 * Whether the plane rule can use a set (the core's `checkLandmarks`), each problem filed under the
 * landmark it is about so the screen can show it beside that point. Null when the set is usable.
 */
export function landmarkProblems(set: LandmarkSet): LandmarkNotes | null {
  try {
    checkLandmarks(set, 'landmark set');
    return null;
  } catch (e) {
    if (!isFalciformError(e) || e.kind !== 'bad-landmarks') throw e;
    const notes: LandmarkNotes = { byLandmark: {}, general: [] };
    for (const problem of e.problem.split('; ')) {
      // The side-order problem lists several points, one clause each, before a shared explanation.
      const [clauses] = problem.split(' (expected');
      for (const clause of clauses.split(', ')) add(notes, subjectOf(clause), inWords(clause));
    }
    return notes;
  }
}

export interface OtherVisitSet {
  visitId: string;
  set: LandmarkSet;
}

/**
 * The spatial-configuration check (core `landmarkQc`) against the patient's other visits: a summary
 * line, and a note beside the landmark whose removal improves agreement most, when it is named.
 */
export function landmarkQcNotes(set: LandmarkSet, others: OtherVisitSet[]): LandmarkNotes | null {
  if (others.length === 0) return null;
  const qc = landmarkQc(set, others.map((o) => o.set));
  const [a, b] = qc.maxChangePair;
  const visits = others.map((o) => o.visitId).join(', ');
  const notes: LandmarkNotes = {
    byLandmark: {},
    general: [
      `Compared with visit${others.length > 1 ? 's' : ''} ${visits}: distances agree with r = ${qc.correlation.toFixed(3)}; ` +
        `the largest change is ${qc.maxChangeMm.toFixed(1)} mm, between ${LANDMARK_LABELS[a].full.toLowerCase()} and ${LANDMARK_LABELS[b].full.toLowerCase()}` +
        (qc.maxChangeMm < QC_MIN_CHANGE_MM ? ' (within what careful placement varies).' : '.'),
    ],
  };
  if (qc.worstLandmark && qc.correlationWithout !== null) {
    add(notes, qc.worstLandmark, `Check this point: without it the agreement with the other visits rises from r = ${qc.correlation.toFixed(3)} to ${qc.correlationWithout.toFixed(3)}.`);
  }
  return notes;
}
