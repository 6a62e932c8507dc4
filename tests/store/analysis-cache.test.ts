import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it } from 'vitest';
import { keepAnalysisOf, keptAnalysis } from '../../renderer/analysis/analysis-cache.js';
import { analysePatient } from '../../renderer/analysis/analyse-patient.js';
import { FalciformDb } from '../../renderer/store/db.js';
import { saveMark } from '../../renderer/store/edits.js';
import { commitImport, readImport } from '../../renderer/store/import.js';
import { recordEdit, setSetting, updatePatient } from '../../renderer/store/patients.js';
import { markFromCaliper } from '../../renderer/viewer/caliper.js';
import { dbName, dropAll, track } from './dump.js';
import { patientFolder } from './fixtures.js';

afterEach(dropAll);

const ID = 'KEPT-0001';
const quiet = () => {};

// Visit v1: segment map and lesion mask with L1 and L2; v2: liver mask, landmark set, mark M1 (fixtures.ts).
async function stored(): Promise<FalciformDb> {
  const db = track(new FalciformDb(dbName('kept')));
  await commitImport(db, await readImport(patientFolder({ id: ID })));
  return db;
}

/** One run as the patient screens make it: the result is handed to the memory as it arrives. */
async function run(db: FalciformDb) {
  const keep = keepAnalysisOf(ID);
  const result = await analysePatient(db, ID, quiet);
  keep(result);
  return result;
}

describe('the session memory of patient analyses', () => {
  it('keeps a run\'s result until an edit; the rerun then shows the edit', async () => {
    const db = await stored();
    const first = await run(db);
    expect(keptAnalysis(ID)).toBe(first);
    expect(first.visits.find((v) => v.id === 'v1')!.analysis.lesions.map((l) => l.id)).toEqual(['L1', 'L2']);

    // The edit trail and the app's settings are not read by an analysis.
    await setSetting(db, 'readerName', 'A. Reader');
    await recordEdit(db, { patientId: ID, entity: 'patient', entityId: ID, field: 'note', action: 'update', oldValue: null, newValue: 'seen' });
    expect(keptAnalysis(ID)).toBe(first);

    // A mark on v1 is a new lesion there: the kept result is forgotten and the rerun has it.
    await saveMark(db, ID, 'v1', markFromCaliper('M1', [55, 20, 12], [67, 20, 12], 8));
    expect(keptAnalysis(ID)).toBeNull();
    const second = await run(db);
    expect(second.visits.find((v) => v.id === 'v1')!.analysis.lesions.map((l) => l.id)).toEqual(['L1', 'L2', 'M1']);
    expect(keptAnalysis(ID)).toBe(second);
    // What is kept is what a fresh run computes from the store as it is now.
    expect(await analysePatient(db, ID, quiet)).toEqual(second);
  });

  it('a changed setting of the patient forgets the result; the rerun uses the new margin', async () => {
    const db = await stored();
    expect((await run(db)).manifest.marginMm).toBe(10);
    await updatePatient(db, ID, { marginMm: 15 });
    expect(keptAnalysis(ID)).toBeNull();
    const after = await run(db);
    expect(after.manifest.marginMm).toBe(15);
    // Alerted exactly when the margin is at most the set margin (src/lesions/margin.ts).
    const lesions = after.visits.flatMap((v) => v.analysis.lesions);
    expect(lesions.map((l) => l.marginAlert)).toEqual(lesions.map((l) => l.marginMm !== null && l.marginMm <= 15));
  });

  it('a run during which the store changed is not kept', async () => {
    const db = await stored();
    const keep = keepAnalysisOf(ID);
    const result = await analysePatient(db, ID, quiet);
    await updatePatient(db, ID, { marginMm: 5 });
    keep(result);
    expect(keptAnalysis(ID)).toBeNull();
  });
});
