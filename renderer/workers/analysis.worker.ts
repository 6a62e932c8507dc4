/// <reference lib="webworker" />
// Loads a stored patient and runs the core's visit analysis and follow-up off the window's thread.
import type { Override } from '../../src/followup/tracks';
import { followupOfPatient, loadPatientFrom } from '../../src/patient/load';
import type { AnalysisRequest, PatientAnalysis } from '../analysis/types';
import { storedPatient } from '../analysis/store-source';
import { appDb } from '../store/db';
import { patientOverrides } from '../store/track-edits';
import { serveJob, type Progress } from './job';

async function analyse({ patientId }: AnalysisRequest, progress: Progress): Promise<PatientAnalysis> {
  const db = appDb();
  const { manifest, files } = await storedPatient(db, patientId);
  const total = manifest.visits.length + 1;
  let done = 0;
  // Visits one at a time, reporting each, so a long series shows progress.
  const visits = [];
  for (const v of manifest.visits) {
    progress(done, total, `visit ${v.id} (${v.date})`);
    // Key images are drawn here, while the scan is in hand, for the board page.
    const one = await loadPatientFrom({ ...manifest, visits: [v] }, patientId, files, { keyImages: true });
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
    visits: visits.map((v) => ({ id: v.manifest.id, date: v.manifest.date, analysis: v.analysis, volumetry: v.volumetry, warnings: v.warnings, sliceThicknessMm: v.followup.sliceThicknessMm, keyImages: v.keyImages })),
    followup,
  };
}

serveJob(analyse);
