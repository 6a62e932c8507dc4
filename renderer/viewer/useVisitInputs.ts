import { parseMarks, type Mark } from '../../src/lesions/marks';
import type { VisitRecord } from '../../src/model/records';
import { parseLandmarks, type LandmarkSet } from '../../src/segments/landmarks';
import { errorText } from '../error-text';
import { appDb } from '../store/db';
import { useStored } from '../store/use-stored';
import type { OtherVisitSet } from './landmark-qc';

export interface VisitInputs {
  /** The visit as stored; null when the patient has no such visit. */
  record: VisitRecord | null;
  /** The patient's visit ids by date, for moving to the previous and next visit. */
  visitIds: string[];
  /** The visit's manual marks; null when it has no marks file. */
  marks: Mark[] | null;
  landmarks: LandmarkSet | null;
  /** Landmark sets of the patient's other visits, for the configuration check. */
  otherLandmarks: OtherVisitSet[];
  /** A stored input of this visit that does not read (the message names the file). */
  problem: string | null;
}

/** The visit's record and small JSON inputs, read from the store again whenever `revision` changes. */
export function useVisitInputs(patientId: string, visitId: string, revision: number): VisitInputs | undefined {
  return useStored(() => readVisitInputs(patientId, visitId), [patientId, visitId, revision]);
}

async function readVisitInputs(patientId: string, visitId: string): Promise<VisitInputs> {
  const db = appDb();
  const [visits, all] = await db.transaction('r', db.visits, db.inputs, () => Promise.all([
    db.visits.where('patientId').equals(patientId).sortBy('date'),
    db.inputs.where('patientId').equals(patientId).toArray(),
  ]));
  const next: VisitInputs = {
    record: visits.find((v) => v.id === visitId) ?? null,
    visitIds: visits.map((v) => v.id),
    marks: null,
    landmarks: null,
    otherLandmarks: [],
    problem: null,
  };
  const order = new Map(next.visitIds.map((id, n) => [id, n]));
  for (const input of all) {
    const file = `${input.visitId}/${input.fileName}`;
    try {
      if (input.visitId === visitId && input.kind === 'marks') next.marks = parseMarks(input.text, file);
      else if (input.kind === 'landmarks') {
        const set = parseLandmarks(input.text, file);
        if (input.visitId === visitId) next.landmarks = set;
        else next.otherLandmarks.push({ visitId: input.visitId, set });
      }
    } catch (e) {
      if (input.visitId === visitId) next.problem = errorText(e);
    }
  }
  next.otherLandmarks.sort((a, b) => (order.get(a.visitId) ?? 0) - (order.get(b.visitId) ?? 0));
  return next;
}
