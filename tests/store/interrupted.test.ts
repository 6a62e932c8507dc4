import 'fake-indexeddb/auto';
import type { DBCore, Middleware } from 'dexie';
import { afterEach, describe, expect, it } from 'vitest';
import { createBackup, readBackup, restoreBackup } from '../../renderer/store/backup.js';
import { FalciformDb } from '../../renderer/store/db.js';
import { commitImport, readImport } from '../../renderer/store/import.js';
import { isFalciformError } from '../../src/errors.js';
import { dbName, dropAll, dump, track } from './dump.js';
import { patientFolder } from './fixtures.js';

afterEach(dropAll);

describe('an import interrupted part-way', () => {
  it('leaves the store as it was, whichever write fails, and names what could not be stored', async () => {
    const plan = await readImport(patientFolder());
    const seed = await readImport(patientFolder({ id: 'OTHER-9', root: 'o', oneVisit: true }));
    // Count the import's write requests on a store that never fails.
    const probe = new FalciformDb(dbName('probe'));
    const counter = diskFullAt(null);
    probe.use(counter.middleware);
    track(probe);
    await commitImport(probe, seed);
    const before = counter.writes();
    await commitImport(probe, plan);
    const writes = counter.writes() - before;
    expect(writes).toBeGreaterThan(5);

    for (let n = 1; n <= writes; n++) {
      const db = new FalciformDb(dbName('interrupted'));
      track(db);
      await commitImport(db, seed);
      db.close();
      // A fresh connection to the same database that fails on the import's nth write.
      const again = new FalciformDb(db.name);
      again.use(diskFullAt(n).middleware);
      track(again);
      const stored = await dump(again);
      const e = await commitImport(again, plan).then(() => null, (x: unknown) => x);
      expect(isFalciformError(e), `write ${n} of ${writes}`).toBe(true);
      if (!isFalciformError(e)) continue;
      expect(e.kind).toBe('too-large');
      expect(e.problem).toMatch(/disk or this browser's storage quota is full\. Nothing was imported/);
      expect(e.file).toMatch(/^(patient DEMO-0101|DEMO-0101\/v[12]\/\w+\.nii\.gz)$/);
      expect(await dump(again)).toEqual(stored);
    }
  });

  it('the same holds for a restore', async () => {
    const source = new FalciformDb(dbName('source'));
    track(source);
    await commitImport(source, await readImport(patientFolder()));
    const contents = await readBackup(await createBackup(source, 'all'), 'all.falciform');
    for (const n of [1, 3, 6]) {
      const db = new FalciformDb(dbName('restore'));
      track(db);
      await commitImport(db, await readImport(patientFolder({ id: 'OTHER-9', root: 'o', oneVisit: true })));
      db.close();
      const again = new FalciformDb(db.name);
      again.use(diskFullAt(n).middleware);
      track(again);
      const before = await dump(again);
      const e = await restoreBackup(again, contents, { file: 'all.falciform' }).then(() => null, (x: unknown) => x);
      expect(isFalciformError(e) && e.problem).toMatch(/Nothing was restored/);
      expect(await dump(again)).toEqual(before);
    }
  });
});

/**
 * Fails the nth add or put request made through one connection as a full disk does: IndexedDB
 * rejects the request with QuotaExceededError. The middleware sits below Dexie, where IndexedDB's
 * own requests are made; null never fails and only counts.
 */
function diskFullAt(n: number | null): { middleware: Middleware<DBCore>; writes: () => number } {
  let count = 0;
  const middleware: Middleware<DBCore> = {
    stack: 'dbcore',
    name: 'disk-full',
    create: (down) => ({
      ...down,
      table: (name) => {
        const t = down.table(name);
        return {
          ...t,
          mutate: (req) => {
            if ((req.type === 'add' || req.type === 'put') && ++count === n) {
              return Promise.reject(new DOMException('The quota has been exceeded.', 'QuotaExceededError'));
            }
            return t.mutate(req);
          },
        };
      },
    }),
  };
  return { middleware, writes: () => count };
}
