import { badInput } from '../../src/errors.js';
import { parseMarks, type Mark } from '../../src/lesions/marks.js';
import {
  INPUT_KINDS, inputKey, volumeKey, type InputKind, type InputRecord, type JsonValue, type VisitRecord,
} from '../../src/model/records.js';
import { recordBytes, visitStoredBytes } from '../../src/model/storage-size.js';
import { roundTo } from '../../src/rounding.js';
import { checkLandmarks, LANDMARK_NAMES, OPTIONAL_LANDMARK, parseLandmarks, type LandmarkName, type LandmarkSet } from '../../src/segments/landmarks.js';
import { markJson } from '../viewer/caliper.js';
import type { FalciformDb } from './db.js';
import { recordEdit } from './patients.js';

/**
 * A reader's corrections to a visit, each in one transaction with its edit-trail entry.
 *
 * Manual marks live in the visit's marks file (contracts, "Manual marks"), rewritten whole on each
 * edit. A visit with a lesion mask may have marks too: the analysis takes the mask's lesions (L1,
 * L2, … by the mask) and then the marks (M1, M2, …), so a mark adds a lesion the mask missed and
 * never replaces one; mark ids of the form L<n> are refused on such a visit for that reason.
 * Landmarks live in the visit's landmark-set file; a set the plane rule cannot use is refused,
 * so the stored visit always stays analysable.
 */

const MARKS_FILE = 'marks.json';
const LANDMARKS_FILE = 'landmarks.json';

async function visitOf(db: FalciformDb, patientId: string, visitId: string): Promise<VisitRecord> {
  const visit = await db.visits.get([patientId, visitId]);
  if (!visit) throw badInput(`visit ${visitId}`, `is not among ${patientId}'s stored visits`);
  return visit;
}

/** The visit record after its inputs changed, with its stored size brought up to date. */
function withInputs(visit: VisitRecord, kinds: InputKind[], before: InputRecord | undefined, after: InputRecord | undefined): VisitRecord {
  const next: VisitRecord = { ...visit, inputs: INPUT_KINDS.filter((k) => kinds.includes(k)) };
  next.storedBytes = visit.storedBytes
    + visitStoredBytes(next, [], []) - visitStoredBytes(visit, [], [])
    + (after ? recordBytes(after) : 0) - (before ? recordBytes(before) : 0);
  return next;
}

const text = (x: unknown) => `${JSON.stringify(x, null, 2)}\n`;

function rawMarks(input: InputRecord | undefined): { file: Record<string, unknown>; marks: Record<string, unknown>[] } {
  if (!input) return { file: { space: 'RAS', units: 'mm' }, marks: [] };
  const file = JSON.parse(input.text) as Record<string, unknown>;
  return { file, marks: (file.marks as Record<string, unknown>[]) ?? [] };
}

async function writeMarks(
  db: FalciformDb, visit: VisitRecord, before: InputRecord | undefined, file: Record<string, unknown>, marks: Record<string, unknown>[],
): Promise<void> {
  const after: InputRecord = {
    key: inputKey(visit.patientId, visit.id, 'marks'),
    patientId: visit.patientId,
    visitId: visit.id,
    kind: 'marks',
    fileName: before?.fileName ?? MARKS_FILE,
    text: text({ ...file, marks }),
  };
  // The file as written must read back, or the next analysis of the patient would stop on it.
  parseMarks(after.text, `${visit.id}/${after.fileName}`);
  await db.inputs.put(after);
  await db.visits.put(withInputs(visit, [...visit.inputs, 'marks'], before, after));
}

/**
 * Adds a mark, or replaces the mark with the same id; the trail keeps the old and new mark. With
 * `only: 'create'` an existing id is refused, so a new mark can never overwrite one saved meanwhile.
 */
export async function saveMark(
  db: FalciformDb, patientId: string, visitId: string, mark: Mark, only?: 'create' | 'update',
): Promise<'create' | 'update'> {
  return db.transaction('rw', db.visits, db.inputs, db.audit, async () => {
    const visit = await visitOf(db, patientId, visitId);
    if (visit.volumes.includes('lesions') && /^L\d+$/.test(mark.id)) {
      throw badInput(`mark ${mark.id}`, 'ids L1, L2, … belong to the lesions of this visit\'s lesion mask; give the mark another id');
    }
    const before = await db.inputs.get(inputKey(patientId, visitId, 'marks'));
    const { file, marks } = rawMarks(before);
    const at = marks.findIndex((m) => m.id === mark.id);
    const old = at >= 0 ? marks[at] : null;
    if (only === 'create' && old) throw badInput(`mark ${mark.id}`, `visit ${visitId} has a mark with this id already`);
    if (only === 'update' && !old) throw badInput(`mark ${mark.id}`, `is not among visit ${visitId}'s marks`);
    // Fields the app does not edit (a viable diameter, say) stay as they were.
    const next = { ...(old ?? {}), ...markJson(mark) };
    if (mark.endpointsMm === null) delete next.endpointsMm;
    const list = at >= 0 ? marks.map((m, k) => (k === at ? next : m)) : [...marks, next];
    await writeMarks(db, visit, before, file, list);
    const action = old ? 'update' : 'create';
    await recordEdit(db, {
      patientId, entity: 'lesion', entityId: `${visitId}/${mark.id}`, field: 'mark', action,
      oldValue: old as JsonValue, newValue: next as JsonValue,
    });
    return action;
  });
}

/**
 * Sets or clears (null) a mark's viable (enhancing) diameter for mRECIST, to 0.1 mm, with its trail
 * entry. The marks file's own rule decides what is allowed (src/lesions/marks.ts: a length ≥ 0, no
 * longer than the mark's longest diameter); a refused value changes nothing.
 */
export async function saveMarkViable(db: FalciformDb, patientId: string, visitId: string, markId: string, viableAxialMm: number | null): Promise<void> {
  await db.transaction('rw', db.visits, db.inputs, db.audit, async () => {
    const visit = await visitOf(db, patientId, visitId);
    const before = await db.inputs.get(inputKey(patientId, visitId, 'marks'));
    const { file, marks } = rawMarks(before);
    const old = marks.find((m) => m.id === markId);
    if (!before || !old) throw badInput(`mark ${markId}`, `is not among visit ${visitId}'s marks`);
    const next: Record<string, unknown> = { ...old };
    if (viableAxialMm === null) delete next.viableAxialMm;
    else next.viableAxialMm = roundTo(viableAxialMm, 1);
    await writeMarks(db, visit, before, file, marks.map((m) => (m === old ? next : m)));
    await recordEdit(db, {
      patientId, entity: 'lesion', entityId: `${visitId}/${markId}`, field: 'viableAxialMm', action: 'update',
      oldValue: (old.viableAxialMm ?? null) as JsonValue, newValue: (next.viableAxialMm ?? null) as JsonValue,
    });
  });
}

/** Removes one mark from the visit's marks file (the file stays, possibly with no marks). */
export async function deleteMark(db: FalciformDb, patientId: string, visitId: string, markId: string): Promise<void> {
  await db.transaction('rw', db.visits, db.inputs, db.audit, async () => {
    const visit = await visitOf(db, patientId, visitId);
    const before = await db.inputs.get(inputKey(patientId, visitId, 'marks'));
    const { file, marks } = rawMarks(before);
    const old = marks.find((m) => m.id === markId);
    if (!before || !old) throw badInput(`mark ${markId}`, `is not among visit ${visitId}'s marks`);
    await writeMarks(db, visit, before, file, marks.filter((m) => m !== old));
    await recordEdit(db, {
      patientId, entity: 'lesion', entityId: `${visitId}/${markId}`, field: 'mark', action: 'delete',
      oldValue: old as JsonValue, newValue: null,
    });
  });
}

function landmarksRecord(visit: VisitRecord, fileName: string, file: Record<string, unknown>, set: LandmarkSet): InputRecord {
  const points: Record<string, number[]> = {};
  for (const name of LANDMARK_NAMES) points[name] = set.points[name].map((x) => roundTo(x, 1));
  const extra = set.points[OPTIONAL_LANDMARK];
  if (extra) points[OPTIONAL_LANDMARK] = extra.map((x) => roundTo(x, 1));
  return {
    key: inputKey(visit.patientId, visit.id, 'landmarks'),
    patientId: visit.patientId,
    visitId: visit.id,
    kind: 'landmarks',
    fileName,
    text: text({ space: 'RAS', units: 'mm', ...file, points }),
  };
}

/**
 * Stores a visit's moved landmarks (0.1 mm) with one trail entry per point that changed; returns
 * the points that changed. Refuses a set the plane rule cannot use, naming its problems.
 */
export async function saveLandmarks(db: FalciformDb, patientId: string, visitId: string, set: LandmarkSet): Promise<LandmarkName[]> {
  return db.transaction('rw', db.visits, db.inputs, db.audit, async () => {
    const visit = await visitOf(db, patientId, visitId);
    const before = await db.inputs.get(inputKey(patientId, visitId, 'landmarks'));
    if (!before || !visit.volumes.includes('liver')) {
      throw badInput(`visit ${visitId}`, 'its segment map is not built from landmarks, so it has no landmarks to move');
    }
    const file = JSON.parse(before.text) as Record<string, unknown>;
    const old = parseLandmarks(before.text, before.fileName);
    const after = landmarksRecord(visit, before.fileName, file, set);
    const stored = parseLandmarks(after.text, after.fileName);
    checkLandmarks(stored, `${visitId}/${after.fileName}`);
    const moved = LANDMARK_NAMES.filter((n) => stored.points[n].some((x, c) => x !== old.points[n][c]));
    if (moved.length === 0) return [];
    await db.inputs.put(after);
    await db.visits.put(withInputs(visit, visit.inputs, before, after));
    for (const name of moved) {
      await recordEdit(db, {
        patientId, entity: 'visit', entityId: visitId, field: `landmarks.${name}`, action: 'update',
        oldValue: [...old.points[name]], newValue: [...stored.points[name]],
      });
    }
    return moved;
  });
}

/**
 * Gives a visit with a liver mask and no landmark set a map built from landmarks: stores the set and
 * removes an imported map (and its scheme) if there is one, all in one transaction, with trail
 * entries for both; `origin` says where the points came from (a confirmed proposal, say). A backup
 * made before keeps the imported map.
 */
export async function buildMapFromLandmarks(
  db: FalciformDb, patientId: string, visitId: string, set: LandmarkSet, origin?: { [key: string]: JsonValue },
): Promise<void> {
  await db.transaction('rw', [db.visits, db.inputs, db.volumes, db.audit], async () => {
    const visit = await visitOf(db, patientId, visitId);
    if (!visit.volumes.includes('liver')) {
      throw badInput(`visit ${visitId}`, 'has no liver mask; a segment map is built from landmarks inside the liver mask');
    }
    if (visit.inputs.includes('landmarks')) throw badInput(`visit ${visitId}`, 'already has landmarks');
    const after = landmarksRecord(visit, LANDMARKS_FILE, {}, set);
    checkLandmarks(parseLandmarks(after.text, after.fileName), `${visitId}/${after.fileName}`);
    const segments = await db.volumes.get(volumeKey(patientId, visitId, 'segments'));
    const scheme = await db.inputs.get(inputKey(patientId, visitId, 'scheme'));
    const { scheme: _scheme, ...rest } = visit;
    const next: VisitRecord = {
      ...rest,
      volumes: visit.volumes.filter((r) => r !== 'segments'),
      inputs: INPUT_KINDS.filter((k) => k === 'landmarks' || (k !== 'scheme' && visit.inputs.includes(k))),
      storedBytes: 0,
    };
    next.storedBytes = visit.storedBytes
      + visitStoredBytes(next, [], []) - visitStoredBytes(visit, [], [])
      + recordBytes(after) - (segments ? recordBytes(segments) : 0) - (scheme ? recordBytes(scheme) : 0);
    if (segments) await db.volumes.delete(segments.key);
    if (scheme) await db.inputs.delete(scheme.key);
    await db.inputs.put(after);
    await db.visits.put(next);
    if (segments) {
      await recordEdit(db, {
        patientId, entity: 'visit', entityId: visitId, field: 'segments', action: 'delete',
        oldValue: { fileName: segments.fileName, ...(scheme ? { scheme: scheme.fileName } : {}) }, newValue: null,
      });
    }
    await recordEdit(db, {
      patientId, entity: 'visit', entityId: visitId, field: 'landmarks', action: 'create',
      oldValue: null, newValue: { ...(JSON.parse(after.text) as { [key: string]: JsonValue }), ...(origin ? { origin } : {}) },
    });
  });
}
