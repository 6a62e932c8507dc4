import 'fake-indexeddb/auto';
import { createHash } from 'node:crypto';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { backupFileName, createBackup, readBackup, restoreBackup, restoreConflicts } from '../../renderer/store/backup.js';
import { FalciformDb } from '../../renderer/store/db.js';
import { commitImport, readImport } from '../../renderer/store/import.js';
import { deletePatient, patientTrail, setSetting, updatePatient } from '../../renderer/store/patients.js';
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
      [(i) => { (i.tables.visits[0] as { volumes: string[] }).volumes = ['brain']; }, /visits record 1 \(v1\): field volumes.0/],
      [(i) => { (i.tables.volumes[0] as { dims: number[] }).dims = [1, 2, 3]; }, /volume DEMO-0301\/v1\/lesions \(a\/v1\/lesions.nii.gz\) has dimensions 64×48×40 but its record says 1×2×3/],
      [(i) => { i.tables.tracks.push({ ...(i.tables.tracks[0] as object), key: 'X/I', patientId: 'X', id: 'I' }); }, /tracks record X\/I belongs to patient X, who is not in the backup/],
      [(i) => { i.tables.inputs.push(i.tables.inputs[0]); }, /inputs record DEMO-0301\/v2\/landmarks appears twice/],
      [(i) => { i.schemaVersion = 99; }, /store schema 99, newer/],
    ];
    for (const [change, problem] of cases) {
      expect((await failure(readBackup(reseal(file, change), 'r.falciform'))).problem).toMatch(problem);
    }
  });
});

describe('a hostile backup', () => {
  type Rec = Record<string, unknown>;
  const first = (i: Index, table: string) => i.tables[table][0] as Rec;
  const setting = (i: Index, key: string, value: unknown) => { i.tables.settings.push({ key, value }); };
  // One class of damage each: the kinds a hand-edited or foreign file carries, and the field to be named.
  const classes: [string, (index: Index) => void, RegExp][] = [
    ['wrong type', (i) => { first(i, 'patients').marginMm = '12'; }, /patients record 1 \(DEMO-0301\): field marginMm Invalid input: expected number, received string/],
    ['a label object where a string belongs', (i) => { first(i, 'patients').label = { text: 'bed 4' }; }, /patients record 1 \(DEMO-0301\): field label .*expected string, received object/],
    ['a settings entry as a string instead of a list', (i) => setting(i, 'windowPresets', 'Liver'), /settings record \d+ \(windowPresets\): field value .*expected array, received string/],
    ['a window preset with a string width', (i) => setting(i, 'windowPresets', [{ name: 'Liver', centre: 60, width: '160' }]), /\(windowPresets\): field value.0.width/],
    ['the reader name as an object', (i) => setting(i, 'readerName', { name: 'Dr A' }), /\(readerName\): field value .*expected string/],
    ['a number out of range (margin)', (i) => { first(i, 'patients').marginMm = 1e9; }, /patients record 1 \(DEMO-0301\): field marginMm Too big/],
    ['a number out of range (birth year)', (i) => { first(i, 'patients').birthYear = -4; }, /patients record 1 \(DEMO-0301\): field birthYear Too small/],
    ['a number out of range (stored size)', (i) => { first(i, 'visits').storedBytes = -1; }, /visits record 1 \(v1\): field storedBytes Too small/],
    ['a non-integer dimension', (i) => { (first(i, 'volumes').dims as number[])[0] = 1.5; }, /volumes record 1 \(DEMO-0301\/v1\/lesions\): field dims.0 Invalid input: expected int, received number/],
    ['an unknown schema version', (i) => { i.schemaVersion = 0; }, /has an index whose field schemaVersion Too small/],
    ['a newer schema version', (i) => { i.schemaVersion = 4; }, /store schema 4, newer/],
    ['an unknown setting', (i) => { i.tables.settings.push({ key: 'theme', value: 'dark' }); }, /\(theme\): field key names setting "theme", which this Falciform does not know/],
    ['a field the store does not have', (i) => { first(i, 'treatments').colour = 'red'; }, /treatments record 1 \(2026-01-20-therapy-start\): field colour Unrecognized key: "colour"/],
    ['an unknown trail action', (i) => { first(i, 'audit').action = 'erase'; }, /audit record 1 \([^)]+\): field action Invalid option/],
    ['a visit date that does not exist', (i) => { first(i, 'visits').date = '2026-02-30'; }, /visits record 1 \(v1\): field date must be a real date/],
    ['a key that points at another record', (i) => { first(i, 'inputs').key = 'DEMO-0302/v1/landmarks'; }, /inputs record 1.*: field key is "DEMO-0302\/v1\/landmarks" but its other fields make it "DEMO-0301\/v2\/landmarks"/],
    ['a record that is not an object', (i) => { i.tables.overrides[0] = 'o-1'; }, /overrides record 1: field \(record\) Invalid input: expected object, received string/],
    ['a value nested thousands deep', (i) => { first(i, 'audit').newValue = DEEP; }, /audit record 1: holds a value nested too deeply/],
  ];

  it('refuses each class, naming the field, and leaves the store byte for byte as it was', async () => {
    const backup = await createBackup(source, 'all');
    const before = await storeExport(source);
    for (const [label, change, problem] of classes) {
      const e = await failure(restoreAsTheAppDoes(source, reseal(backup, change)));
      expect(e.file, label).toBe('hostile.falciform');
      expect(e.problem, label).toMatch(problem);
      expect(e.problem.length, label).toBeLessThan(400);
      expect(await storeExport(source), label).toBe(before);
    }
  });

  it('fails whole when a key is taken by another stored patient: nothing is written', async () => {
    const one = await createBackup(source, { patientIds: ['DEMO-0301'] });
    await deletePatient(source, 'DEMO-0301');
    // Another patient's correction holds the id the backup's correction uses.
    await source.overrides.add({ id: 'o-1', patientId: 'DEMO-0302', kind: 'new', visit: 'v1', lesion: 'L1', at: '2026-05-01T09:00:00.000Z' });
    const before = await storeExport(source);
    expect((await failure(restoreAsTheAppDoes(source, one))).message).toBe('correction o-1: has the id of a stored correction of patient DEMO-0302; nothing was restored');
    expect(await storeExport(source)).toBe(before);
  });

  it("never replaces another patient's trail entries: colliding ids get fresh ones, the same entry is not added twice", async () => {
    const theirs = await patientTrail(source, 'DEMO-0302');
    const mine = await patientTrail(source, 'DEMO-0301');
    expect(theirs.length).toBeGreaterThan(0);
    expect(mine.length).toBeGreaterThanOrEqual(theirs.length);
    const others = (await source.audit.toArray()).filter((a) => a.patientId === undefined);
    // A backup of DEMO-0301 whose trail ids were edited to DEMO-0302's (and one settings entry's).
    const collidingIds = [...theirs.map((a) => a.id), others[0].id];
    const hostile = reseal(await createBackup(source, { patientIds: ['DEMO-0301'] }), (i) => {
      i.tables.audit.forEach((a, n) => { if (n < collidingIds.length) (a as Rec).id = collidingIds[n]; });
    });
    const target = track(new FalciformDb(dbName('collide')));
    await restoreBackup(target, await readBackup(await createBackup(source, 'all'), 'all.falciform'));
    const storedBefore = await target.audit.toArray();
    await restoreBackup(target, await readBackup(hostile, 'hostile.falciform'), { replace: true });
    const after = await target.audit.toArray();
    // Every entry not of DEMO-0301 is still there, field for field.
    for (const a of storedBefore.filter((x) => x.patientId !== 'DEMO-0301')) expect(after.find((x) => x.id === a.id), a.id).toStrictEqual(a);
    // DEMO-0301's trail is the backup's (under fresh ids where they collided) plus the restore entries.
    const restored = (await patientTrail(target, 'DEMO-0301')).filter((a) => a.action !== 'restore');
    expect(restored.map(({ id: _id, ...rest }) => rest)).toStrictEqual(mine.map(({ id: _id, ...rest }) => rest));
    expect(restored.filter((a) => collidingIds.includes(a.id))).toEqual([]);
    // Restoring an unchanged whole-store backup again adds no second copy of the entries it already put back.
    await restoreBackup(target, await readBackup(await createBackup(source, 'all'), 'all.falciform'), { replace: true });
    expect((await target.audit.toArray()).filter((a) => a.patientId === undefined)).toStrictEqual(others);
  });
});

/**
 * The store as the app's own "Back up all" writes it, byte for byte, except the moment of the export
 * (the index's createdAt, and so the checksum over it): as its length and SHA-256, compared as text.
 */
async function storeExport(db: FalciformDb): Promise<string> {
  const file = await createBackup(db, 'all');
  const at = new TextDecoder().decode(file.subarray(25, 200)).indexOf('"createdAt":"') + 25 + 13;
  file.fill(0x30, at, at + 24);
  const body = file.subarray(0, file.length - 32);
  return `${body.length} bytes, SHA-256 ${createHash('sha256').update(body).digest('hex')}`;
}

/** What the Restore button does: read and check the file, then write, replacing the patients it holds. */
async function restoreAsTheAppDoes(db: FalciformDb, bytes: Uint8Array) {
  return restoreBackup(db, await readBackup(bytes, 'hostile.falciform'), { file: 'hostile.falciform', replace: true });
}

/** Stands for a list nested 100,000 deep, written into the JSON text (JSON.stringify itself would run out of stack). */
const DEEP = '\u0000deep';
const deepJson = `${'['.repeat(100_000)}1${']'.repeat(100_000)}`;

interface Index { schemaVersion: number; tables: Record<string, unknown[]> }

/** Edits a backup's index and writes a correct checksum again, as a careless tool might. */
function reseal(file: Uint8Array, change: (index: Index) => void): Uint8Array {
  const view = new DataView(file.buffer, file.byteOffset);
  const length = view.getUint32(21, true);
  const index = JSON.parse(new TextDecoder().decode(file.subarray(25, 25 + length))) as Index;
  change(index);
  const json = new TextEncoder().encode(JSON.stringify(index).replace(JSON.stringify(DEEP), deepJson));
  const data = file.subarray(25 + length, file.length - 32);
  const out = new Uint8Array(25 + json.length + data.length + 32);
  out.set(file.subarray(0, 25));
  new DataView(out.buffer).setUint32(21, json.length, true);
  out.set(json, 25);
  out.set(data, 25 + json.length);
  out.set(createHash('sha256').update(out.subarray(0, out.length - 32)).digest(), out.length - 32);
  return out;
}
