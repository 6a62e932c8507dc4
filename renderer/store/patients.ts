import { badInput } from '../../src/errors.js';
import {
  DEFAULT_SETTINGS, PRIVATE_SETTINGS, type AuditRecord, type JsonValue, type PatientRecord,
} from '../../src/model/records.js';
import { SETTING_SCHEMAS } from './backup-records.js';
import type { FalciformDb } from './db.js';
import { trailId } from './record-helpers.js';

/** A row of the patient list: the patient and what its visits add up to, without any volume loaded. */
export interface PatientSummary {
  patient: PatientRecord;
  visitCount: number;
  firstVisit: string | null;
  lastVisit: string | null;
  storedBytes: number;
}

export async function listPatients(db: FalciformDb): Promise<PatientSummary[]> {
  const [patients, visits] = await db.transaction('r', db.patients, db.visits, () => Promise.all([db.patients.toArray(), db.visits.toArray()]));
  const rows = new Map<string, PatientSummary>(
    patients.map((patient) => [patient.id, { patient, visitCount: 0, firstVisit: null, lastVisit: null, storedBytes: 0 }]),
  );
  for (const v of visits) {
    const row = rows.get(v.patientId);
    if (!row) continue;
    row.visitCount++;
    row.storedBytes += v.storedBytes;
    if (row.firstVisit === null || v.date < row.firstVisit) row.firstVisit = v.date;
    if (row.lastVisit === null || v.date > row.lastVisit) row.lastVisit = v.date;
  }
  return [...rows.values()].sort((a, b) => a.patient.id.localeCompare(b.patient.id));
}

export function getPatient(db: FalciformDb, id: string): Promise<PatientRecord | undefined> {
  return db.patients.get(id);
}

/** Counts of the records a patient deletion removed, table by table. */
export type Removed = Record<string, number>;

/**
 * Removes a patient and everything stored for it, its own edit trail included, in one transaction.
 * One trail entry without a patient link remains to say that (and when) the patient was deleted.
 */
export async function deletePatient(db: FalciformDb, id: string): Promise<Removed> {
  return db.transaction('rw', db.tables, async () => {
    const patient = await db.patients.get(id);
    if (!patient) throw badInput(`patient ${id}`, 'is not stored on this computer');
    const removed = await removePatientRecords(db, id);
    await db.audit.add(trailEntry({
      entity: 'patient', entityId: id, field: '*', action: 'delete',
      oldValue: { visits: removed.visits, volumes: removed.volumes }, newValue: null,
    }));
    return removed;
  });
}

/** Deletes every record of a patient; call inside a transaction over all tables. */
export async function removePatientRecords(db: FalciformDb, id: string): Promise<Removed> {
  const removed: Removed = {};
  for (const table of db.tables) {
    if (table.name === 'settings') continue;
    removed[table.name] = table.name === 'patients'
      ? await table.where('id').equals(id).delete()
      : await table.where('patientId').equals(id).delete();
  }
  return removed;
}

/** The fields of a patient a user may change after import. */
export type PatientEdit = Partial<Pick<PatientRecord, 'label' | 'birthYear' | 'heightCm' | 'weightKg' | 'sex' | 'marginMm' | 'criteria' | 'targets' | 'resection'>>;

/** Changes a patient's details; each changed field leaves a trail entry with its old and new value. */
export async function updatePatient(db: FalciformDb, id: string, changes: PatientEdit): Promise<PatientRecord> {
  return db.transaction('rw', db.patients, db.audit, async () => {
    const before = await db.patients.get(id);
    if (!before) throw badInput(`patient ${id}`, 'is not stored on this computer');
    const after: PatientRecord = { ...before };
    const bag = after as unknown as Record<string, unknown>;
    for (const [field, value] of Object.entries(changes)) {
      const old = (before as unknown as Record<string, unknown>)[field];
      if (JSON.stringify(old) === JSON.stringify(value)) continue;
      if (value === undefined) delete bag[field];
      else bag[field] = value;
      await recordEdit(db, {
        patientId: id, entity: 'patient', entityId: id, field, action: 'update',
        oldValue: toJson(old), newValue: toJson(value),
      });
    }
    await db.patients.put(after);
    return after;
  });
}

/** One edit as the caller describes it; the trail adds when it happened and an id. */
export type Edit = Omit<AuditRecord, 'id' | 'at'>;

/** Adds one trail entry. Call it inside the transaction that makes the change, so both or neither land. */
export async function recordEdit(db: FalciformDb, edit: Edit): Promise<AuditRecord> {
  const entry = trailEntry(edit);
  await db.audit.add(entry);
  return entry;
}

/** A patient's edit trail, oldest first. */
export function patientTrail(db: FalciformDb, patientId: string): Promise<AuditRecord[]> {
  return db.audit.where('[patientId+at]').between([patientId, ''], [patientId, '\uffff']).toArray();
}

export type SettingKey = keyof typeof DEFAULT_SETTINGS;

export async function getSetting<K extends SettingKey>(db: FalciformDb, key: K): Promise<(typeof DEFAULT_SETTINGS)[K]> {
  const row = await db.settings.get(key);
  // A value the app cannot use (written before restores were checked) reads as the default rather than breaking a screen.
  const parsed = row ? SETTING_SCHEMAS[key].safeParse(row.value) : undefined;
  return parsed?.success ? parsed.data : DEFAULT_SETTINGS[key];
}

export async function setSetting<K extends SettingKey>(db: FalciformDb, key: K, value: (typeof DEFAULT_SETTINGS)[K]): Promise<void> {
  await db.transaction('rw', db.settings, db.audit, async () => {
    const old = await getSetting(db, key);
    const json = value as unknown as JsonValue;
    await db.settings.put({ key, value: json });
    // A private setting's trail entry says that it changed, never what it holds.
    const shown = (v: JsonValue): JsonValue => (PRIVATE_SETTINGS.includes(key) ? (v === '' ? 'not set' : 'set') : v);
    await recordEdit(db, { entity: 'setting', entityId: key, field: 'value', action: 'update', oldValue: shown(old as unknown as JsonValue), newValue: shown(json) });
  });
}

function trailEntry(edit: Edit): AuditRecord {
  const { patientId, ...rest } = edit;
  return { id: trailId(), at: new Date().toISOString(), ...(patientId === undefined ? {} : { patientId }), ...rest };
}

function toJson(value: unknown): JsonValue {
  return value === undefined ? null : (JSON.parse(JSON.stringify(value)) as JsonValue);
}
