// A loose visit whose scan is a DICOM series (written by pydicom from the fixture's NIfTI scan,
// tests/reference/nifti_to_dicom.py) imported into the local store: the scan is stored as NIfTI with
// the same world geometry and values (DICOM PS3.3 C.7.6.2.1.1; compared through world coordinates),
// the visit keeps the header facts, the audit trail the series UID, and a backup round-trips them.
// Files of two patients in one import are refused. The same series as JPEG-LS Lossless (GDCM's
// gdcmconv) goes through the decoder handed to the import, and is refused by name without one.
import 'fake-indexeddb/auto';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import type { OpenedFile } from '../../main/bridge-api.js';
import { createBackup, readBackup, restoreBackup } from '../../renderer/store/backup.js';
import { FalciformDb } from '../../renderer/store/db.js';
import { commitImport, readImport } from '../../renderer/store/import.js';
import { nodeDecodeImage } from '../../src/cli/dicom-io.js';
import { isFalciformError } from '../../src/errors.js';
import { readNifti } from '../../src/volume/nifti-read.js';
import { webInflate } from '../../src/volume/web-gzip.js';
import { expectSameInWorld } from '../dicom/fixtures.js';
import { dbName, dropAll, track } from './dump.js';
import { patientFolder } from './fixtures.js';

const freshDb = () => track(new FalciformDb(dbName('dicom')));
afterEach(dropAll);

let v1: OpenedFile[];
let dicom: OpenedFile[];
let jpegLs: OpenedFile[];

beforeAll(() => {
  v1 = patientFolder({ id: 'X', oneVisit: true }).filter((f) => f.relativePath.includes('/v1/'));
  const dir = mkdtempSync(join(tmpdir(), 'falciform-dicom-store-'));
  writeFileSync(join(dir, 'scan.nii.gz'), v1.find((f) => f.relativePath.endsWith('scan.nii.gz'))!.bytes);
  const r = spawnSync('/usr/bin/python3', ['tests/reference/nifti_to_dicom.py', join(dir, 'scan.nii.gz'), join(dir, 'dicom')], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(r.stderr);
  dicom = readdirSync(join(dir, 'dicom')).map((n) => ({ relativePath: `export/dicom/${n}`, bytes: new Uint8Array(readFileSync(join(dir, 'dicom', n))) }));
  const c = spawnSync('/usr/bin/python3', ['tests/reference/nifti_to_dicom.py', join(dir, 'scan.nii.gz'), join(dir, 'jpeg-ls'), 'jpegls'], { encoding: 'utf8' });
  if (c.status !== 0) throw new Error(c.stderr);
  jpegLs = readdirSync(join(dir, 'jpeg-ls')).map((n) => ({ relativePath: `export/dicom/${n}`, bytes: new Uint8Array(readFileSync(join(dir, 'jpeg-ls', n))) }));
}, 120_000);

const visitFiles = () => [
  ...dicom.map((f) => ({ ...f, bytes: f.bytes.slice() })),
  ...v1.filter((f) => !f.relativePath.endsWith('scan.nii.gz')).map((f) => ({ relativePath: `export/${f.relativePath.split('/').pop()}`, bytes: f.bytes.slice() })),
];

describe('DICOM series as a visit scan in the store', () => {
  it('stores the series as NIfTI equal to the source scan in world space, with header facts and the series UID in the audit trail', async () => {
    const db = freshDb();
    const plan = await readImport(visitFiles(), { loose: { patientId: 'DCM-0007', date: '2026-05-20' } });
    const visit = plan.patients[0].visits[0];
    expect(visit.dicom).toMatchObject({ studyDate: '2026-05-20', modality: 'CT', seriesDescription: 'Abdomen portal venous', sliceThicknessMm: 3, kvp: 120, contrastAgent: 'IODINE', manufacturerModel: 'Phantom 1' });
    expect(JSON.stringify(plan)).not.toContain('Example'); // the header's patient name is not stored
    expect(plan.ignored).toEqual([]);
    await commitImport(db, plan);
    const stored = await db.volumes.get('DCM-0007/2026-05-20/scan');
    expect(stored).toMatchObject({ fileName: 'DICOM series 4 Abdomen portal venous', dims: [64, 48, 40], datatype: 'int16' });
    const ours = (await readNifti(stored!.bytes, 'stored', { inflate: webInflate })).volume;
    const source = (await readNifti(v1.find((f) => f.relativePath.endsWith('scan.nii.gz'))!.bytes, 'source', { inflate: webInflate })).volume;
    expect(expectSameInWorld(ours, source, 1e-3)).toBe(64 * 48 * 40);
    const trail = await db.audit.where('patientId').equals('DCM-0007').toArray();
    const uid = visit.dicom!.seriesUid;
    expect(trail.find((t) => t.field === 'dicomSeries')).toMatchObject({ entity: 'visit', entityId: '2026-05-20', newValue: uid, action: 'import' });

    const target = freshDb();
    await restoreBackup(target, await readBackup(await createBackup(db, 'all'), 'all.falciform'));
    expect((await target.visits.get(['DCM-0007', '2026-05-20']))?.dicom).toEqual(visit.dicom);
  });

  it("a manifest visit's scan may name a folder of DICOM files", async () => {
    const manifest = { patient: { id: 'DCM-0007' }, visits: [{ id: 'v1', date: '2026-05-20', scan: 'v1/dicom', segments: 'v1/segments.nii.gz', lesions: 'v1/lesions.nii.gz' }] };
    const files: OpenedFile[] = [
      { relativePath: 'P/manifest.json', bytes: new TextEncoder().encode(JSON.stringify(manifest)) },
      ...dicom.map((f) => ({ relativePath: `P/v1/dicom/${f.relativePath.split('/').pop()}`, bytes: f.bytes.slice() })),
      ...v1.filter((f) => !f.relativePath.endsWith('scan.nii.gz')).map((f) => ({ relativePath: `P/v1/${f.relativePath.split('/').pop()}`, bytes: f.bytes.slice() })),
    ];
    const plan = await readImport(files);
    expect(plan.ignored).toEqual([]);
    expect(plan.patients[0].visits[0].dicom?.seriesDescription).toBe('Abdomen portal venous');
    const scan = plan.patients[0].volumes.find((v) => v.role === 'scan')!;
    const source = (await readNifti(v1.find((f) => f.relativePath.endsWith('scan.nii.gz'))!.bytes, 'source', { inflate: webInflate })).volume;
    expect(expectSameInWorld((await readNifti(scan.bytes, 'stored', { inflate: webInflate })).volume, source, 1e-3)).toBe(64 * 48 * 40);
  });

  it('a JPEG-LS Lossless series is decoded by the handed-in decoder to the same scan, and refused by name without one', async () => {
    const others = v1.filter((f) => !f.relativePath.endsWith('scan.nii.gz')).map((f) => ({ relativePath: `export/${f.relativePath.split('/').pop()}`, bytes: f.bytes.slice() }));
    const files = () => [...jpegLs.map((f) => ({ ...f, bytes: f.bytes.slice() })), ...others];
    const plan = await readImport(files(), { loose: { patientId: 'DCM-0007', date: '2026-05-20' }, decodeImage: nodeDecodeImage });
    const scan = plan.patients[0].volumes.find((v) => v.role === 'scan')!;
    const source = (await readNifti(v1.find((f) => f.relativePath.endsWith('scan.nii.gz'))!.bytes, 'source', { inflate: webInflate })).volume;
    expect(expectSameInWorld((await readNifti(scan.bytes, 'stored', { inflate: webInflate })).volume, source, 1e-3)).toBe(64 * 48 * 40);
    const e = await readImport(files(), { loose: { patientId: 'DCM-0007', date: '2026-05-20' } }).then(() => null, (x: unknown) => x);
    expect(isFalciformError(e) && e.message).toMatch(/^export\/dicom\/\w+: has JPEG-LS Lossless frame 1 that cannot be decoded \(no JPEG-LS decoder is loaded here\)$/);
  });

  it('refuses DICOM files of two patients in one import', async () => {
    const files = visitFiles();
    // Re-label one slice's PatientID (same length, so the element stays valid): "DCM-0007" → "DCM-0008".
    const f = files[0];
    const text = new TextDecoder('latin1').decode(f.bytes);
    const at = text.indexOf('DCM-0007');
    f.bytes[at + 7] = '8'.charCodeAt(0);
    const e = await readImport(files, { loose: { patientId: 'DCM-0007', date: '2026-05-20' } }).then(() => null, (x: unknown) => x);
    expect(isFalciformError(e) && e.message).toMatch(/the chosen DICOM files: belong to 2 different patients \(patient IDs DCM-000[78], DCM-000[78]\)/);
  });
});
