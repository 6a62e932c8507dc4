import { z } from 'zod';
import { isoDate, protocol, readerCalls, resection } from '../../src/manifest/manifest.js';
import { DEFAULT_SETTINGS, INPUT_KINDS, VOLUME_ROLES, type TableName } from '../../src/model/records.js';

/**
 * The full shape of every record the store keeps (src/model/records.ts), field by field, with the
 * ranges the app itself allows. A backup's records are parsed with these before anything is written,
 * so a hostile or hand-edited file is refused with the field it got wrong instead of stored and
 * later breaking a screen. A field the model does not have is refused too: what is restored is
 * exactly what the app knows how to show.
 */
const id = z.string().min(1).max(200);
const text = z.string().max(100_000);
// File and folder names as imported: a path, so as long as a file system allows.
const name = z.string().max(4096);
/** An ISO date-time as `toISOString` writes it. */
const isoTime = z.iso.datetime();
const finite = z.number();
const mm = z.number().nonnegative().max(1000);
const json = z.json();

/** Where a volume's bytes lie in the backup's data section. */
export const byteRange = z.strictObject({ offset: z.int().nonnegative(), length: z.int().positive() });

const dicomFacts = z.strictObject({
  seriesUid: z.string().min(1).max(64),
  studyDate: z.string().max(16).optional(),
  modality: z.string().max(16).optional(),
  seriesDescription: z.string().max(1000).optional(),
  sliceThicknessMm: z.number().positive().max(1000).optional(),
  contrastAgent: z.string().max(1000).optional(),
  kvp: z.number().nonnegative().max(1000).optional(),
  manufacturerModel: z.string().max(1000).optional(),
});

/** Settings the app knows, each with the values it can use; an unknown key is refused. */
export const SETTING_SCHEMAS: { [K in keyof typeof DEFAULT_SETTINGS]: z.ZodType<(typeof DEFAULT_SETTINGS)[K]> } = {
  marginMm: z.number().nonnegative().max(100),
  readerName: z.string().max(120),
  maxLesions: z.number().int().min(1).max(1_000_000),
  pseudonymKey: z.string().max(1000),
  demoOffered: z.boolean(),
  windowPresets: z.array(z.strictObject({
    name: z.string().min(1).max(40),
    centre: z.number().min(-100_000).max(100_000),
    width: z.number().positive().max(200_000),
  })).max(40),
};

const setting = z.strictObject({ key: id, value: json }).superRefine((s, ctx) => {
  const schema = (SETTING_SCHEMAS as Record<string, z.ZodType>)[s.key];
  if (!schema) {
    ctx.addIssue({ code: 'custom', path: ['key'], message: `names setting "${s.key}", which this Falciform does not know` });
    return;
  }
  const r = schema.safeParse(s.value);
  if (!r.success) for (const issue of r.error.issues) ctx.addIssue({ code: 'custom', path: ['value', ...issue.path], message: issue.message });
});

export const RECORD_SCHEMAS: Record<TableName, z.ZodType> = {
  patients: z.strictObject({
    id,
    label: z.string().max(200).optional(),
    birthYear: z.int().min(1900).max(2100).optional(),
    heightCm: z.number().positive().max(260).optional(),
    weightKg: z.number().positive().max(400).optional(),
    sex: z.enum(['female', 'male', 'other']).optional(),
    demo: z.boolean().optional(),
    marginMm: z.number().nonnegative().max(100),
    criteria: z.enum(['RECIST 1.1', 'mRECIST']).optional(),
    targets: z.array(id).max(5).optional(),
    resection: resection.optional(),
    protocol: protocol.optional(),
    createdAt: isoTime,
    importedFrom: name.optional(),
  }),
  visits: z.strictObject({
    patientId: id, id, date: isoDate,
    volumes: z.array(z.enum(VOLUME_ROLES)), inputs: z.array(z.enum(INPUT_KINDS)),
    scheme: z.enum(['default', 'file']).optional(),
    splitIV: z.boolean().optional(),
    note: z.string().max(2000).optional(),
    dicom: dicomFacts.optional(),
    readerCalls: readerCalls.optional(),
    storedBytes: z.int().nonnegative(),
  }),
  volumes: z.strictObject({
    key: text, patientId: id, visitId: id, role: z.enum(VOLUME_ROLES), fileName: name, bytes: byteRange,
    dims: z.array(z.int().positive()).min(1).max(7), affine: z.array(finite).length(16),
    datatype: z.enum(['uint8', 'int8', 'int16', 'uint16', 'int32', 'uint32', 'float32', 'float64']),
    volumeBytes: z.int().nonnegative(), importedBytes: z.int().nonnegative(),
  }),
  inputs: z.strictObject({ key: text, patientId: id, visitId: id, kind: z.enum(INPUT_KINDS), fileName: name, text: z.string().max(50_000_000) }),
  lesions: z.strictObject({
    key: text, patientId: id, visitId: id, id, source: z.enum(['mask', 'marks']),
    centroidMm: z.tuple([finite, finite, finite]),
    segment: z.string().max(20).nullable(),
    segmentFractions: z.record(z.string().max(20), z.number().min(0).max(1)).optional(),
    volumeMl: z.number().nonnegative().optional(),
    longestAxialMm: mm, shortAxisMm: mm, marginMm: mm.nullable(),
    nearestOtherSegment: z.string().max(20).nullable(),
    marginAlert: z.boolean(),
  }),
  tracks: z.strictObject({ key: text, patientId: id, id, lesions: z.record(id, id), target: z.boolean() }),
  overrides: z.strictObject({
    id, patientId: id, kind: z.enum(['link', 'unlink', 'new']), visit: id, lesion: id, track: id.optional(), at: isoTime,
  }),
  treatments: z.strictObject({
    patientId: id, id, date: isoDate,
    kind: z.enum(['therapy-start', 'therapy-end', 'ablation', 'resection', 'embolisation', 'other']),
    label: z.string().min(1).max(200),
  }),
  settings: setting,
  audit: z.strictObject({
    id, at: isoTime, patientId: id.optional(),
    entity: z.enum(['patient', 'visit', 'lesion', 'track', 'override', 'treatment', 'setting']),
    entityId: text, field: text,
    action: z.enum(['create', 'update', 'delete', 'import', 'restore']),
    oldValue: json, newValue: json,
    by: z.string().max(120).optional(),
  }),
};

/** Keys that are built from other fields; a record whose key disagrees could overwrite another's. */
export function expectedKey(table: TableName, r: Record<string, unknown>): string | null {
  switch (table) {
    case 'volumes':
      return `${String(r.patientId)}/${String(r.visitId)}/${String(r.role)}`;
    case 'inputs':
      return `${String(r.patientId)}/${String(r.visitId)}/${String(r.kind)}`;
    case 'lesions':
      return `${String(r.patientId)}/${String(r.visitId)}/${String(r.id)}`;
    case 'tracks':
      return `${String(r.patientId)}/${String(r.id)}`;
    default:
      return null;
  }
}

/** The backup's JSON index (see docs/backup-format.md). */
export const backupIndex = z.strictObject({
  format: z.literal('falciform-backup'),
  schemaVersion: z.int().positive(),
  app: z.string().max(100),
  createdAt: isoTime,
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
