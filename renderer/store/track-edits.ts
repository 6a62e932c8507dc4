import { badInput } from '../../src/errors.js';
import { isTrackId } from '../../src/followup/ids.js';
import { checkTargetCount } from '../../src/followup/recist.js';
import type { JsonValue, OverrideRecord, PatientRecord } from '../../src/model/records.js';
import type { FalciformDb } from './db.js';
import { recordEdit, updatePatient } from './patients.js';
import { trailId } from './record-helpers.js';

/**
 * A reader's corrections of the lesion tracks, each stored with its trail entry in one transaction:
 * link a lesion to a track, unlink it from one, mark it as a new lesion, choose the RECIST targets.
 * The analysis reads the overrides in time order, so recomputing gives the corrected tracks.
 *
 * A track is named in an override by where it starts ("v1:L2": the track holding L2 at v1), not by
 * its number: numbers after the corrected visit can shift when an edit adds or removes a track.
 * The trail records the track numbers the reader saw, old → new.
 */

/** A lesion at a visit, with the track it is in now (as the reader sees it). */
export interface LesionAt {
  visit: string;
  lesion: string;
  /** The track holding the lesion now, e.g. "C"; null if none. */
  currentTrack: string | null;
}

/** A track as an override names it (`ref`) and as the reader sees it (`label`, e.g. "A"). */
export interface TrackName {
  ref: string;
  label: string;
}

/** The stable way to name a track in an override: its first visit and its lesion there. */
export function trackRef(track: { id: string; firstVisit: string; lesions: Record<string, string> }): string {
  const lesion = track.lesions[track.firstVisit];
  return lesion ? `${track.firstVisit}:${lesion}` : track.id;
}

/** Links the lesion to the track, replacing earlier corrections of the same lesion. */
export async function linkLesion(db: FalciformDb, patientId: string, at: LesionAt, track: TrackName): Promise<OverrideRecord> {
  if (at.currentTrack === track.label) throw badInput(`${at.visit}/${at.lesion}`, `is already in ${track.label}`);
  return addOverride(db, patientId, { kind: 'link', visit: at.visit, lesion: at.lesion, track: track.ref }, at.currentTrack, track.label);
}

/** Keeps the lesion out of the track; the matching may still pair it with another one. */
export function unlinkLesion(db: FalciformDb, patientId: string, at: LesionAt, track: TrackName): Promise<OverrideRecord> {
  return addOverride(db, patientId, { kind: 'unlink', visit: at.visit, lesion: at.lesion, track: track.ref }, at.currentTrack, `not ${track.label}`);
}

/** Makes the lesion start a track of its own: a new lesion at that visit. */
export function markNewLesion(db: FalciformDb, patientId: string, at: LesionAt): Promise<OverrideRecord> {
  return addOverride(db, patientId, { kind: 'new', visit: at.visit, lesion: at.lesion }, at.currentTrack, 'new lesion');
}

/** A patient's corrections, oldest first (the order the analysis applies them in). */
export async function patientOverrides(db: FalciformDb, patientId: string): Promise<OverrideRecord[]> {
  return db.overrides.where('patientId').equals(patientId).sortBy('at');
}

/** Withdraws one correction: the automatic matching decides that lesion again. */
export async function removeOverride(db: FalciformDb, patientId: string, overrideId: string): Promise<void> {
  await db.transaction('rw', db.overrides, db.audit, async () => {
    const o = await db.overrides.get(overrideId);
    if (!o || o.patientId !== patientId) throw badInput(`correction ${overrideId}`, `is not stored for patient ${patientId}`);
    await db.overrides.delete(overrideId);
    await recordEdit(db, {
      patientId, entity: 'override', entityId: o.id, field: describe(o), action: 'delete', oldValue: overrideJson(o), newValue: null,
    });
  });
}

/**
 * Names the RECIST target tracks (baseline tracks), or none for the automatic choice (the largest
 * measurable lesions). RECIST 1.1 takes at most two per organ and the liver is one organ.
 */
export async function setTargets(db: FalciformDb, patientId: string, targets: readonly string[]): Promise<PatientRecord> {
  // The same rule the command line applies to a manifest's targets.
  checkTargetCount(targets);
  for (const t of targets) if (!isTrackId(t)) throw badInput('targets', `${t} is not a lesion track id (A, B, …)`);
  return updatePatient(db, patientId, { targets: targets.length > 0 ? [...targets] : undefined });
}

type NewOverride = Omit<OverrideRecord, 'id' | 'patientId' | 'at'>;

async function addOverride(db: FalciformDb, patientId: string, o: NewOverride, oldTrack: string | null, newValue: string): Promise<OverrideRecord> {
  return db.transaction('rw', db.patients, db.overrides, db.audit, async () => {
    if (!(await db.patients.get(patientId))) throw badInput(`patient ${patientId}`, 'is not stored on this computer');
    const record: OverrideRecord = { id: `o-${trailId()}`, patientId, ...o, at: new Date().toISOString() };
    // Earlier decisions on the same lesion would contradict this one: the newest correction stands alone.
    const earlier = (await db.overrides.where('patientId').equals(patientId).toArray()).filter(
      (x) => x.visit === o.visit && x.lesion === o.lesion && (x.kind !== 'unlink' || o.kind !== 'unlink' || x.track === o.track),
    );
    for (const x of earlier) {
      await db.overrides.delete(x.id);
      await recordEdit(db, { patientId, entity: 'override', entityId: x.id, field: describe(x), action: 'delete', oldValue: overrideJson(x), newValue: null });
    }
    await db.overrides.add(record);
    await recordEdit(db, { patientId, entity: 'override', entityId: record.id, field: describe(record), action: 'create', oldValue: oldTrack, newValue });
    return record;
  });
}

function describe(o: Pick<OverrideRecord, 'kind' | 'visit' | 'lesion'>): string {
  return `${o.kind} ${o.visit}/${o.lesion}`;
}

function overrideJson(o: OverrideRecord): JsonValue {
  return { kind: o.kind, visit: o.visit, lesion: o.lesion, ...(o.track ? { track: o.track } : {}) };
}
