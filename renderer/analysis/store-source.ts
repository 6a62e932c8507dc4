import type { Manifest } from '../../src/manifest/manifest.js';
import type { InputKind, VolumeRole } from '../../src/model/records.js';
import { inputKey, volumeKey } from '../../src/model/records.js';
import type { PatientFiles } from '../../src/patient/load.js';
import { readNifti } from '../../src/volume/nifti-read.js';
import { webInflate } from '../../src/volume/web-gzip.js';
import type { FalciformDb } from '../store/db.js';
import { compact } from '../store/record-helpers.js';
import { patientTreatments } from '../store/treatment-edits.js';

/**
 * A stored patient seen as a study manifest whose paths are "visit/role" keys, with a file source
 * that reads the store: the app then runs exactly the loading and analysis the command line runs.
 */
export async function storedPatient(db: FalciformDb, patientId: string): Promise<{ manifest: Manifest; files: PatientFiles }> {
  const patient = await db.patients.get(patientId);
  if (!patient) throw new Error(`patient ${patientId} is not in the store`);
  const visits = await db.visits.where('patientId').equals(patientId).sortBy('date');
  const treatments = await patientTreatments(db, patientId);
  const manifest: Manifest = compact({
    patient: compact({
      id: patient.id,
      birthYear: patient.birthYear,
      heightCm: patient.heightCm,
      weightKg: patient.weightKg,
      sex: patient.sex,
      demo: patient.demo || undefined,
    }),
    marginMm: patient.marginMm,
    criteria: patient.criteria,
    targets: patient.targets?.length ? patient.targets : undefined,
    resection: patient.resection,
    protocol: patient.protocol,
    treatments: treatments.map(({ date, kind, label }) => ({ date, kind, label })),
    visits: visits.map((v) => {
      // A stored file's manifest path; none where the visit has no such file.
      const volume = (r: VolumeRole) => (v.volumes.includes(r) ? `${v.id}/${r}` : undefined);
      const input = (k: InputKind) => (v.inputs.includes(k) ? `${v.id}/${k}` : undefined);
      return compact({
        id: v.id,
        date: v.date,
        scan: `${v.id}/scan`,
        segments: volume('segments'),
        scheme: volume('segments') && (input('scheme') ?? 'default'),
        liver: volume('liver'),
        landmarks: input('landmarks'),
        caudate: volume('caudate'),
        splitIV: v.splitIV || undefined,
        lesions: volume('lesions'),
        marks: input('marks'),
        viable: volume('viable'),
        note: v.note || undefined,
        readerCalls: v.readerCalls,
      });
    }),
  });
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
