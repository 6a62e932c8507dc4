import { z } from 'zod';
import { INPUT_KINDS, VOLUME_ROLES, type TableName } from '../../src/model/records.js';

/**
 * The shape each table's records must have to be restored. Fields beyond these are kept as they
 * are (a backup restores exactly what it holds); these are the ones the app relies on.
 */
const id = z.string().min(1).max(200);
const text = z.string();

/** Where a volume's bytes lie in the backup's data section. */
export const byteRange = z.strictObject({ offset: z.int().nonnegative(), length: z.int().positive() });

export const RECORD_SCHEMAS: Record<TableName, z.ZodType> = {
  patients: z.looseObject({ id, marginMm: z.number().nonnegative(), createdAt: text }),
  visits: z.looseObject({
    patientId: id, id, date: text, volumes: z.array(z.enum(VOLUME_ROLES)), inputs: z.array(z.enum(INPUT_KINDS)),
    storedBytes: z.number().nonnegative(),
  }),
  volumes: z.looseObject({
    key: text, patientId: id, visitId: id, role: z.enum(VOLUME_ROLES), fileName: text, bytes: byteRange,
    dims: z.array(z.int().positive()).min(1).max(7), affine: z.array(z.number()).length(16),
    datatype: z.enum(['uint8', 'int8', 'int16', 'uint16', 'int32', 'uint32', 'float32', 'float64']),
    volumeBytes: z.int().nonnegative(), importedBytes: z.int().nonnegative(),
  }),
  inputs: z.looseObject({ key: text, patientId: id, visitId: id, kind: z.enum(INPUT_KINDS), fileName: text, text }),
  lesions: z.looseObject({ key: text, patientId: id, visitId: id, id }),
  tracks: z.looseObject({ key: text, patientId: id, id, lesions: z.record(z.string(), z.string()), target: z.boolean() }),
  overrides: z.looseObject({ id, patientId: id, kind: z.enum(['link', 'unlink', 'new']), visit: id, lesion: id, at: text }),
  treatments: z.looseObject({ patientId: id, id, date: text, kind: text, label: text }),
  settings: z.looseObject({ key: id, value: z.unknown() }),
  audit: z.looseObject({
    id, at: text, patientId: id.optional(), entity: text, entityId: text, field: text, action: text,
    oldValue: z.unknown(), newValue: z.unknown(),
  }),
};

/** The backup's JSON index (see docs/backup-format.md). */
export const backupIndex = z.strictObject({
  format: z.literal('falciform-backup'),
  schemaVersion: z.int().positive(),
  app: text,
  createdAt: text,
  scope: z.enum(['patients', 'all']),
  patientIds: z.array(id),
  dataBytes: z.int().nonnegative(),
  tables: z.record(z.string(), z.array(z.unknown())),
});
export type BackupIndex = z.output<typeof backupIndex>;

/** Primary key of a record, as its table declares it, for duplicate checks. */
export function primaryKey(table: TableName, r: Record<string, unknown>): string {
  switch (table) {
    case 'visits':
    case 'treatments':
      return `${String(r.patientId)}/${String(r.id)}`;
    case 'volumes':
    case 'inputs':
    case 'lesions':
    case 'tracks':
    case 'settings':
      return String(r.key);
    default:
      return String(r.id);
  }
}
