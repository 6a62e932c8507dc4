import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it } from 'vitest';
import { FalciformDb } from '../../renderer/store/db.js';
import { commitImport, readImport } from '../../renderer/store/import.js';
import { listPatients } from '../../renderer/store/patients.js';
import { isFalciformError } from '../../src/errors.js';
import { parseManifest } from '../../src/manifest/manifest.js';
import { webInflate } from '../../src/volume/web-gzip.js';
import { dbName, dropAll, dump, track } from './dump.js';
import { LANDMARKS, patientFolder, textFile, withFile } from './fixtures.js';

const freshDb = () => track(new FalciformDb(dbName('import')));
afterEach(dropAll);

/** The error a promise rejects with, as "file: problem". */
async function failure(p: Promise<unknown>): Promise<{ file: string; problem: string }> {
  const e = await p.then(() => null, (x: unknown) => x);
  if (!isFalciformError(e)) throw new Error(`expected a Falciform error, got ${String(e)}`);
  return { file: e.file, problem: e.problem };
}

describe('import of a patient folder with a manifest', () => {
  it('stores the patient, its visits, inputs, treatments and the .nii.gz bytes as they came', async () => {
    const db = freshDb();
    const files = patientFolder();
    const plan = await readImport(files);
    const result = await commitImport(db, plan);
    expect(result.patients).toEqual([{ id: 'DEMO-0101', newPatient: true, visits: ['v1', 'v2'] }]);

    const patient = await db.patients.get('DEMO-0101');
    expect(patient).toMatchObject({ id: 'DEMO-0101', birthYear: 1958, marginMm: 10, demo: true, importedFrom: 'DEMO-0101/manifest.json' });
    const visits = await db.visits.where('patientId').equals('DEMO-0101').sortBy('date');
    expect(visits.map((v) => [v.id, v.date, v.volumes, v.inputs])).toEqual([
      ['v1', '2026-01-12', ['scan', 'segments', 'lesions'], []],
      ['v2', '2026-03-02', ['scan', 'liver'], ['landmarks', 'marks']],
    ]);
    const scan = await db.volumes.get('DEMO-0101/v1/scan');
    const original = files.find((f) => f.relativePath === 'DEMO-0101/v1/scan.nii.gz')!.bytes;
    expect(scan!.bytes).toEqual(original);
    expect(scan).toMatchObject({ dims: [64, 48, 40], datatype: 'int16', fileName: 'DEMO-0101/v1/scan.nii.gz', importedBytes: original.length });
    const landmarks = await db.inputs.get('DEMO-0101/v2/landmarks');
    expect(JSON.parse(landmarks!.text)).toEqual(LANDMARKS);
    expect(await db.treatments.toArray()).toEqual([
      { patientId: 'DEMO-0101', id: '2026-01-20-therapy-start', date: '2026-01-20', kind: 'therapy-start', label: 'invented regimen A' },
    ]);
    const trail = await db.audit.toArray();
    expect(trail.map((a) => [a.action, a.entity, a.entityId]).sort()).toEqual([
      ['import', 'patient', 'DEMO-0101'], ['import', 'visit', 'v1'], ['import', 'visit', 'v2'],
    ]);
    const [row] = await listPatients(db);
    expect(row).toMatchObject({ visitCount: 2, firstVisit: '2026-01-12', lastVisit: '2026-03-02' });
  });

  it('gzips a plain .nii on import, and the stored bytes decode to the original file', async () => {
    const db = freshDb();
    const files = patientFolder({ plainSegments: true, oneVisit: true });
    await commitImport(db, await readImport(files));
    const stored = await db.volumes.get('DEMO-0101/v1/segments');
    const original = files.find((f) => f.relativePath.endsWith('segments.nii'))!.bytes;
    expect(stored!.bytes[0]).toBe(0x1f);
    expect(stored!.bytes.length).toBeLessThan(original.length / 4);
    expect(await webInflate(stored!.bytes, original.length + 1)).toEqual(original);
  });

  it('imports several patient folders chosen together, all or nothing', async () => {
    const db = freshDb();
    const files = [...patientFolder({ id: 'DEMO-0201', root: 'study/a', oneVisit: true }), ...patientFolder({ id: 'DEMO-0202', root: 'study/b', oneVisit: true })];
    await commitImport(db, await readImport(files));
    expect((await listPatients(db)).map((p) => p.patient.id)).toEqual(['DEMO-0201', 'DEMO-0202']);

    const other = freshDb();
    const broken = withFile(
      [...patientFolder({ id: 'DEMO-0203', root: 'x/a', oneVisit: true }), ...patientFolder({ id: 'DEMO-0204', root: 'x/b', oneVisit: true })],
      'x/b/v1/lesions.nii.gz',
      new Uint8Array([0x1f, 0x8b, 8, 0, 0, 0]),
    );
    const f = await failure(readImport(broken));
    expect(f.file).toBe('x/b/v1/lesions.nii.gz');
    expect(await other.patients.count()).toBe(0);
  });
});

describe('a bad file stops the import before anything is written, naming the file', () => {
  const cases: [string, (files: ReturnType<typeof patientFolder>) => ReturnType<typeof patientFolder>, string, RegExp][] = [
    [
      'truncated gzip volume',
      (files) => {
        const f = files.find((x) => x.relativePath.endsWith('v2/scan.nii.gz'))!;
        return withFile(files, f.relativePath, f.bytes.slice(0, Math.floor(f.bytes.length * 0.6)));
      },
      'DEMO-0101/v2/scan.nii.gz',
      /corrupt or truncated|truncated/,
    ],
    ['not a NIfTI file', (files) => withFile(files, 'DEMO-0101/v1/lesions.nii.gz', textFile({ hello: 1 })), 'DEMO-0101/v1/lesions.nii.gz', /text file|not a NIfTI/],
    [
      'landmarks swapped',
      (files) => withFile(files, 'DEMO-0101/v2/landmarks.json', textFile({ points: { ...LANDMARKS.points, ivc_superior: LANDMARKS.points.ivc_inferior, ivc_inferior: LANDMARKS.points.ivc_superior } })),
      'DEMO-0101/v2/landmarks.json',
      /ivc_superior is not above/,
    ],
    ['marks without a list', (files) => withFile(files, 'DEMO-0101/v2/marks.json', textFile({ space: 'RAS' })), 'DEMO-0101/v2/marks.json', /needs a list "marks"/],
    [
      'marks off the scan',
      (files) => withFile(files, 'DEMO-0101/v2/marks.json', textFile({ marks: [{ id: 'M1', centreMm: [45, 400, 10], longestAxialMm: 10, shortAxisMm: 8 }] })),
      'DEMO-0101/v2/marks.json',
      /mark "M1" at \[45\.0, 400\.0, 10\.0\] mm lies outside the scan/,
    ],
    ['manifest names a missing file', (files) => files.filter((f) => !f.relativePath.endsWith('v2/liver.nii.gz')), 'DEMO-0101/manifest.json', /visit v2: liver file "v2\/liver.nii.gz" is not among the chosen files/],
    ['manifest is not JSON', (files) => withFile(files, 'DEMO-0101/manifest.json', new TextEncoder().encode('{"patient": ')), 'DEMO-0101/manifest.json', /not valid JSON/],
  ];
  for (const [name, damage, file, problem] of cases) {
    it(name, async () => {
      const db = freshDb();
      await commitImport(db, await readImport(patientFolder({ id: 'OTHER-1', root: 'other', oneVisit: true })));
      const before = await dump(db);
      const f = await failure(readImport(damage(patientFolder())).then((plan) => commitImport(db, plan)));
      expect(f.file).toBe(file);
      expect(f.problem).toMatch(problem);
      expect(await dump(db)).toEqual(before);
    });
  }

  it('a mask from another place in space', async () => {
    const files = patientFolder({ oneVisit: true });
    const moved = patientFolder({ oneVisit: true }).find((f) => f.relativePath.endsWith('lesions.nii.gz'))!;
    // Shift the lesion mask 1 m along x by rewriting srow_x's offset in a re-encoded copy.
    const { readNifti } = await import('../../src/volume/nifti-read.js');
    const { encodeNifti } = await import('../../src/volume/nifti-write.js');
    const { makeVolume } = await import('../../src/volume/volume.js');
    const { gzipSync } = await import('node:zlib');
    const v = (await readNifti(moved.bytes, 'x', { inflate: webInflate })).volume;
    const affine = [...v.affine];
    affine[3] += 1000;
    const far = new Uint8Array(gzipSync(encodeNifti(makeVolume(v.dims, v.data, affine, 'uint8'), 'uint8')));
    const f = await failure(readImport(withFile(files, moved.relativePath, far)));
    expect(f).toEqual({ file: moved.relativePath, problem: expect.stringMatching(/does not overlap the scan DEMO-0101\/v1\/scan.nii.gz/) });
  });
});

describe('loose files without a manifest', () => {
  const loose = () =>
    patientFolder({ oneVisit: true })
      .filter((f) => !f.relativePath.endsWith('manifest.json'))
      .map((f) => ({ relativePath: f.relativePath.split('/').pop()!, bytes: f.bytes }));

  it('need the patient id and date, then import as one visit', async () => {
    const db = freshDb();
    const f = await failure(readImport(loose()));
    expect(f.problem).toMatch(/hold no manifest.json/);
    const plan = await readImport([...loose(), { relativePath: 'notes.txt', bytes: new Uint8Array([65]) }], { loose: { patientId: 'LOOSE-1', date: '2026-02-01' } });
    expect(plan.ignored).toEqual(['notes.txt']);
    await commitImport(db, plan);
    expect(await db.visits.get(['LOOSE-1', '2026-02-01'])).toMatchObject({ volumes: ['scan', 'segments', 'lesions'] });
    // The same patient's next visit, dropped on its own, joins the stored patient.
    const next = await commitImport(db, await readImport(loose(), { loose: { patientId: 'LOOSE-1', date: '2026-05-04', visitId: 'v2' } }));
    expect(next).toEqual({ patients: [{ id: 'LOOSE-1', newPatient: false, visits: ['v2'] }], warnings: [] });
    expect(await db.visits.where('patientId').equals('LOOSE-1').count()).toBe(2);
  });

  it('take a scan alone as a visit waiting for its liver, landmarks and lesions; the command line still needs them', async () => {
    const db = freshDb();
    const scanOnly = loose().filter((f) => f.relativePath === 'scan.nii.gz');
    await commitImport(db, await readImport(scanOnly, { loose: { patientId: 'LOOSE-2', date: '2026-02-01' } }));
    expect(await db.visits.get(['LOOSE-2', '2026-02-01'])).toMatchObject({ volumes: ['scan'], inputs: [] });
    // Half a visit is still refused: a segment map with no lesions says what is missing.
    const noLesions = loose().filter((f) => f.relativePath !== 'lesions.nii.gz');
    expect((await failure(readImport(noLesions, { loose: { patientId: 'L', date: '2026-02-01' } }))).problem).toMatch(/no lesion mask/);
    // A manifest visit with only a scan: the app takes it, the command line's reading refuses it.
    const text = JSON.stringify({ patient: { id: 'M-1' }, visits: [{ id: 'v1', date: '2026-02-01', scan: 'v1/scan.nii.gz' }] });
    expect(parseManifest(text, 'manifest.json', { scanOnly: true }).visits[0]).toEqual({ id: 'v1', date: '2026-02-01', scan: 'v1/scan.nii.gz' });
    expect(() => parseManifest(text, 'manifest.json')).toThrow(/must give either "segments" or both "liver"/);
  });

  it('name the file whose role cannot be told, and refuse two files for one role', async () => {
    const files = loose();
    const scan = files.find((f) => f.relativePath === 'scan.nii.gz')!;
    const unnamed = [...files, { relativePath: 'thing.nii.gz', bytes: scan.bytes }];
    expect(await failure(readImport(unnamed, { loose: { patientId: 'L', date: '2026-02-01' } }))).toEqual({
      file: 'thing.nii.gz', problem: expect.stringMatching(/cannot tell from its name/),
    });
    const twice = [...files, { relativePath: 'lesion_mask.nii.gz', bytes: scan.bytes }];
    expect((await failure(readImport(twice, { loose: { patientId: 'L', date: '2026-02-01' } }))).problem).toMatch(/both lesions.nii.gz and lesion_mask.nii.gz/);
    const noLesions = files.filter((f) => f.relativePath !== 'lesions.nii.gz');
    expect((await failure(readImport(noLesions, { loose: { patientId: 'L', date: '2026-02-01' } }))).problem).toMatch(/no lesion mask/);
    expect((await failure(readImport(files, { loose: { patientId: 'L', date: '2026-02-30' } }))).problem).toMatch(/real date/);
  });
});

describe('a patient already stored', () => {
  it('gains new visits, but a visit id already stored refuses the whole import', async () => {
    const db = freshDb();
    await commitImport(db, await readImport(patientFolder({ oneVisit: true })));
    const again = await failure(readImport(patientFolder()).then((p) => commitImport(db, p)));
    expect(again).toEqual({ file: 'patient DEMO-0101', problem: expect.stringMatching(/already stored with visit v1; nothing was imported/) });
    expect(await db.visits.count()).toBe(1);

    const secondOnly = patientFolder().filter((f) => !f.relativePath.includes('/v1/'));
    const manifest = JSON.parse(new TextDecoder().decode(secondOnly[0].bytes));
    manifest.visits = manifest.visits.filter((v: { id: string }) => v.id === 'v2');
    const result = await commitImport(db, await readImport(withFile(secondOnly, 'DEMO-0101/manifest.json', textFile(manifest))));
    expect(result.patients).toEqual([{ id: 'DEMO-0101', newPatient: false, visits: ['v2'] }]);
    expect(await db.visits.count()).toBe(2);
    expect(await db.treatments.count()).toBe(1);
  });
});
