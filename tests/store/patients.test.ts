import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it } from 'vitest';
import { FalciformDb } from '../../renderer/store/db.js';
import { commitImport, readImport } from '../../renderer/store/import.js';
import { deletePatient, getSetting, listPatients, patientTrail, setSetting, updatePatient } from '../../renderer/store/patients.js';
import { DEFAULT_SETTINGS, TABLE_NAMES } from '../../src/model/records.js';
import { dbName, dropAll, dump, track } from './dump.js';
import { patientFolder } from './fixtures.js';

afterEach(dropAll);

async function twoPatients(): Promise<FalciformDb> {
  const db = track(new FalciformDb(dbName('patients')));
  await commitImport(db, await readImport([...patientFolder({ id: 'KEEP-1', root: 'k', oneVisit: true }), ...patientFolder({ id: 'GONE-1', root: 'g' })]));
  for (const id of ['KEEP-1', 'GONE-1']) {
    await db.lesions.add({
      key: `${id}/v1/L1`, patientId: id, visitId: 'v1', id: 'L1', source: 'mask', centroidMm: [1, 2, 3], segment: 'V',
      longestAxialMm: 12, shortAxisMm: 9, marginMm: 4, nearestOtherSegment: 'VIII', marginAlert: true,
    });
    await db.tracks.add({ key: `${id}/A`, patientId: id, id: 'A', lesions: { v1: 'L1' }, target: true });
    await db.overrides.add({ id: `o-${id}`, patientId: id, kind: 'new', visit: 'v1', lesion: 'L1', at: '2026-04-01T00:00:00.000Z' });
  }
  return db;
}

describe('patients', () => {
  it('deleting a patient removes all its records from every table and nothing of anyone else', async () => {
    const db = await twoPatients();
    await setSetting(db, 'marginMm', 8);
    const before = await dump(db);
    const removed = await deletePatient(db, 'GONE-1');
    expect(removed).toMatchObject({ patients: 1, visits: 2, volumes: 5, inputs: 2, lesions: 1, tracks: 1, overrides: 1, treatments: 1 });
    const after = await dump(db);
    const belongs = (r: unknown) => (r as { patientId?: string }).patientId === 'GONE-1' || (r as { id?: string }).id === 'GONE-1';
    for (const table of TABLE_NAMES) {
      expect(after[table].filter(belongs), table).toEqual([]);
      if (table !== 'audit') expect(after[table], table).toEqual(before[table].filter((r) => !belongs(r)));
    }
    // The trail keeps one unlinked line saying the patient was deleted.
    const deletion = after.audit.filter((a) => (a as { action: string }).action === 'delete');
    expect(deletion).toEqual([expect.objectContaining({ entity: 'patient', entityId: 'GONE-1', oldValue: { visits: 2, volumes: 5 }, newValue: null })]);
    expect(deletion[0]).not.toHaveProperty('patientId');
    expect((await listPatients(db)).map((p) => p.patient.id)).toEqual(['KEEP-1']);
  });

  it('every edit leaves a trail entry with the old and new value, in time order', async () => {
    const db = await twoPatients();
    await updatePatient(db, 'KEEP-1', { marginMm: 15, label: 'ward B', birthYear: 1958 });
    await updatePatient(db, 'KEEP-1', { label: undefined });
    const trail = await patientTrail(db, 'KEEP-1');
    expect(trail.filter((a) => a.action === 'update').map((a) => [a.field, a.oldValue, a.newValue])).toEqual([
      ['marginMm', 10, 15],
      ['label', null, 'ward B'],
      ['label', 'ward B', null],
    ]);
    expect(trail.map((a) => a.at)).toEqual([...trail.map((a) => a.at)].sort());
    expect(await db.patients.get('KEEP-1')).not.toHaveProperty('label');
  });

  it('settings start at their defaults and their changes are on the trail', async () => {
    const db = await twoPatients();
    expect(await getSetting(db, 'windowPresets')).toEqual(DEFAULT_SETTINGS.windowPresets);
    await setSetting(db, 'marginMm', 5);
    expect(await getSetting(db, 'marginMm')).toBe(5);
    const entry = (await db.audit.toArray()).find((a) => a.entity === 'setting');
    expect(entry).toMatchObject({ entityId: 'marginMm', oldValue: 10, newValue: 5, action: 'update' });
  });

  it('a stored setting the app cannot use reads as its default instead of reaching a screen', async () => {
    const db = await twoPatients();
    await db.settings.bulkPut([{ key: 'windowPresets', value: 'Liver' }, { key: 'readerName', value: { name: 'Dr A' } }, { key: 'marginMm', value: -3 }]);
    expect(await getSetting(db, 'windowPresets')).toEqual(DEFAULT_SETTINGS.windowPresets);
    expect(await getSetting(db, 'readerName')).toBe('');
    expect(await getSetting(db, 'marginMm')).toBe(10);
  });
});
