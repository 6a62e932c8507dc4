import type { Transaction } from 'dexie';
import type { InputRecord, VisitRecord, VolumeRecord } from '../../src/model/records.js';
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
];

export const CURRENT_SCHEMA_VERSION = SCHEMA_VERSIONS[SCHEMA_VERSIONS.length - 1].version;
