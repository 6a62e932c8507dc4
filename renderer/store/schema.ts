import type { Transaction } from 'dexie';
import { currentTrackRef } from '../../src/followup/ids.js';
import type { InputRecord, OverrideRecord, PatientRecord, TrackRecord, VisitRecord, VolumeRecord } from '../../src/model/records.js';
import { recordBytes, visitStoredBytes } from '../../src/model/storage-size.js';

/**
 * The store's schema, one entry per version, as data. A version once released is never edited:
 * a change is a new entry with the tables it changes and, when stored records need rewriting, an
 * upgrade. `upgradeBackup` does the same rewrite on a backup's records, so an older backup file
 * restores into the current schema.
 */
export interface SchemaVersion {
  version: number;
  why: string;
  /** Dexie store strings of the tables this version adds or changes (null deletes a table). */
  stores: Record<string, string | null>;
  upgrade?: (tx: Transaction) => Promise<void>;
  upgradeBackup?: (tables: Record<string, object[]>) => void;
}

export const SCHEMA_VERSIONS: readonly SchemaVersion[] = [
  {
    version: 1,
    why: 'first store: patients, visits, compressed volumes in a table of their own, inputs, lesions, tracks, overrides, treatments, settings, audit trail',
    stores: {
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
  },
  {
    version: 2,
    why:
      'the patient list shows each visit\'s stored size without loading volumes (visits gain storedBytes); ' +
      'a patient\'s edit trail is read in time order through an index (audit gains [patientId+at])',
    stores: {
      audit: 'id, at, patientId, [patientId+at]',
    },
    async upgrade(tx) {
      // One volume at a time through a cursor: the upgrade never holds more than one scan in memory.
      const sizes = new Map<string, number>();
      const add = (patientId: string, visitId: string, n: number) => {
        const k = `${patientId}/${visitId}`;
        sizes.set(k, (sizes.get(k) ?? 0) + n);
      };
      await tx.table<VolumeRecord>('volumes').each((v) => add(v.patientId, v.visitId, recordBytes(v)));
      await tx.table<InputRecord>('inputs').each((i) => add(i.patientId, i.visitId, recordBytes(i)));
      await tx.table<VisitRecord>('visits').toCollection().modify((visit) => {
        visit.storedBytes = visitStoredBytes(visit, [], []) + (sizes.get(`${visit.patientId}/${visit.id}`) ?? 0);
      });
    },
    upgradeBackup(tables) {
      const visits = (tables.visits ?? []) as VisitRecord[];
      const volumes = (tables.volumes ?? []) as VolumeRecord[];
      const inputs = (tables.inputs ?? []) as InputRecord[];
      for (const visit of visits) {
        const mine = <T extends { patientId: string; visitId: string }>(r: T) => r.patientId === visit.patientId && r.visitId === visit.id;
        visit.storedBytes = visitStoredBytes(visit, volumes.filter(mine), inputs.filter(mine));
      }
    },
  },
  {
    version: 3,
    why:
      'lesion tracks are lettered A, B, … instead of numbered T1, T2, … (a "T" number reads as "target" or an MR ' +
      'sequence): stored targets, corrections and reader calls that name a track by its old number are rewritten',
    stores: {},
    async upgrade(tx) {
      await tx.table<PatientRecord>('patients').toCollection().modify((p) => { letterPatient(p); });
      await tx.table<OverrideRecord>('overrides').toCollection().modify((o) => { letterOverride(o); });
      await tx.table<VisitRecord>('visits').toCollection().modify((v) => { letterVisit(v); });
      // Track records are keyed by their id, so a renamed one is a new key.
      const tracks = tx.table<TrackRecord, string>('tracks');
      const old = await tracks.toArray();
      for (const t of old) {
        const id = currentTrackRef(t.id);
        if (id === t.id) continue;
        await tracks.delete(t.key);
        await tracks.put({ ...t, id, key: `${t.patientId}/${id}` });
      }
    },
    upgradeBackup(tables) {
      for (const p of (tables.patients ?? []) as PatientRecord[]) letterPatient(p);
      for (const o of (tables.overrides ?? []) as OverrideRecord[]) letterOverride(o);
      for (const v of (tables.visits ?? []) as VisitRecord[]) letterVisit(v);
      for (const t of (tables.tracks ?? []) as TrackRecord[]) {
        t.id = currentTrackRef(t.id);
        t.key = `${t.patientId}/${t.id}`;
      }
    },
  },
];

// Version 3: a track named by its old number ("T3") is renamed to its letter ("C"); "v1:L2" is kept.
function letterPatient(p: PatientRecord): void {
  if (p.targets) p.targets = p.targets.map(currentTrackRef);
}
function letterOverride(o: OverrideRecord): void {
  if (o.track !== undefined) o.track = currentTrackRef(o.track);
}
function letterVisit(v: VisitRecord): void {
  const gone = v.readerCalls?.confirmedGone;
  if (v.readerCalls && gone) v.readerCalls = { ...v.readerCalls, confirmedGone: gone.map(currentTrackRef) };
}

export const CURRENT_SCHEMA_VERSION = SCHEMA_VERSIONS[SCHEMA_VERSIONS.length - 1].version;
