// The named export: the default one is typed as the CommonJS module object under NodeNext (the tests' setting).
import { Dexie, type DexieOptions, type Table } from 'dexie';
import type {
  AuditRecord, InputRecord, LesionRecord, OverrideRecord, PatientRecord, SettingRecord, TrackRecord, TreatmentRecord,
  VisitRecord, VolumeRecord,
} from '../../src/model/records.js';
import { SCHEMA_VERSIONS, type SchemaVersion } from './schema.js';

export const DB_NAME = 'falciform';

/** The local store: everything stays in this browser profile (or the desktop app's), on this computer. */
export class FalciformDb extends Dexie {
  patients!: Table<PatientRecord, string>;
  visits!: Table<VisitRecord, [string, string]>;
  volumes!: Table<VolumeRecord, string>;
  inputs!: Table<InputRecord, string>;
  lesions!: Table<LesionRecord, string>;
  tracks!: Table<TrackRecord, string>;
  overrides!: Table<OverrideRecord, string>;
  treatments!: Table<TreatmentRecord, [string, string]>;
  settings!: Table<SettingRecord, string>;
  audit!: Table<AuditRecord, string>;

  constructor(name = DB_NAME, options?: DexieOptions) {
    super(name, options);
    declareVersions(this, SCHEMA_VERSIONS);
    // Every new trail entry, whichever store module writes it, carries the reader's name when one is set.
    this.audit.hook('creating', (_key, entry) => {
      if (entry.by === undefined && currentReader) entry.by = currentReader;
    });
  }
}

let currentReader = '';

/** The reader name new trail entries are signed with (the `readerName` setting, loaded at start). */
export function setCurrentReader(name: string): void {
  currentReader = name.trim();
}

/** Declares schema versions on a Dexie instance (the migration test declares only the older ones). */
export function declareVersions(db: Dexie, versions: readonly SchemaVersion[]): void {
  for (const v of versions) {
    const declared = db.version(v.version).stores(v.stores);
    if (v.upgrade) declared.upgrade(v.upgrade);
  }
}

let shared: FalciformDb | null = null;

/** The app's one database connection. */
export function appDb(): FalciformDb {
  shared ??= new FalciformDb();
  return shared;
}

/**
 * Asks the browser not to evict the store under storage pressure (the desktop app's profile is
 * never evicted). Returns whether the data is persistent, or null where the browser cannot say.
 */
export async function askPersistentStorage(): Promise<boolean | null> {
  const storage = typeof navigator === 'undefined' ? undefined : navigator.storage;
  if (!storage?.persist) return null;
  try {
    return (await storage.persisted()) || (await storage.persist());
  } catch {
    return null;
  }
}
