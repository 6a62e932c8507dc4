import { badInput } from '../../src/errors.js';
import type { TreatmentRecord } from '../../src/model/records.js';
import type { FalciformDb } from './db.js';
import { recordEdit } from './patients.js';

/** Treatment events a reader enters (a therapy started, an ablation, a resection), each with its trail entry. */

export const TREATMENT_KINDS: readonly TreatmentRecord['kind'][] = ['therapy-start', 'therapy-end', 'ablation', 'resection', 'embolisation', 'other'];

export type NewTreatment = Pick<TreatmentRecord, 'date' | 'kind' | 'label'>;

export function patientTreatments(db: FalciformDb, patientId: string): Promise<TreatmentRecord[]> {
  return db.treatments.where('patientId').equals(patientId).sortBy('date');
}

export async function addTreatment(db: FalciformDb, patientId: string, t: NewTreatment): Promise<TreatmentRecord> {
  const label = t.label.trim();
  if (!isRealDate(t.date)) throw badInput('treatment date', `must be a real date written YYYY-MM-DD, got "${t.date}"`);
  if (!TREATMENT_KINDS.includes(t.kind)) throw badInput('treatment kind', `must be one of ${TREATMENT_KINDS.join(', ')}`);
  if (label.length === 0 || label.length > 200) throw badInput('treatment label', 'must be 1 to 200 characters');
  return db.transaction('rw', db.patients, db.treatments, db.audit, async () => {
    if (!(await db.patients.get(patientId))) throw badInput(`patient ${patientId}`, 'is not stored on this computer');
    // Ids as the import makes them (date and kind, numbered when repeated), so the two never clash.
    const taken = new Set((await db.treatments.where('patientId').equals(patientId).toArray()).map((x) => x.id));
    const base = `${t.date}-${t.kind}`;
    let id = base;
    for (let n = 2; taken.has(id); n++) id = `${base}-${n}`;
    const record: TreatmentRecord = { patientId, id, date: t.date, kind: t.kind, label };
    await db.treatments.add(record);
    await recordEdit(db, {
      patientId, entity: 'treatment', entityId: id, field: 'treatment', action: 'create',
      oldValue: null, newValue: { date: t.date, kind: t.kind, label },
    });
    return record;
  });
}

export async function deleteTreatment(db: FalciformDb, patientId: string, id: string): Promise<void> {
  await db.transaction('rw', db.treatments, db.audit, async () => {
    const t = await db.treatments.get([patientId, id]);
    if (!t) throw badInput(`treatment ${id}`, `is not stored for patient ${patientId}`);
    await db.treatments.delete([patientId, id]);
    await recordEdit(db, {
      patientId, entity: 'treatment', entityId: id, field: 'treatment', action: 'delete',
      oldValue: { date: t.date, kind: t.kind, label: t.label }, newValue: null,
    });
  });
}

function isRealDate(s: string): boolean {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(s)) return false;
  const d = new Date(`${s}T00:00:00Z`);
  return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
}
