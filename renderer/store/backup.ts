import { badFile, badInput } from '../../src/errors.js';
import type { z } from 'zod';
import { describeJsonValue } from '../../src/json-file.js';
import { PRIVATE_SETTINGS, TABLE_NAMES, type AuditRecord, type SettingRecord, type StoreTables, type TableName, type VolumeRecord } from '../../src/model/records.js';
import { VERSION } from '../../src/version.js';
import { HEADER_BYTES_NEEDED, parseNiftiHeader } from '../../src/volume/nifti-header.js';
import { isGzip } from '../../src/volume/nifti-read.js';
import { webInflate } from '../../src/volume/web-gzip.js';
import { RECORD_SCHEMAS, backupIndex, expectedKey, primaryKey, type BackupIndex } from './backup-records.js';
import type { FalciformDb } from './db.js';
import { toExactJson } from './exact-json.js';
import { removePatientRecords } from './patients.js';
import { trailId } from './record-helpers.js';
import { CURRENT_SCHEMA_VERSION, SCHEMA_VERSIONS } from './schema.js';
import { explainWriteFailure } from './write-failure.js';

/*
 * A backup is one file of our own format (docs/backup-format.md):
 *   "FALCIFORM-BACKUP\n" | format version u32 LE | index length u32 LE | index JSON (UTF-8)
 *   | volume bytes, one after another | SHA-256 of everything before it (32 bytes)
 */
const utf8 = new TextEncoder();
const MAGIC = utf8.encode('FALCIFORM-BACKUP\n');
export const BACKUP_FORMAT_VERSION = 1;
export const BACKUP_EXTENSION = 'falciform';
const HEAD_BYTES = MAGIC.length + 8;
const DIGEST_BYTES = 32;

export type BackupTables = { [K in TableName]: StoreTables[K][] };
export type BackupScope = { patientIds: string[] } | 'all';

export interface BackupContents {
  index: Omit<BackupIndex, 'tables'>;
  tables: BackupTables;
}

export interface RestoreResult {
  patients: string[];
  replaced: string[];
}

/** Writes the chosen patients (or the whole store, settings and all) to one backup file's bytes. */
export async function createBackup(db: FalciformDb, scope: BackupScope): Promise<Uint8Array> {
  const tables = await db.transaction('r', db.tables, async () => {
    const out = {} as Record<TableName, object[]>;
    for (const name of TABLE_NAMES) {
      const table = db.table(name);
      // Private settings (the pseudonym key) stay on this computer.
      if (scope === 'all') out[name] = name === 'settings' ? await db.settings.filter((s) => !PRIVATE_SETTINGS.includes(s.key)).toArray() : await table.toArray();
      else if (name === 'settings') out[name] = [];
      else out[name] = await table.where(name === 'patients' ? 'id' : 'patientId').anyOf(scope.patientIds).toArray();
    }
    return out as BackupTables;
  });
  if (scope !== 'all') {
    const found = new Set(tables.patients.map((p) => p.id));
    const lost = scope.patientIds.filter((id) => !found.has(id));
    if (lost.length > 0) throw badInput(`patient ${lost.join(', ')}`, 'is not stored on this computer');
  }
  return encodeBackup(tables, scope === 'all' ? 'all' : 'patients');
}

async function encodeBackup(tables: BackupTables, scope: 'all' | 'patients'): Promise<Uint8Array> {
  let dataBytes = 0;
  const volumes = tables.volumes.map(({ bytes, ...rest }) => {
    const range = { offset: dataBytes, length: bytes.byteLength };
    dataBytes += bytes.byteLength;
    return { ...rest, bytes: range };
  });
  const index: BackupIndex = {
    format: 'falciform-backup',
    schemaVersion: CURRENT_SCHEMA_VERSION,
    app: VERSION,
    createdAt: new Date().toISOString(),
    scope,
    patientIds: tables.patients.map((p) => p.id),
    dataBytes,
    tables: { ...tables, volumes },
  };
  const json = utf8.encode(toExactJson(index, 'the store'));
  const out = new Uint8Array(HEAD_BYTES + json.length + dataBytes + DIGEST_BYTES);
  const view = new DataView(out.buffer);
  out.set(MAGIC, 0);
  view.setUint32(MAGIC.length, BACKUP_FORMAT_VERSION, true);
  view.setUint32(MAGIC.length + 4, json.length, true);
  out.set(json, HEAD_BYTES);
  let at = HEAD_BYTES + json.length;
  for (const v of tables.volumes) {
    out.set(v.bytes, at);
    at += v.bytes.byteLength;
  }
  out.set(new Uint8Array(await crypto.subtle.digest('SHA-256', out.subarray(0, at))), at);
  return out;
}

/**
 * Reads and checks a whole backup before anything is written: the checksum, the index, every
 * record's shape and links, and each volume's NIfTI header against its record. An older schema's
 * records are brought up to the current one.
 */
export async function readBackup(bytes: Uint8Array, file: string): Promise<BackupContents> {
  if (bytes.length < HEAD_BYTES + DIGEST_BYTES || MAGIC.some((b, n) => bytes[n] !== b)) {
    throw badFile(file, 'is not a Falciform backup (it does not start with FALCIFORM-BACKUP)');
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const format = view.getUint32(MAGIC.length, true);
  if (format !== BACKUP_FORMAT_VERSION) {
    throw badFile(file, format > BACKUP_FORMAT_VERSION
      ? `was written in backup format ${format}, newer than this Falciform reads (${BACKUP_FORMAT_VERSION}); update Falciform to restore it`
      : `has an unknown backup format ${format}`);
  }
  const damaged = () => badFile(file, 'is damaged or incomplete: its checksum does not match its contents. Nothing was restored');
  const body = bytes.length - DIGEST_BYTES;
  const digest = new Uint8Array(await crypto.subtle.digest('SHA-256', bytes.subarray(0, body) as Uint8Array<ArrayBuffer>));
  if (digest.some((b, n) => bytes[body + n] !== b)) throw damaged();

  const indexLength = view.getUint32(MAGIC.length + 4, true);
  if (HEAD_BYTES + indexLength > body) throw damaged();
  let raw: unknown;
  try {
    raw = JSON.parse(new TextDecoder('utf-8', { fatal: true }).decode(bytes.subarray(HEAD_BYTES, HEAD_BYTES + indexLength)));
  } catch {
    throw badFile(file, 'has an index that is not valid JSON');
  }
  const parsed = backupIndex.safeParse(raw);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw badFile(file, `has an index whose field ${issue.path.join('.') || '(top)'} ${issue.message}`);
  }
  const { tables: rawTables, ...index } = parsed.data;
  const dataStart = HEAD_BYTES + indexLength;
  if (dataStart + index.dataBytes !== body) throw badFile(file, 'has a data section of the wrong length');
  if (index.schemaVersion > CURRENT_SCHEMA_VERSION) {
    throw badFile(file, `was made with store schema ${index.schemaVersion}, newer than this Falciform's (${CURRENT_SCHEMA_VERSION}); update Falciform to restore it`);
  }
  if (!SCHEMA_VERSIONS.some((v) => v.version === index.schemaVersion)) {
    throw badFile(file, `has an index whose field schemaVersion is ${index.schemaVersion}, a store schema Falciform never had`);
  }
  const unknown = Object.keys(rawTables).filter((t) => !(TABLE_NAMES as readonly string[]).includes(t));
  if (unknown.length > 0) throw badFile(file, `holds table ${unknown[0]}, which this Falciform does not know`);
  const tables = Object.fromEntries(TABLE_NAMES.map((t) => [t, (rawTables[t] ?? []) as object[]])) as Record<TableName, object[]>;
  try {
    for (const v of SCHEMA_VERSIONS) if (v.version > index.schemaVersion) v.upgradeBackup?.(tables);
  } catch {
    // The upgrade reads records not yet checked; a broken one is named by the check below if it survives.
    throw badFile(file, `has records of store schema ${index.schemaVersion} too damaged to bring up to date`);
  }

  checkRecords(tables, index, file);
  const volumes: VolumeRecord[] = [];
  for (const r of tables.volumes as (Omit<VolumeRecord, 'bytes'> & { bytes: { offset: number; length: number } })[]) {
    const { offset, length } = r.bytes;
    if (offset + length > index.dataBytes) throw badFile(file, `volume ${r.key} points past the end of the data`);
    // A copy per volume: stored as a view, each record would carry the whole backup's buffer.
    const data = bytes.slice(dataStart + offset, dataStart + offset + length);
    await checkVolumeBytes(data, r, file);
    volumes.push({ ...r, bytes: data });
  }
  return { index, tables: { ...(tables as unknown as BackupTables), volumes } };
}

function checkRecords(tables: Record<TableName, object[]>, index: Omit<BackupIndex, 'tables'>, file: string): void {
  // Patients come first in TABLE_NAMES: their records are checked before any other record's owner is looked up.
  const patientIds = new Set(tables.patients.map((p) => (p as { id: string }).id));
  if (index.scope === 'patients' && tables.settings.length > 0) throw badFile(file, 'holds settings in a backup of single patients');
  for (const name of TABLE_NAMES) {
    const keys = new Set<string>();
    tables[name].forEach((record, n) => {
      let r: ReturnType<z.ZodType['safeParse']>;
      try {
        r = RECORD_SCHEMAS[name].safeParse(record);
      } catch {
        // Only a value nested thousands deep (which JSON.parse accepts) runs the check out of stack.
        throw badFile(file, `${name} record ${n + 1}: holds a value nested too deeply to be a Falciform record`);
      }
      if (!r.success) {
        const issue = r.error.issues[0];
        const path = issue.code === 'unrecognized_keys' ? [...issue.path, issue.keys[0]] : issue.path;
        throw badFile(file, `${recordName(name, record, n)}: field ${path.join('.') || '(record)'} ${issue.message}`);
      }
      const rec = record as Record<string, unknown>;
      const key = primaryKey(name, rec);
      const expected = expectedKey(name, rec);
      if (expected !== null && expected !== key) throw badFile(file, `${recordName(name, record, n)}: field key is ${describeJsonValue(key)} but its other fields make it ${describeJsonValue(expected)}`);
      if (keys.has(key)) throw badFile(file, `${name} record ${key} appears twice`);
      keys.add(key);
      const owner = rec.patientId;
      if (name !== 'patients' && name !== 'settings' && owner !== undefined && !patientIds.has(owner as string)) {
        throw badFile(file, `${name} record ${key} belongs to patient ${String(owner)}, who is not in the backup`);
      }
      if (name !== 'patients' && name !== 'settings' && name !== 'audit' && owner === undefined) {
        throw badFile(file, `${name} record ${key} belongs to no patient`);
      }
    });
    if (name === 'patients' && (index.patientIds.length !== patientIds.size || index.patientIds.some((id) => !patientIds.has(id)))) {
      throw badFile(file, 'lists patients in its index that differ from the patient records it holds');
    }
  }
}

/** "settings record 2 (windowPresets)": the record's place, and its key when it has a readable one. */
function recordName(table: TableName, record: unknown, n: number): string {
  const r = (record ?? {}) as Record<string, unknown>;
  const key = table === 'visits' || table === 'treatments' ? r.id : (r.key ?? r.id);
  return `${table} record ${n + 1}${typeof key === 'string' && key.length <= 80 ? ` (${key})` : ''}`;
}

async function checkVolumeBytes(data: Uint8Array, r: Omit<VolumeRecord, 'bytes'>, file: string): Promise<void> {
  const bad = (problem: string) => badFile(file, `volume ${r.key} (${r.fileName}) ${problem}`);
  if (!isGzip(data)) throw bad('is not gzip-compressed');
  let head: Uint8Array;
  try {
    head = await webInflate(data, HEADER_BYTES_NEEDED);
  } catch {
    throw bad('cannot be decompressed');
  }
  let dims: number[];
  try {
    dims = parseNiftiHeader(head, r.fileName).info.dims;
  } catch (e) {
    throw bad(`has no valid NIfTI header (${(e as Error).message})`);
  }
  if (dims.join('×') !== r.dims.join('×')) throw bad(`has dimensions ${dims.join('×')} but its record says ${r.dims.join('×')}`);
}

/** Stored patients that a restore of these contents would meet. */
export async function restoreConflicts(db: FalciformDb, contents: BackupContents): Promise<string[]> {
  const ids = contents.tables.patients.map((p) => p.id);
  return (await db.patients.bulkGet(ids)).filter((p) => p !== undefined).map((p) => p.id);
}

/**
 * Writes checked backup contents in one transaction. Patients already stored are refused unless
 * `replace` is set; then their stored records are removed first, in the same transaction. Settings
 * (only in a whole-store backup) overwrite the stored ones. Each restored patient gains one trail
 * entry saying so. Any failure writes nothing.
 */
export async function restoreBackup(db: FalciformDb, contents: BackupContents, opts: { replace?: boolean; file?: string } = {}): Promise<RestoreResult> {
  const ids = contents.tables.patients.map((p) => p.id);
  try {
    return await db.transaction('rw', db.tables, async () => {
      const present = (await db.patients.bulkGet(ids)).filter((p) => p !== undefined).map((p) => p.id);
      if (present.length > 0 && !opts.replace) {
        throw badInput(
          `patient${present.length > 1 ? 's' : ''} ${present.join(', ')}`,
          'already stored on this computer; nothing was restored. Restore again and choose to replace them',
        );
      }
      for (const id of present) await removePatientRecords(db, id);
      // Corrections are keyed by their id alone: one taken by another stored patient is refused, never replaced.
      const taken = (await db.overrides.bulkGet(contents.tables.overrides.map((o) => o.id))).find((o) => o !== undefined);
      if (taken) {
        throw badInput(`correction ${taken.id}`, `has the id of a stored correction of patient ${taken.patientId}; nothing was restored`);
      }
      for (const name of TABLE_NAMES) {
        const rows = contents.tables[name] as object[];
        if (name === 'audit') await db.audit.bulkAdd(await trailToAdd(db, contents.tables.audit));
        // Settings come only in a whole-store backup, and replace the stored ones.
        else if (name === 'settings') await db.settings.bulkPut(rows as SettingRecord[]);
        else await db.table(name).bulkAdd(rows);
      }
      const at = new Date().toISOString();
      const trail: AuditRecord[] = ids.map((id) => ({
        id: trailId(), at, patientId: id, entity: 'patient', entityId: id, field: '*', action: 'restore',
        oldValue: present.includes(id) ? 'replaced' : null, newValue: { backupCreatedAt: contents.index.createdAt },
      }));
      await db.audit.bulkAdd(trail);
      return { patients: ids, replaced: present };
    });
  } catch (e) {
    throw explainWriteFailure(e, opts.file ?? 'the backup', 'restored');
  }
}

/**
 * The backup's trail entries as they may be added: one already stored unchanged (an earlier restore
 * of the same file) is left as it is; one whose id is taken by a different entry (another patient's,
 * or an edit made since) gets a fresh id at its own time, so no stored entry is ever replaced.
 */
async function trailToAdd(db: FalciformDb, entries: AuditRecord[]): Promise<AuditRecord[]> {
  const stored = await db.audit.bulkGet(entries.map((a) => a.id));
  const out: AuditRecord[] = [];
  entries.forEach((entry, n) => {
    const there = stored[n];
    if (there === undefined) out.push(entry);
    else if (canonical(there) !== canonical(entry)) out.push({ ...entry, id: trailId(Date.parse(entry.at)) });
  });
  return out;
}

/** JSON with object keys sorted, to compare records whatever order their fields were written in. */
function canonical(value: unknown): string {
  return JSON.stringify(value, (_k, v: unknown) =>
    v !== null && typeof v === 'object' && !Array.isArray(v)
      ? Object.fromEntries(Object.entries(v as Record<string, unknown>).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)))
      : v);
}

/** A file name for a backup of these patients (or of everything) made today. */
export function backupFileName(scope: BackupScope, today = new Date().toISOString().slice(0, 10)): string {
  const who = scope === 'all' ? 'all-patients' : scope.patientIds.length === 1 ? scope.patientIds[0] : `${scope.patientIds.length}-patients`;
  return `falciform-backup-${who}-${today}.${BACKUP_EXTENSION}`;
}
