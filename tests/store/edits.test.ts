import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it } from 'vitest';
import { storedPatient } from '../../renderer/analysis/store-source.js';
import { FalciformDb } from '../../renderer/store/db.js';
import { buildMapFromLandmarks, deleteMark, saveLandmarks, saveMark, saveMarkViable } from '../../renderer/store/edits.js';
import { commitImport, readImport } from '../../renderer/store/import.js';
import { patientTrail } from '../../renderer/store/patients.js';
import { markFromCaliper } from '../../renderer/viewer/caliper.js';
import { isFalciformError } from '../../src/errors.js';
import { volumeKey } from '../../src/model/records.js';
import { visitStoredBytes } from '../../src/model/storage-size.js';
import { loadPatientFrom } from '../../src/patient/load.js';
import type { LandmarkSet } from '../../src/segments/landmarks.js';
import { dbName, dropAll, dump, track } from './dump.js';
import { LANDMARKS, patientFolder } from './fixtures.js';

afterEach(dropAll);

const ID = 'EDIT-0001';

// Visit v1: segment map and lesion mask; v2: liver mask, landmark set and one mark M1 (fixtures.ts).
async function stored(): Promise<FalciformDb> {
  const db = track(new FalciformDb(dbName('edits')));
  await commitImport(db, await readImport(patientFolder({ id: ID })));
  return db;
}

/** The visit's size as a fresh import would count it, from all its records. */
async function recountedBytes(db: FalciformDb, visitId: string): Promise<number> {
  const visit = (await db.visits.get([ID, visitId]))!;
  const mine = { patientId: ID, visitId } as const;
  const volumes = await db.volumes.where('[patientId+visitId]').equals([mine.patientId, mine.visitId]).toArray();
  const inputs = await db.inputs.where('[patientId+visitId]').equals([mine.patientId, mine.visitId]).toArray();
  return visitStoredBytes(visit, volumes, inputs);
}

/** Each visit's lesions as the app's analysis finds them, straight from the store. */
async function analysed(db: FalciformDb) {
  const { manifest, files } = await storedPatient(db, ID);
  const loaded = await loadPatientFrom(manifest, ID, files);
  return Object.fromEntries(loaded.visits.map((v) => [v.manifest.id, v.analysis]));
}

async function failure(p: Promise<unknown>): Promise<string> {
  const e = await p.then(() => null, (x: unknown) => x);
  if (!isFalciformError(e)) throw new Error(`expected a Falciform error, got ${String(e)}`);
  return e.message;
}

const landmarks = (changes: Partial<Record<string, number[]>> = {}): LandmarkSet =>
  ({ points: { ...LANDMARKS.points, ...changes } }) as unknown as LandmarkSet;

describe('manual marks', () => {
  it('a mark on a visit with a lesion mask adds a lesion to the mask\'s own, with a trail entry', async () => {
    const db = await stored();
    expect((await analysed(db)).v1.lesions.map((l) => l.id)).toEqual(['L1', 'L2']);
    const mark = markFromCaliper('M1', [55, 20, 12], [67, 20, 12], 8);
    expect(await saveMark(db, ID, 'v1', mark)).toBe('create');

    const visit = (await db.visits.get([ID, 'v1']))!;
    expect(visit.inputs).toEqual(['marks']);
    expect(visit.storedBytes).toBe(await recountedBytes(db, 'v1'));
    const file = JSON.parse((await db.inputs.get(`${ID}/v1/marks`))!.text);
    expect(file).toEqual({ space: 'RAS', units: 'mm', marks: [{ id: 'M1', centreMm: [61, 20, 12], longestAxialMm: 12, shortAxisMm: 8, endpointsMm: [[55, 20, 12], [67, 20, 12]] }] });

    // Mask lesions first, then the marks (src/visit/analyze.ts); the mark is placed by its centre.
    const v1 = (await analysed(db)).v1;
    expect(v1.lesions.map((l) => [l.id, l.source])).toEqual([['L1', 'mask'], ['L2', 'mask'], ['M1', 'mark']]);
    expect(v1.lesions[2]).toMatchObject({ longestAxialMm: 12, shortAxisMm: 8 });
    expect(v1.lesions[2].segment).not.toBeNull();
    expect(v1.lesions[2].marginMm).not.toBeNull();

    const trail = await patientTrail(db, ID);
    expect(trail.at(-1)).toMatchObject({
      entity: 'lesion', entityId: 'v1/M1', field: 'mark', action: 'create', oldValue: null, newValue: file.marks[0],
    });
  });

  it('moving a caliper end updates the mark and keeps its other fields; deleting removes it; both in the trail', async () => {
    const db = await stored();
    const before = JSON.parse((await db.inputs.get(`${ID}/v2/marks`))!.text).marks[0];
    const moved = markFromCaliper('M1', [38, 5, 10], [54, 5, 10], 11);
    expect(await saveMark(db, ID, 'v2', moved)).toBe('update');
    const after = JSON.parse((await db.inputs.get(`${ID}/v2/marks`))!.text).marks;
    expect(after).toEqual([{ id: 'M1', centreMm: [46, 5, 10], longestAxialMm: 16, shortAxisMm: 11, endpointsMm: [[38, 5, 10], [54, 5, 10]] }]);
    expect((await analysed(db)).v2.lesions.map((l) => [l.id, l.longestAxialMm])).toEqual([['M1', 16]]);

    await deleteMark(db, ID, 'v2', 'M1');
    expect(JSON.parse((await db.inputs.get(`${ID}/v2/marks`))!.text).marks).toEqual([]);
    expect((await analysed(db)).v2.lesions).toEqual([]);
    expect((await db.visits.get([ID, 'v2']))!.storedBytes).toBe(await recountedBytes(db, 'v2'));

    const trail = (await patientTrail(db, ID)).filter((a) => a.entity === 'lesion');
    expect(trail.map((a) => [a.action, a.entityId])).toEqual([['update', 'v2/M1'], ['delete', 'v2/M1']]);
    expect(trail[0].oldValue).toEqual(before);
    expect(trail[1]).toMatchObject({ oldValue: after[0], newValue: null });
  });

  it('refuses a mark id of the lesion mask, and an unknown mark, changing nothing', async () => {
    const db = await stored();
    const untouched = await dump(db);
    expect(await failure(saveMark(db, ID, 'v1', markFromCaliper('L2', [0, 0, 0], [10, 0, 0], 5)))).toMatch(/ids L1, L2, … belong to the lesions of this visit's lesion mask/);
    expect(await failure(deleteMark(db, ID, 'v2', 'M9'))).toMatch(/M9: is not among visit v2's marks/);
    expect(await failure(saveMark(db, ID, 'v2', markFromCaliper('M1', [0, 0, 0], [10, 0, 0], 5), 'create'))).toMatch(/M1: visit v2 has a mark with this id already/);
    expect(await failure(saveMark(db, ID, 'v2', markFromCaliper('M5', [0, 0, 0], [10, 0, 0], 5), 'update'))).toMatch(/M5: is not among visit v2's marks/);
    expect(await failure(saveMark(db, ID, 'v9', markFromCaliper('M1', [0, 0, 0], [10, 0, 0], 5)))).toMatch(/v9: is not among EDIT-0001's stored visits/);
    expect(await dump(db)).toEqual(untouched);
  });
});

describe('viable diameter of a mark (mRECIST)', () => {
  it('is stored to 0.1 mm with a trail entry, cleared with another, and reaches the analysis', async () => {
    const db = await stored();
    const longest = JSON.parse((await db.inputs.get(`${ID}/v2/marks`))!.text).marks[0].longestAxialMm as number;
    await saveMarkViable(db, ID, 'v2', 'M1', 6.04);
    const mark = JSON.parse((await db.inputs.get(`${ID}/v2/marks`))!.text).marks[0];
    expect(mark.viableAxialMm).toBe(6);
    expect(mark.longestAxialMm).toBe(longest);
    expect((await analysed(db)).v2.lesions[0].viableAxialMm).toBe(6);
    await saveMarkViable(db, ID, 'v2', 'M1', null);
    expect('viableAxialMm' in JSON.parse((await db.inputs.get(`${ID}/v2/marks`))!.text).marks[0]).toBe(false);
    const trail = (await patientTrail(db, ID)).filter((a) => a.field === 'viableAxialMm');
    expect(trail.map((a) => [a.entityId, a.oldValue, a.newValue])).toEqual([['v2/M1', null, 6], ['v2/M1', 6, null]]);
    expect((await db.visits.get([ID, 'v2']))!.storedBytes).toBe(await recountedBytes(db, 'v2'));
  });

  it('refuses a viable diameter longer than the mark, by the marks file rule, changing nothing', async () => {
    const db = await stored();
    const untouched = await dump(db);
    const longest = JSON.parse((await db.inputs.get(`${ID}/v2/marks`))!.text).marks[0].longestAxialMm as number;
    expect(await failure(saveMarkViable(db, ID, 'v2', 'M1', longest + 1))).toMatch(/v2\/marks\.json: mark "M1": viableAxialMm [\d.]+ is longer than longestAxialMm/);
    expect(await failure(saveMarkViable(db, ID, 'v2', 'M9', 3))).toMatch(/M9: is not among visit v2's marks/);
    expect(await dump(db)).toEqual(untouched);
  });
});

describe('landmarks', () => {
  it('moving a landmark rewrites the set, rebuilds a different map, and leaves one trail entry per moved point', async () => {
    const db = await stored();
    const before = (await analysed(db)).v2.segments;
    // The middle hepatic vein 15 mm to the patient's right (+x): segment IV gains from V and VIII.
    const moved = await saveLandmarks(db, ID, 'v2', landmarks({ middle_hepatic_vein: [40, 20, 45] }));
    expect(moved).toEqual(['middle_hepatic_vein']);
    const text = JSON.parse((await db.inputs.get(`${ID}/v2/landmarks`))!.text);
    expect(text.points.middle_hepatic_vein).toEqual([40, 20, 45]);
    expect(text.space).toBe('RAS');
    const after = (await analysed(db)).v2.segments;
    const ml = (list: typeof before, s: string) => list.find((x) => x.segment === s)?.volumeMl ?? 0;
    expect(ml(after, 'IV')).toBeGreaterThan(ml(before, 'IV'));
    expect(ml(after, 'V') + ml(after, 'VIII')).toBeLessThan(ml(before, 'V') + ml(before, 'VIII'));
    expect((await db.visits.get([ID, 'v2']))!.storedBytes).toBe(await recountedBytes(db, 'v2'));

    const trail = (await patientTrail(db, ID)).filter((a) => a.field.startsWith('landmarks'));
    expect(trail).toHaveLength(1);
    expect(trail[0]).toMatchObject({
      entityId: 'v2', field: 'landmarks.middle_hepatic_vein', action: 'update', oldValue: [25, 20, 45], newValue: [40, 20, 45],
    });
    // Storing the same set again changes nothing and says so.
    expect(await saveLandmarks(db, ID, 'v2', landmarks({ middle_hepatic_vein: [40.01, 20, 45] }))).toEqual([]);
  });

  it('refuses a set the plane rule cannot use, and landmarks on a visit with an imported map', async () => {
    const db = await stored();
    const untouched = await dump(db);
    const swapped = landmarks({ middle_hepatic_vein: LANDMARKS.points.right_hepatic_vein, right_hepatic_vein: LANDMARKS.points.middle_hepatic_vein });
    expect(await failure(saveLandmarks(db, ID, 'v2', swapped))).toMatch(/right_hepatic_vein is not right of the middle_hepatic_vein plane/);
    expect(await failure(saveLandmarks(db, ID, 'v1', landmarks()))).toMatch(/not built from landmarks/);
    expect(await dump(db)).toEqual(untouched);
  });

  it('a visit with an imported map and a liver mask can switch to a map built from landmarks', async () => {
    const db = await stored();
    expect(await failure(buildMapFromLandmarks(db, ID, 'v1', landmarks()))).toMatch(/has no liver mask/);
    // Give v1 a liver mask (v2's, on its own grid: maps meet in world mm).
    const liver = (await db.volumes.get(volumeKey(ID, 'v2', 'liver')))!;
    await db.volumes.put({ ...liver, key: volumeKey(ID, 'v1', 'liver'), visitId: 'v1' });
    const v1 = (await db.visits.get([ID, 'v1']))!;
    await db.visits.put({ ...v1, volumes: ['scan', 'segments', 'liver', 'lesions'] });
    await db.visits.put({ ...(await db.visits.get([ID, 'v1']))!, storedBytes: await recountedBytes(db, 'v1') });

    await buildMapFromLandmarks(db, ID, 'v1', landmarks());
    const visit = (await db.visits.get([ID, 'v1']))!;
    expect(visit.volumes).toEqual(['scan', 'liver', 'lesions']);
    expect(visit.inputs).toEqual(['landmarks']);
    expect(await db.volumes.get(volumeKey(ID, 'v1', 'segments'))).toBeUndefined();
    expect(visit.storedBytes).toBe(await recountedBytes(db, 'v1'));
    const { manifest } = await storedPatient(db, ID);
    expect(manifest.visits[0]).toMatchObject({ liver: 'v1/liver', landmarks: 'v1/landmarks' });
    expect(manifest.visits[0].segments).toBeUndefined();
    expect((await analysed(db)).v1.segments.map((s) => s.segment)).toEqual(['II', 'III', 'IV', 'V', 'VI', 'VII', 'VIII']);

    const trail = (await patientTrail(db, ID)).filter((a) => a.entity === 'visit' && a.action !== 'import');
    expect(trail.map((a) => [a.field, a.action])).toEqual([['segments', 'delete'], ['landmarks', 'create']]);
    expect(trail[0].oldValue).toEqual({ fileName: `${ID}/v1/segments.nii.gz` });
    expect(await failure(buildMapFromLandmarks(db, ID, 'v1', landmarks()))).toMatch(/already has landmarks/);
  });
});
