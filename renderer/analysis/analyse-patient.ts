import type { Override } from '../../src/followup/tracks.js';
import { followupOfPatient, loadPatientFrom } from '../../src/patient/load.js';
import type { FalciformDb } from '../store/db.js';
import { getSetting } from '../store/patients.js';
import { patientOverrides } from '../store/track-edits.js';
import { storedPatient } from './store-source.js';
import type { PatientAnalysis } from './types.js';

/** A stored patient's visit analyses and follow-up, as `falciform followup` computes them from disk. */
export async function analysePatient(db: FalciformDb, patientId: string, progress: (done: number, total: number, step: string) => void): Promise<PatientAnalysis> {
  const { manifest, files } = await storedPatient(db, patientId);
  // The lesions-per-visit cap, as the command line's --max-lesions: a mask above it is refused naming the file and the count.
  const maxLesions = await getSetting(db, 'maxLesions');
  const total = manifest.visits.length + 1;
  let done = 0;
  // Visits one at a time, reporting each, so a long series shows progress.
  const visits = [];
  for (const v of manifest.visits) {
    progress(done, total, `visit ${v.id} (${v.date})`);
    const one = await loadPatientFrom({ ...manifest, visits: [v] }, patientId, files, { maxLesions });
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
  return {
    manifest,
    visits: visits.map((v) => ({ id: v.manifest.id, date: v.manifest.date, analysis: v.analysis, volumetry: v.volumetry, warnings: v.warnings, sliceThicknessMm: v.followup.sliceThicknessMm })),
    followup,
  };
}
