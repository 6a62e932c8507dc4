import { Dexie } from 'dexie';
import { TABLE_NAMES } from '../../src/model/records.js';
import type { FalciformDb } from '../../renderer/store/db.js';

/** Every table's records in primary-key order: two dumps are equal when the stores hold the same. */
export async function dump(db: FalciformDb): Promise<Record<string, unknown[]>> {
  const out: Record<string, unknown[]> = {};
  for (const name of TABLE_NAMES) out[name] = await db.table(name).toArray();
  return out;
}

let n = 0;
/** A database of its own for each test. */
export function dbName(label: string): string {
  return `test-${label}-${process.pid}-${n++}`;
}

const opened: Dexie[] = [];
/** Remembers a database for dropAll. */
export function track<T extends Dexie>(db: T): T {
  opened.push(db);
  return db;
}
/** Closes and deletes every database a test opened (call in afterEach). */
export async function dropAll(): Promise<void> {
  const dbs = opened.splice(0);
  for (const db of dbs) db.close();
  for (const name of new Set(dbs.map((db) => db.name))) await Dexie.delete(name);
}
