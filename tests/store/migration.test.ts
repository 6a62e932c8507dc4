import 'fake-indexeddb/auto';
import { Dexie } from 'dexie';
import { afterEach, describe, expect, it } from 'vitest';
import { FalciformDb, declareVersions } from '../../renderer/store/db.js';
import { listPatients, patientTrail } from '../../renderer/store/patients.js';
import { CURRENT_SCHEMA_VERSION, SCHEMA_VERSIONS } from '../../renderer/store/schema.js';
import { recordBytes } from '../../src/model/storage-size.js';
import { dbName, dropAll, track } from './dump.js';
import { gz, scanVolume, centredAffine } from './fixtures.js';

afterEach(dropAll);

/**
 * The stores of each released schema version, copied here when it was released. Editing a released
 * version in schema.ts would leave users' databases behind; this copy makes that fail a test.
 */
const RELEASED: Record<number, Record<string, string | null>> = {
  1: {
    patients: 'id',
    visits: '[patientId+id], patientId, date',
    volumes: 'key, patientId, [patientId+visitId]',
    inputs: 'key, patientId, [patientId+visitId]',
    lesions: 'key, patientId, [patientId+visitId]',
    tracks: 'key, patientId',
    overrides: 'id, patientId',
    treatments: '[patientId+id], patientId',
    settings: 'key',
    audit: 'id, at, patientId',
  },
  2: { audit: 'id, at, patientId, [patientId+at]' },
  3: {},
};

const scanBytes = gz(scanVolume([20, 16, 12], centredAffine([20, 16, 12], [2, 2, 2], [0, 0, 0]), []), 'int16');

/** Records as each earlier version wrote them; the checks say what the current code must find. */
const WRITTEN_BY: Record<number, { records: Record<string, object[]>; check: (db: FalciformDb) => Promise<void> }> = {
  1: {
    records: {
      patients: [{ id: 'OLD-1', marginMm: 8, createdAt: '2026-01-02T10:00:00.000Z' }],
      visits: [{ patientId: 'OLD-1', id: 'v1', date: '2026-01-01', volumes: ['scan'], inputs: ['marks'] }],
      volumes: [{
        key: 'OLD-1/v1/scan', patientId: 'OLD-1', visitId: 'v1', role: 'scan', fileName: 'scan.nii.gz', bytes: scanBytes,
        dims: [20, 16, 12], affine: centredAffine([20, 16, 12], [2, 2, 2], [0, 0, 0]), datatype: 'int16', volumeBytes: 7680, importedBytes: scanBytes.length,
      }],
      inputs: [{ key: 'OLD-1/v1/marks', patientId: 'OLD-1', visitId: 'v1', kind: 'marks', fileName: 'marks.json', text: '{"marks": []}' }],
      settings: [{ key: 'marginMm', value: 8 }],
      audit: [
        { id: 'a2', at: '2026-01-03T00:00:00.000Z', patientId: 'OLD-1', entity: 'patient', entityId: 'OLD-1', field: 'marginMm', oldValue: 10, newValue: 8, action: 'update' },
        { id: 'a1', at: '2026-01-02T10:00:00.000Z', patientId: 'OLD-1', entity: 'patient', entityId: 'OLD-1', field: '*', oldValue: null, newValue: null, action: 'import' },
      ],
    },
    async check(db) {
      const [row] = await listPatients(db);
      expect(row.patient).toEqual({ id: 'OLD-1', marginMm: 8, createdAt: '2026-01-02T10:00:00.000Z' });
      const visit = await db.visits.get(['OLD-1', 'v1']);
      const volume = await db.volumes.get('OLD-1/v1/scan');
      const input = await db.inputs.get('OLD-1/v1/marks');
      expect(volume!.bytes).toEqual(scanBytes);
      // Version 2 added each visit's stored size, computed from what version 1 had stored.
      const { storedBytes, ...own } = visit!;
      expect(storedBytes).toBe(recordBytes(own) + recordBytes(volume!) + recordBytes(input!));
      expect(row.storedBytes).toBe(storedBytes);
      // ... and the per-patient, time-ordered trail index.
      expect((await patientTrail(db, 'OLD-1')).map((a) => a.id)).toEqual(['a1', 'a2']);
      expect(await db.settings.get('marginMm')).toEqual({ key: 'marginMm', value: 8 });
    },
  },
  2: {
    // Tracks were numbered T1, T2, … then: targets, corrections and reader calls named them so.
    records: {
      patients: [{ id: 'OLD-2', marginMm: 10, createdAt: '2026-02-02T10:00:00.000Z', targets: ['T1', 'T27'] }],
      visits: [
        { patientId: 'OLD-2', id: 'v1', date: '2026-02-01', volumes: [], inputs: [], storedBytes: 100 },
        { patientId: 'OLD-2', id: 'v2', date: '2026-04-01', volumes: [], inputs: [], storedBytes: 120, readerCalls: { confirmedGone: ['T3', 'v1:L2'], nonTarget: 'present' } },
      ],
      tracks: [{ key: 'OLD-2/T2', patientId: 'OLD-2', id: 'T2', lesions: { v1: 'L2' }, target: false }],
      overrides: [
        { id: 'o-1', patientId: 'OLD-2', kind: 'link', visit: 'v2', lesion: 'L4', track: 'T2', at: '2026-04-02T09:00:00.000Z' },
        { id: 'o-2', patientId: 'OLD-2', kind: 'link', visit: 'v2', lesion: 'L5', track: 'v1:L1', at: '2026-04-02T09:01:00.000Z' },
        { id: 'o-3', patientId: 'OLD-2', kind: 'new', visit: 'v2', lesion: 'L6', at: '2026-04-02T09:02:00.000Z' },
      ],
      audit: [
        { id: 'a1', at: '2026-04-02T09:00:00.000Z', patientId: 'OLD-2', entity: 'patient', entityId: 'OLD-2', field: 'targets', oldValue: null, newValue: ['T1', 'T27'], action: 'update' },
      ],
    },
    async check(db) {
      // Version 3 letters the tracks: T1 → A, T2 → B, T3 → C, T27 → AA; "v1:L1" names a track by its lesion and stays.
      expect((await db.patients.get('OLD-2'))!.targets).toEqual(['A', 'AA']);
      expect((await db.visits.get(['OLD-2', 'v2']))!.readerCalls).toEqual({ confirmedGone: ['C', 'v1:L2'], nonTarget: 'present' });
      expect((await db.visits.get(['OLD-2', 'v1']))!.readerCalls).toBeUndefined();
      expect(await db.tracks.toArray()).toEqual([{ key: 'OLD-2/B', patientId: 'OLD-2', id: 'B', lesions: { v1: 'L2' }, target: false }]);
      expect((await db.overrides.toArray()).map((o) => [o.id, o.track])).toEqual([['o-1', 'B'], ['o-2', 'v1:L1'], ['o-3', undefined]]);
      // The trail is history: it keeps the names the reader saw then.
      expect((await patientTrail(db, 'OLD-2'))[0].newValue).toEqual(['T1', 'T27']);
    },
  },
};

describe('schema versions', () => {
  it('released versions are unchanged and numbered 1, 2, …', () => {
    expect(SCHEMA_VERSIONS.map((v) => v.version)).toEqual(SCHEMA_VERSIONS.map((_, n) => n + 1));
    for (const v of SCHEMA_VERSIONS) expect(v.stores, `version ${v.version}`).toEqual(RELEASED[v.version]);
  });

  for (const old of SCHEMA_VERSIONS.slice(0, -1)) {
    it(`opens a database written by version ${old.version} and finds its data`, async () => {
      const fixture = WRITTEN_BY[old.version];
      expect(fixture, `records written by version ${old.version}`).toBeDefined();
      const name = dbName(`v${old.version}`);
      // That version's app: only the schema versions it knew.
      const before = track(new Dexie(name));
      declareVersions(before, SCHEMA_VERSIONS.filter((v) => v.version <= old.version));
      await before.open();
      await before.transaction('rw', before.tables, async () => {
        for (const [table, rows] of Object.entries(fixture.records)) await before.table(table).bulkAdd(rows);
      });
      before.close();

      const db = track(new FalciformDb(name));
      await db.open();
      expect(db.verno).toBe(CURRENT_SCHEMA_VERSION);
      await fixture.check(db);
    });
  }
});
