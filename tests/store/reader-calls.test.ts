import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it } from 'vitest';
import { storedPatient } from '../../renderer/analysis/store-source.js';
import { FalciformDb, setCurrentReader } from '../../renderer/store/db.js';
import { commitImport, readImport } from '../../renderer/store/import.js';
import { patientTrail } from '../../renderer/store/patients.js';
import { saveReaderCall, withReaderCall } from '../../renderer/store/reader-calls.js';
import { isFalciformError } from '../../src/errors.js';
import { followupOfPatient, loadPatientFrom } from '../../src/patient/load.js';
import { dbName, dropAll, track } from './dump.js';
import { patientFolder } from './fixtures.js';

afterEach(() => {
  setCurrentReader('');
  return dropAll();
});

const ID = 'CALLS-0001';

async function stored(): Promise<FalciformDb> {
  const db = track(new FalciformDb(dbName('reader-calls')));
  await commitImport(db, await readImport(patientFolder({ id: ID })));
  return db;
}

/** The follow-up as the app's analysis worker computes it, straight from the store. */
async function followup(db: FalciformDb) {
  const { manifest, files } = await storedPatient(db, ID);
  const loaded = await loadPatientFrom(manifest, ID, files);
  return followupOfPatient({ manifest, manifestFile: ID, visits: loaded.visits });
}

describe('reader\'s calls entered in the app', () => {
  it('are stored on the visit, signed in the trail, and change the computed response', async () => {
    const db = await stored();
    setCurrentReader('Dr Ines Varga');
    const before = await followup(db);
    expect(before.visits[1].readerCalls).toEqual({ outsideLiver: 'not-assessed' });
    expect(before.visits[1].overall).not.toBe('PD');

    await saveReaderCall(db, ID, 'v2', { call: 'nonTarget', value: 'unequivocal-progression' });
    await saveReaderCall(db, ID, 'v2', { call: 'outsideLiver', value: 'stable' });
    expect((await db.visits.get([ID, 'v2']))!.readerCalls).toEqual({ nonTarget: 'unequivocal-progression', outsideLiver: 'stable' });
    const after = await followup(db);
    // Source: RECIST 1.1 (Eisenhauer 2009), table 1: unequivocal progression of non-target lesions is PD
    // whatever the targets show.
    expect(after.visits[1].overall).toBe('PD');
    expect(after.visits[1].nonTarget.readerProgression).toBe(true);
    expect(after.visits[1].readerCalls).toEqual({ nonTarget: 'unequivocal-progression', outsideLiver: 'stable' });

    const trail = (await patientTrail(db, ID)).filter((e) => e.field.startsWith('readerCalls'));
    expect(trail.map((e) => [e.entity, e.entityId, e.field, e.oldValue, e.newValue, e.by])).toEqual([
      ['visit', 'v2', 'readerCalls.nonTarget', null, 'unequivocal-progression', 'Dr Ines Varga'],
      ['visit', 'v2', 'readerCalls.outsideLiver', null, 'stable', 'Dr Ines Varga'],
    ]);

    // Setting a call back to "not given" leaves the visit as imported.
    await saveReaderCall(db, ID, 'v2', { call: 'nonTarget', value: null });
    await saveReaderCall(db, ID, 'v2', { call: 'outsideLiver', value: null });
    expect((await db.visits.get([ID, 'v2']))!.readerCalls).toBeUndefined();
    expect((await followup(db)).visits[1].overall).toBe(before.visits[1].overall);
  });

  it('refuses a visit that is not stored, naming it', async () => {
    const db = await stored();
    const e = await saveReaderCall(db, ID, 'v9', { call: 'nonTarget', value: 'present' }).then(() => null, (x: unknown) => x);
    expect(isFalciformError(e) && e.message).toMatch(/^visit v9: is not among CALLS-0001's stored visits/);
  });

  it('keeps per-lesion calls as lists and maps, dropping empty ones', () => {
    let c = withReaderCall({}, { call: 'newLesion', lesion: 'L3', value: 'unequivocal' });
    c = withReaderCall(c, { call: 'tooSmall', lesion: 'L1', on: true });
    c = withReaderCall(c, { call: 'confirmedGone', track: 'B', on: true });
    expect(c).toEqual({ newLesions: { L3: 'unequivocal' }, tooSmall: ['L1'], confirmedGone: ['B'] });
    c = withReaderCall(c, { call: 'newLesion', lesion: 'L3', value: null });
    c = withReaderCall(c, { call: 'tooSmall', lesion: 'L1', on: false });
    c = withReaderCall(c, { call: 'confirmedGone', track: 'B', on: false });
    expect(c).toEqual({});
  });
});
