import 'fake-indexeddb/auto';
import { createHash } from 'node:crypto';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { backupFileName, createBackup, readBackup, restoreBackup, restoreConflicts } from '../../renderer/store/backup.js';
import { FalciformDb } from '../../renderer/store/db.js';
import { commitImport, readImport } from '../../renderer/store/import.js';
import { setSetting, updatePatient } from '../../renderer/store/patients.js';
import { isFalciformError } from '../../src/errors.js';
import { dbName, dropAll, dump, track } from './dump.js';
import { patientFolder } from './fixtures.js';

afterEach(dropAll);

let source: FalciformDb;

/** A store with every table in use: two imported patients, analysis results, an edit, a setting. */
beforeEach(async () => {
  source = track(new FalciformDb(dbName('source')));
  await commitImport(source, await readImport([...patientFolder({ id: 'DEMO-0301', root: 'a' }), ...patientFolder({ id: 'DEMO-0302', root: 'b', oneVisit: true })]));
  await source.lesions.add({
    key: 'DEMO-0301/v1/L1', patientId: 'DEMO-0301', visitId: 'v1', id: 'L1', source: 'mask',
    // -0 is a value JSON would turn into 0; the backup must not.
    centroidMm: [-0, 5.25, 10.125], segment: 'V', segmentFractions: { V: 0.75, VIII: 0.25 }, volumeMl: 2.1,
    longestAxialMm: 18.4, shortAxisMm: 15.1, marginMm: null, nearestOtherSegment: null, marginAlert: false,
  });
  await source.tracks.add({ key: 'DEMO-0301/A', patientId: 'DEMO-0301', id: 'A', lesions: { v1: 'L1', v2: 'M1' }, target: true });
  await source.overrides.add({ id: 'o-1', patientId: 'DEMO-0301', kind: 'link', visit: 'v2', lesion: 'M1', track: 'A', at: '2026-04-01T09:00:00.000Z' });
  await updatePatient(source, 'DEMO-0301', { marginMm: 12, label: 'bed 4' });
  await setSetting(source, 'marginMm', 7.5);
});

const withoutRestoreEntries = (d: Record<string, unknown[]>): Record<string, unknown[]> => ({
  ...d,
  audit: d.audit.filter((a) => (a as { action: string }).action !== 'restore'),
});

async function failure(p: Promise<unknown>) {
  const e = await p.then(() => null, (x: unknown) => x);
  if (!isFalciformError(e)) throw new Error(`expected a Falciform error, got ${String(e)}`);
  return e;
}

describe('backup and restore', () => {
  it('round-trips the whole store exactly: same volume bytes, deep-equal records, -0 kept', async () => {
    const file = await createBackup(source, 'all');
    const target = track(new FalciformDb(dbName('target')));
    const contents = await readBackup(file, 'all.falciform');
    expect(await restoreConflicts(target, contents)).toEqual([]);
    const result = await restoreBackup(target, contents);
    expect(result).toEqual({ patients: ['DEMO-0301', 'DEMO-0302'], replaced: [] });
    const [a, b] = [await dump(source), await dump(target)];
    expect(withoutRestoreEntries(b)).toStrictEqual(a);
    expect(b.audit.length - a.audit.length).toBe(2);
    const lesion = await target.lesions.get('DEMO-0301/v1/L1');
    expect(Object.is(lesion!.centroidMm[0], -0)).toBe(true);
    const original = patientFolder({ id: 'DEMO-0301', root: 'a' }).find((f) => f.relativePath === 'a/v2/scan.nii.gz')!.bytes;
    expect((await target.volumes.get('DEMO-0301/v2/scan'))!.bytes).toStrictEqual(original);
  });

  it('backs up one patient alone, without settings or the other patient', async () => {
    const file = await createBackup(source, { patientIds: ['DEMO-0302'] });
    const target = track(new FalciformDb(dbName('target')));
    await restoreBackup(target, await readBackup(file, 'one.falciform'));
    const [a, b] = [await dump(source), await dump(target)];
    const mine = (rows: unknown[]) => rows.filter((r) => (r as { patientId?: string; id?: string }).patientId === 'DEMO-0302' || (r as { id?: string }).id === 'DEMO-0302');
    for (const table of Object.keys(a)) {
      if (table === 'settings') expect(b.settings).toEqual([]);
      else expect(withoutRestoreEntries(b)[table], table).toStrictEqual(mine(a[table]));
    }
    expect(backupFileName({ patientIds: ['DEMO-0302'] }, '2026-05-01')).toBe('falciform-backup-DEMO-0302-2026-05-01.falciform');
  });

  it('refuses to overwrite stored patients unless asked to replace them', async () => {
    const contents = await readBackup(await createBackup(source, { patientIds: ['DEMO-0301'] }), 'b.falciform');
    await updatePatient(source, 'DEMO-0301', { marginMm: 5 });
    await source.visits.delete(['DEMO-0301', 'v2']);
    expect(await restoreConflicts(source, contents)).toEqual(['DEMO-0301']);
    const e = await failure(restoreBackup(source, contents, { file: 'b.falciform' }));
    expect(e.message).toMatch(/patient DEMO-0301: already stored on this computer; nothing was restored/);
    await restoreBackup(source, contents, { replace: true });
    expect((await source.patients.get('DEMO-0301'))!.marginMm).toBe(12);
    expect(await source.visits.where('patientId').equals('DEMO-0301').count()).toBe(2);
    expect(await source.patients.get('DEMO-0302')).toBeDefined();
  });

  it('refuses damaged, foreign and newer files before writing anything', async () => {
    const file = await createBackup(source, 'all');
    const flipped = file.slice();
    flipped[Math.floor(file.length / 2)] ^= 0x40;
    expect((await failure(readBackup(flipped, 'x.falciform'))).problem).toMatch(/damaged or incomplete: its checksum does not match/);
    expect((await failure(readBackup(file.slice(0, file.length - 1000), 'x.falciform'))).problem).toMatch(/damaged or incomplete/);
    expect((await failure(readBackup(new TextEncoder().encode('{"patients": []}'), 'x.json'))).problem).toMatch(/not a Falciform backup/);
    const newer = file.slice();
    new DataView(newer.buffer).setUint32(17, 2, true);
    expect((await failure(readBackup(newer, 'x.falciform'))).problem).toMatch(/backup format 2, newer than this Falciform reads/);
  });

  it('restores a backup from when tracks were numbered with the tracks lettered', async () => {
    const file = await createBackup(source, 'all');
    const old = reseal(file, (i) => {
      i.schemaVersion = 2;
      (i.tables.patients[0] as { targets?: string[] }).targets = ['T2', 'T1'];
      i.tables.tracks[0] = { ...(i.tables.tracks[0] as object), key: 'DEMO-0301/T1', id: 'T1' };
      (i.tables.overrides[0] as { track: string }).track = 'T28';
    });
    const { tables } = await readBackup(old, 'old.falciform');
    expect(tables.patients.find((p) => p.id === 'DEMO-0301')!.targets).toEqual(['B', 'A']);
    expect(tables.tracks.map((t) => [t.key, t.id])).toEqual([['DEMO-0301/A', 'A']]);
    expect(tables.overrides.map((o) => o.track)).toEqual(['AB']);
  });

  it('checks every record and volume even when the checksum is right', async () => {
    const file = await createBackup(source, 'all');
    const cases: [(index: Index) => void, RegExp][] = [
      [(i) => { (i.tables.visits[0] as { volumes: string[] }).volumes = ['brain']; }, /visits record 1: field volumes.0/],
      [(i) => { (i.tables.volumes[0] as { dims: number[] }).dims = [1, 2, 3]; }, /volume DEMO-0301\/v1\/lesions \(a\/v1\/lesions.nii.gz\) has dimensions 64×48×40 but its record says 1×2×3/],
      [(i) => { i.tables.tracks.push({ ...(i.tables.tracks[0] as object), key: 'X/I', patientId: 'X' }); }, /tracks record X\/I belongs to patient X, who is not in the backup/],
      [(i) => { i.tables.inputs.push(i.tables.inputs[0]); }, /inputs record DEMO-0301\/v2\/landmarks appears twice/],
      [(i) => { i.schemaVersion = 99; }, /store schema 99, newer/],
    ];
    for (const [change, problem] of cases) {
      expect((await failure(readBackup(reseal(file, change), 'r.falciform'))).problem).toMatch(problem);
    }
  });
});

interface Index { schemaVersion: number; tables: Record<string, unknown[]> }

/** Edits a backup's index and writes a correct checksum again, as a careless tool might. */
function reseal(file: Uint8Array, change: (index: Index) => void): Uint8Array {
  const view = new DataView(file.buffer, file.byteOffset);
  const length = view.getUint32(21, true);
  const index = JSON.parse(new TextDecoder().decode(file.subarray(25, 25 + length))) as Index;
  change(index);
  const json = new TextEncoder().encode(JSON.stringify(index));
  const data = file.subarray(25 + length, file.length - 32);
  const out = new Uint8Array(25 + json.length + data.length + 32);
  out.set(file.subarray(0, 25));
  new DataView(out.buffer).setUint32(21, json.length, true);
  out.set(json, 25);
  out.set(data, 25 + json.length);
  out.set(createHash('sha256').update(out.subarray(0, out.length - 32)).digest(), out.length - 32);
  return out;
}
