import type { Override } from '../../src/followup/tracks.js';
import { followupOfPatient, loadPatientFrom } from '../../src/patient/load.js';
import type { FalciformDb } from '../store/db.js';
import { getSetting } from '../store/patients.js';
import { patientOverrides } from '../store/track-edits.js';
import { storedPatient } from './store-source.js';
import { WAITING_FOR_MAP, type PatientAnalysis } from './types.js';

/** A stored patient's visit analyses and follow-up, as `falciform followup` computes them from disk. */
export async function analysePatient(db: FalciformDb, patientId: string, progress: (done: number, total: number, step: string) => void): Promise<PatientAnalysis> {
  const stored = await storedPatient(db, patientId);
  const files = stored.files;
  // A visit with no segment map yet (a scan alone, or a liver mask awaiting its landmarks) has
  // nothing to place lesions in: it waits outside the analysis until the reader gives it a map.
  const waiting = stored.manifest.visits.filter((v) => v.segments === undefined && v.landmarks === undefined);
  const manifest = { ...stored.manifest, visits: stored.manifest.visits.filter((v) => !waiting.includes(v)) };
  if (manifest.visits.length === 0) throw new Error(`no visit of ${patientId} has a segment map yet; grow the liver and place landmarks in the viewer`);
  // The lesions-per-visit cap, as the command line's --max-lesions: a mask above it is refused naming the file and the count.
  const maxLesions = await getSetting(db, 'maxLesions');
  const total = manifest.visits.length + 1;
  let done = 0;
  // Visits one at a time, reporting each, so a long series shows progress.
  const visits = [];
  for (const v of manifest.visits) {
    progress(done, total, `visit ${v.id} (${v.date})`);
    // Key images are drawn here, while the scan is in hand, for the board page.
    const one = await loadPatientFrom({ ...manifest, visits: [v] }, patientId, files, { keyImages: true, maxLesions });
    visits.push(one.visits[0]);
    done++;
  }
  progress(done, total, 'follow-up across visits');
  const overrides: Override[] = (await patientOverrides(db, patientId)).map((o) =>
    o.kind === 'link' ? { kind: 'link', visit: o.visit, lesion: o.lesion, track: o.track ?? '' }
      : o.kind === 'unlink' ? { kind: 'unlink', visit: o.visit, lesion: o.lesion, ...(o.track ? { track: o.track } : {}) }
        : { kind: 'new', visit: o.visit, lesion: o.lesion },
  );
  const followup = followupOfPatient({ manifest, manifestFile: patientId, visits }, overrides);
  for (const v of waiting) followup.warnings.push(`visit ${v.id}: ${WAITING_FOR_MAP}`);
  return {
    manifest,
    visits: visits.map((v) => ({ id: v.manifest.id, date: v.manifest.date, analysis: v.analysis, volumetry: v.volumetry, warnings: v.warnings, sliceThicknessMm: v.followup.sliceThicknessMm, keyImages: v.keyImages })),
    followup,
    waitingVisits: waiting.map((v) => ({ id: v.id, date: v.date })),
  };
}
