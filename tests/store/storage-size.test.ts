import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it } from 'vitest';
import { FalciformDb } from '../../renderer/store/db.js';
import { commitImport, readImport } from '../../renderer/store/import.js';
import { visitStoredBytes } from '../../src/model/storage-size.js';
import { dbName, dropAll, track } from './dump.js';
import { patientFolder } from './fixtures.js';

afterEach(dropAll);

describe('stored size of a visit', () => {
  it('is at most 1.1 × its original .nii.gz files, records and JSON inputs included', async () => {
    const db = track(new FalciformDb(dbName('size')));
    const files = patientFolder();
    await commitImport(db, await readImport(files));
    for (const visit of await db.visits.toArray()) {
      const volumes = await db.volumes.where('[patientId+visitId]').equals([visit.patientId, visit.id]).toArray();
      const inputs = await db.inputs.where('[patientId+visitId]').equals([visit.patientId, visit.id]).toArray();
      const stored = visitStoredBytes(visit, volumes, inputs);
      expect(visit.storedBytes).toBe(stored);
      const original = files
        .filter((f) => f.relativePath.startsWith(`DEMO-0101/${visit.id}/`) && f.relativePath.endsWith('.nii.gz'))
        .reduce((n, f) => n + f.bytes.length, 0);
      const ratio = stored / original;
      console.log(`visit ${visit.id}: stored ${stored} B for ${original} B of .nii.gz, ratio ${ratio.toFixed(4)}`);
      expect(ratio).toBeLessThanOrEqual(1.1);
    }
  });

  it('counts a volume held as a view into a larger buffer at the whole buffer, so the import copies it', async () => {
    const db = track(new FalciformDb(dbName('size')));
    // Files as one big buffer with views into it, as a reader may hand them over.
    const files = patientFolder({ oneVisit: true });
    const total = files.reduce((n, f) => n + f.bytes.length, 0);
    const big = new Uint8Array(total);
    let at = 0;
    const views = files.map((f) => {
      big.set(f.bytes, at);
      const view = big.subarray(at, at + f.bytes.length);
      at += f.bytes.length;
      return { relativePath: f.relativePath, bytes: view };
    });
    await commitImport(db, await readImport(views));
    for (const v of await db.volumes.toArray()) expect(v.bytes.buffer.byteLength).toBe(v.bytes.byteLength);
  });
});
