import { badInput } from '../../src/errors.js';
import { volumeKey, type JsonValue, type VisitRecord, type VolumeRecord, VOLUME_ROLES } from '../../src/model/records.js';
import { recordBytes, visitStoredBytes } from '../../src/model/storage-size.js';
import type { FalciformDb } from './db.js';
import { recordEdit } from './patients.js';

/**
 * Stores a mask grown in the viewer (a liver mask, or the lesion mask with a new lesion) as the
 * visit's volume of that role, replacing the one before, with one edit-trail entry that names how it
 * was grown. The old volume's file name and size stay in the trail; a backup keeps its voxels.
 */
export async function saveGrownMask(
  db: FalciformDb,
  patientId: string,
  visitId: string,
  role: 'liver' | 'lesions',
  grown: { bytes: Uint8Array; dims: number[]; affine: number[] },
  how: Record<string, JsonValue>,
): Promise<VolumeRecord | undefined> {
  return db.transaction('rw', [db.visits, db.volumes, db.audit], async () => {
    const visit = await db.visits.get([patientId, visitId]);
    if (!visit) throw badInput(`visit ${visitId}`, `is not among ${patientId}'s stored visits`);
    const before = await db.volumes.get(volumeKey(patientId, visitId, role));
    const [nx, ny, nz] = grown.dims;
    const record: VolumeRecord = {
      key: volumeKey(patientId, visitId, role),
      patientId,
      visitId,
      role,
      fileName: role === 'liver' ? 'liver-grown.nii.gz' : 'lesions-grown.nii.gz',
      bytes: grown.bytes,
      dims: [...grown.dims],
      affine: [...grown.affine],
      datatype: 'uint8',
      volumeBytes: nx * ny * nz,
      importedBytes: grown.bytes.byteLength,
    };
    const next: VisitRecord = { ...visit, volumes: VOLUME_ROLES.filter((r) => r === role || visit.volumes.includes(r)) };
    next.storedBytes = visit.storedBytes + visitStoredBytes(next, [], []) - visitStoredBytes(visit, [], [])
      + recordBytes(record) - (before ? recordBytes(before) : 0);
    await db.volumes.put(record);
    await db.visits.put(next);
    await recordEdit(db, {
      patientId, entity: 'visit', entityId: visitId, field: role, action: before ? 'update' : 'create',
      oldValue: before ? { fileName: before.fileName, bytes: before.bytes.byteLength } : null,
      newValue: { fileName: record.fileName, grown: how },
    });
    return before;
  });
}

/**
 * Undoes one change of a grown or brushed mask: puts back the volume record as it was before (or
 * removes the role when there was none), with its own edit-trail entry.
 */
export async function restoreMask(db: FalciformDb, patientId: string, visitId: string, role: 'liver' | 'lesions', before: VolumeRecord | undefined): Promise<void> {
  await db.transaction('rw', [db.visits, db.volumes, db.audit], async () => {
    const visit = await db.visits.get([patientId, visitId]);
    if (!visit) throw badInput(`visit ${visitId}`, `is not among ${patientId}'s stored visits`);
    const now = await db.volumes.get(volumeKey(patientId, visitId, role));
    const next: VisitRecord = { ...visit, volumes: VOLUME_ROLES.filter((r) => (r === role ? before !== undefined : visit.volumes.includes(r))) };
    next.storedBytes = visit.storedBytes + visitStoredBytes(next, [], []) - visitStoredBytes(visit, [], [])
      + (before ? recordBytes(before) : 0) - (now ? recordBytes(now) : 0);
    if (before) await db.volumes.put(before);
    else if (now) await db.volumes.delete(now.key);
    await db.visits.put(next);
    await recordEdit(db, {
      patientId, entity: 'visit', entityId: visitId, field: role, action: before ? 'update' : 'delete',
      oldValue: now ? { fileName: now.fileName, bytes: now.bytes.byteLength } : null,
      newValue: before ? { fileName: before.fileName, undo: true } : null,
    });
  });
}
