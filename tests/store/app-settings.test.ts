import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it } from 'vitest';
import { analysePatient } from '../../renderer/analysis/analyse-patient.js';
import { createBackup, readBackup } from '../../renderer/store/backup.js';
import { FalciformDb } from '../../renderer/store/db.js';
import { commitImport, readImport } from '../../renderer/store/import.js';
import { getSetting, setSetting } from '../../renderer/store/patients.js';
import { dbName, dropAll, track } from './dump.js';
import { patientFolder } from './fixtures.js';

afterEach(dropAll);

const ID = 'CAP-0001';
const quiet = () => {};

async function stored(): Promise<FalciformDb> {
  const db = track(new FalciformDb(dbName('settings')));
  await commitImport(db, await readImport(patientFolder({ id: ID })));
  return db;
}

describe('the lesion cap setting', () => {
  it('defaults to 1000, as --max-lesions; a mask above a lower cap is refused naming the file and the count', async () => {
    const db = await stored();
    expect(await getSetting(db, 'maxLesions')).toBe(1000);
    // Visit v1's lesion mask holds two lesions, L1 and L2 (fixtures.ts).
    const full = await analysePatient(db, ID, quiet);
    expect(full.visits.find((v) => v.id === 'v1')!.analysis.lesions.map((l) => l.id)).toEqual(['L1', 'L2']);
    await setSetting(db, 'maxLesions', 1);
    await expect(analysePatient(db, ID, quiet)).rejects.toThrow(/v1\/lesions.*holds 2 lesions.*above the cap of 1 lesions per visit/);
    await setSetting(db, 'maxLesions', 2);
    expect((await analysePatient(db, ID, quiet)).visits[0].analysis.lesions).toHaveLength(2);
  });
});

describe('the pseudonym key setting', () => {
  it('is kept on this computer: not in a whole-store backup, and its value never in the edit trail', async () => {
    const db = await stored();
    const key = 'very-secret-key-4711';
    await setSetting(db, 'readerName', 'A. Reader');
    await setSetting(db, 'pseudonymKey', key);
    expect(await getSetting(db, 'pseudonymKey')).toBe(key);
    const bytes = await createBackup(db, 'all');
    const contents = await readBackup(bytes, 'all.falciform');
    expect(contents.tables.settings.map((s) => s.key).sort()).toEqual(['readerName']);
    expect(new TextDecoder('latin1').decode(bytes)).not.toContain(key);
    const trail = (await db.audit.toArray()).filter((a) => a.entityId === 'pseudonymKey');
    expect(trail.map((a) => [a.oldValue, a.newValue])).toEqual([['not set', 'set']]);
    expect(JSON.stringify(await db.audit.toArray())).not.toContain(key);
  });
});
