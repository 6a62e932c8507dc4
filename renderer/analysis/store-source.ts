import type { Manifest } from '../../src/manifest/manifest.js';
import type { InputKind, VolumeRole } from '../../src/model/records.js';
import { inputKey, volumeKey } from '../../src/model/records.js';
import type { PatientFiles } from '../../src/patient/load.js';
import { readNifti } from '../../src/volume/nifti-read.js';
import { webInflate } from '../../src/volume/web-gzip.js';
import type { FalciformDb } from '../store/db.js';

/**
 * A stored patient seen as a study manifest whose paths are "visit/role" keys, with a file source
 * that reads the store: the app then runs exactly the loading and analysis the command line runs.
 */
export async function storedPatient(db: FalciformDb, patientId: string): Promise<{ manifest: Manifest; files: PatientFiles }> {
  const patient = await db.patients.get(patientId);
  if (!patient) throw new Error(`patient ${patientId} is not in the store`);
  const visits = (await db.visits.where('patientId').equals(patientId).toArray()).sort((a, b) => a.date.localeCompare(b.date));
  const treatments = await db.treatments.where('patientId').equals(patientId).toArray();
  const path = (visitId: string, what: VolumeRole | InputKind) => `${visitId}/${what}`;
  const manifest: Manifest = {
    patient: {
      id: patient.id,
      ...(patient.birthYear !== undefined ? { birthYear: patient.birthYear } : {}),
      ...(patient.heightCm !== undefined ? { heightCm: patient.heightCm } : {}),
      ...(patient.weightKg !== undefined ? { weightKg: patient.weightKg } : {}),
      ...(patient.sex !== undefined ? { sex: patient.sex } : {}),
      ...(patient.demo ? { demo: true } : {}),
    },
    marginMm: patient.marginMm,
    ...(patient.criteria ? { criteria: patient.criteria } : {}),
    ...(patient.targets?.length ? { targets: patient.targets } : {}),
    ...(patient.resection ? { resection: patient.resection } : {}),
    treatments: treatments.map(({ date, kind, label }) => ({ date, kind, label })),
    visits: visits.map((v) => {
      const has = (r: VolumeRole) => v.volumes.includes(r);
      const hasInput = (k: InputKind) => v.inputs.includes(k);
      return {
        id: v.id,
        date: v.date,
        scan: path(v.id, 'scan'),
        ...(has('segments') ? { segments: path(v.id, 'segments'), scheme: hasInput('scheme') ? path(v.id, 'scheme') : 'default' } : {}),
        ...(has('liver') ? { liver: path(v.id, 'liver') } : {}),
        ...(hasInput('landmarks') ? { landmarks: path(v.id, 'landmarks') } : {}),
        ...(has('caudate') ? { caudate: path(v.id, 'caudate') } : {}),
        ...(v.splitIV ? { splitIV: true } : {}),
        ...(has('lesions') ? { lesions: path(v.id, 'lesions') } : {}),
        ...(hasInput('marks') ? { marks: path(v.id, 'marks') } : {}),
        ...(has('viable') ? { viable: path(v.id, 'viable') } : {}),
        ...(v.note ? { note: v.note } : {}),
      };
    }),
  };
  const split = (p: string) => {
    const at = p.indexOf('/');
    return [p.slice(0, at), p.slice(at + 1)] as const;
  };
  const names = new Map<string, string>();
  const files: PatientFiles = {
    name: (p) => names.get(p) ?? p,
    async volume(p) {
      const [visitId, role] = split(p);
      const record = await db.volumes.get(volumeKey(patientId, visitId, role as VolumeRole));
      if (!record) throw new Error(`${p}: volume missing from the store`);
      names.set(p, `${visitId}/${record.fileName}`);
      return readNifti(record.bytes, `${visitId}/${record.fileName}`, { inflate: webInflate });
    },
    async text(p) {
      const [visitId, kind] = split(p);
      const record = await db.inputs.get(inputKey(patientId, visitId, kind as InputKind));
      if (!record) throw new Error(`${p}: file missing from the store`);
      names.set(p, `${visitId}/${record.fileName}`);
      return record.text;
    },
  };
  return { manifest, files };
}
