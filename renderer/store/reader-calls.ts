import { badInput } from '../../src/errors.js';
import type { NewLesionCall, VisitReaderCalls } from '../../src/followup/reader-calls.js';
import type { NonTargetCall, OutsideLiverCall } from '../../src/followup/recist.js';
import type { JsonValue, VisitRecord } from '../../src/model/records.js';
import { visitStoredBytes } from '../../src/model/storage-size.js';
import type { FalciformDb } from './db.js';
import { recordEdit } from './patients.js';

/**
 * A reader's calls at a visit (the manifest's `readerCalls`, docs/formats.md), changed one at a time
 * in the app. Each change is stored on the visit record with its edit-trail entry in one transaction;
 * the trail entry is signed with the reader's name like every other.
 */
export type ReaderCallChange =
  | { call: 'nonTarget'; value: NonTargetCall | null }
  | { call: 'outsideLiver'; value: OutsideLiverCall | null }
  | { call: 'newLesion'; lesion: string; value: NewLesionCall | null }
  | { call: 'confirmedGone'; track: string; on: boolean }
  | { call: 'tooSmall'; lesion: string; on: boolean };

/** The calls after one change; a call set back to "not given" is left out. */
export function withReaderCall(calls: VisitReaderCalls, change: ReaderCallChange): VisitReaderCalls {
  const next: VisitReaderCalls = { ...calls };
  const toggle = (list: string[] | undefined, id: string, on: boolean) => {
    const rest = (list ?? []).filter((x) => x !== id);
    return on ? [...rest, id] : rest;
  };
  switch (change.call) {
    case 'nonTarget':
    case 'outsideLiver':
      if (change.value === null) delete next[change.call];
      else (next as Record<string, unknown>)[change.call] = change.value;
      break;
    case 'newLesion': {
      const map = { ...(next.newLesions ?? {}) };
      if (change.value === null) delete map[change.lesion];
      else map[change.lesion] = change.value;
      next.newLesions = map;
      break;
    }
    case 'confirmedGone':
      next.confirmedGone = toggle(next.confirmedGone, change.track, change.on);
      break;
    case 'tooSmall':
      next.tooSmall = toggle(next.tooSmall, change.lesion, change.on);
      break;
  }
  if (next.newLesions && Object.keys(next.newLesions).length === 0) delete next.newLesions;
  if (next.confirmedGone?.length === 0) delete next.confirmedGone;
  if (next.tooSmall?.length === 0) delete next.tooSmall;
  return next;
}

/** Field named in the trail for a change: `readerCalls.nonTarget`, `readerCalls.newLesions.L3`, … */
function trailField(change: ReaderCallChange): string {
  if (change.call === 'newLesion') return `readerCalls.newLesions.${change.lesion}`;
  if (change.call === 'tooSmall') return `readerCalls.tooSmall.${change.lesion}`;
  if (change.call === 'confirmedGone') return `readerCalls.confirmedGone.${change.track}`;
  return `readerCalls.${change.call}`;
}

function callValue(calls: VisitReaderCalls, change: ReaderCallChange): JsonValue {
  switch (change.call) {
    case 'nonTarget': return calls.nonTarget ?? null;
    case 'outsideLiver': return calls.outsideLiver ?? null;
    case 'newLesion': return calls.newLesions?.[change.lesion] ?? null;
    case 'confirmedGone': return calls.confirmedGone?.includes(change.track) ?? false;
    case 'tooSmall': return calls.tooSmall?.includes(change.lesion) ?? false;
  }
}

/** Stores one change of a visit's reader's calls with its trail entry; returns the calls as stored. */
export async function saveReaderCall(db: FalciformDb, patientId: string, visitId: string, change: ReaderCallChange): Promise<VisitReaderCalls> {
  return db.transaction('rw', db.visits, db.audit, async () => {
    const visit = await db.visits.get([patientId, visitId]);
    if (!visit) throw badInput(`visit ${visitId}`, `is not among ${patientId}'s stored visits`);
    const before = visit.readerCalls ?? {};
    const after = withReaderCall(before, change);
    const { readerCalls: _old, ...rest } = visit;
    const next: VisitRecord = Object.keys(after).length > 0 ? { ...rest, readerCalls: after } : { ...rest };
    next.storedBytes = visit.storedBytes + visitStoredBytes(next, [], []) - visitStoredBytes(visit, [], []);
    await db.visits.put(next);
    await recordEdit(db, {
      patientId, entity: 'visit', entityId: visitId, field: trailField(change), action: 'update',
      oldValue: callValue(before, change), newValue: callValue(after, change),
    });
    return after;
  });
}
