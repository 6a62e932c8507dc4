import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it } from 'vitest';
import { FalciformDb } from '../../renderer/store/db.js';
import { patientTrail } from '../../renderer/store/patients.js';
import { linkLesion, markNewLesion, patientOverrides, removeOverride, setTargets, trackRef, unlinkLesion } from '../../renderer/store/track-edits.js';
import { addTreatment, deleteTreatment, patientTreatments } from '../../renderer/store/treatment-edits.js';
import { runFollowup, type FollowupLesion, type FollowupVisit } from '../../src/followup/followup.js';
import type { Override } from '../../src/followup/tracks.js';
import { isFalciformError } from '../../src/errors.js';
import type { OverrideRecord } from '../../src/model/records.js';
import { dbName, dropAll, track } from './dump.js';

afterEach(dropAll);

async function store(): Promise<FalciformDb> {
  const db = track(new FalciformDb(dbName('track-edits')));
  await db.patients.add({ id: 'P-1', marginMm: 10, createdAt: '2026-01-01T00:00:00.000Z' });
  return db;
}

async function failure(p: Promise<unknown>): Promise<string> {
  const e = await p.then(() => null, (x: unknown) => x);
  if (!isFalciformError(e)) throw new Error(`expected a Falciform error, got ${String(e)}`);
  return e.message;
}

const A = { ref: 'v1:L1', label: 'A' };
const B = { ref: 'v1:L2', label: 'B' };

describe('track edits', () => {
  it('a link stores the override and its trail entry (track seen before → after)', async () => {
    const db = await store();
    const o = await linkLesion(db, 'P-1', { visit: 'v2', lesion: 'L3', currentTrack: 'C' }, A);
    expect(o).toMatchObject({ patientId: 'P-1', kind: 'link', visit: 'v2', lesion: 'L3', track: 'v1:L1' });
    expect(await patientOverrides(db, 'P-1')).toEqual([o]);
    const trail = await patientTrail(db, 'P-1');
    expect(trail).toHaveLength(1);
    expect(trail[0]).toMatchObject({ entity: 'override', entityId: o.id, field: 'link v2/L3', action: 'create', oldValue: 'C', newValue: 'A' });
  });

  it('unlink and mark-as-new are stored the same way', async () => {
    const db = await store();
    await unlinkLesion(db, 'P-1', { visit: 'v2', lesion: 'L1', currentTrack: 'A' }, A);
    await markNewLesion(db, 'P-1', { visit: 'v3', lesion: 'L2', currentTrack: 'B' });
    expect((await patientOverrides(db, 'P-1')).map((o) => [o.kind, o.visit, o.lesion, o.track ?? null])).toEqual([
      ['unlink', 'v2', 'L1', 'v1:L1'],
      ['new', 'v3', 'L2', null],
    ]);
    expect((await patientTrail(db, 'P-1')).map((a) => [a.field, a.oldValue, a.newValue])).toEqual([
      ['unlink v2/L1', 'A', 'not A'],
      ['new v3/L2', 'B', 'new lesion'],
    ]);
  });

  it('a newer correction of the same lesion replaces the earlier one, and the trail says so', async () => {
    const db = await store();
    const first = await linkLesion(db, 'P-1', { visit: 'v2', lesion: 'L3', currentTrack: 'C' }, A);
    const second = await linkLesion(db, 'P-1', { visit: 'v2', lesion: 'L3', currentTrack: 'A' }, B);
    // A different lesion's correction is left alone; so is an unlink from another track.
    const other = await markNewLesion(db, 'P-1', { visit: 'v2', lesion: 'L4', currentTrack: 'B' });
    expect((await patientOverrides(db, 'P-1')).map((o) => o.id)).toEqual([second.id, other.id]);
    const trail = await patientTrail(db, 'P-1');
    expect(trail.map((a) => [a.action, a.entityId])).toEqual([
      ['create', first.id], ['delete', first.id], ['create', second.id], ['create', other.id],
    ]);
    expect(trail[1]).toMatchObject({ field: 'link v2/L3', oldValue: { kind: 'link', visit: 'v2', lesion: 'L3', track: 'v1:L1' }, newValue: null });
  });

  it('withdrawing a correction deletes it with a trail entry; someone else\'s cannot be withdrawn', async () => {
    const db = await store();
    const o = await unlinkLesion(db, 'P-1', { visit: 'v2', lesion: 'L1', currentTrack: 'A' }, A);
    expect(await failure(removeOverride(db, 'P-2', o.id))).toMatch(/is not stored for patient P-2/);
    await removeOverride(db, 'P-1', o.id);
    expect(await patientOverrides(db, 'P-1')).toEqual([]);
    expect((await patientTrail(db, 'P-1')).at(-1)).toMatchObject({ action: 'delete', entityId: o.id, field: 'unlink v2/L1', newValue: null });
  });

  it('change and trail entry land together or not at all', async () => {
    const db = await store();
    db.audit.hook('creating', () => { throw new Error('disk full'); });
    await expect(linkLesion(db, 'P-1', { visit: 'v2', lesion: 'L3', currentTrack: 'C' }, A)).rejects.toThrow('disk full');
    expect(await db.overrides.count()).toBe(0);
  });

  it('refuses a link to the track the lesion is already in, and edits of a patient not stored', async () => {
    const db = await store();
    expect(await failure(linkLesion(db, 'P-1', { visit: 'v2', lesion: 'L1', currentTrack: 'A' }, A))).toMatch(/already in A/);
    expect(await failure(markNewLesion(db, 'NOBODY', { visit: 'v2', lesion: 'L1', currentTrack: 'A' }))).toMatch(/not stored/);
    expect(await db.overrides.count()).toBe(0);
  });

  it('targets: at most two (RECIST 1.1, Eisenhauer et al. 2009: at most two per organ), stored on the patient with a trail entry', async () => {
    const db = await store();
    expect(await failure(setTargets(db, 'P-1', ['A', 'B', 'C']))).toMatch(/at most 2 per organ/);
    expect(await failure(setTargets(db, 'P-1', ['A', 'A']))).toMatch(/more than once/);
    expect((await setTargets(db, 'P-1', ['B'])).targets).toEqual(['B']);
    expect((await setTargets(db, 'P-1', [])).targets).toBeUndefined();
    expect((await patientTrail(db, 'P-1')).map((a) => [a.entity, a.field, a.oldValue, a.newValue])).toEqual([
      ['patient', 'targets', null, ['B']],
      ['patient', 'targets', ['B'], null],
    ]);
  });
});

describe('stored corrections change the tracks the follow-up computes', () => {
  const lesion = (id: string, centre: [number, number, number], mm: number): FollowupLesion => ({ id, centroidMm: centre, segment: 'V', longestAxialMm: mm, volumeMl: null, marginAlert: false });
  const visits: FollowupVisit[] = [
    { id: 'v1', date: '2026-01-12', sliceThicknessMm: 2.5, lesions: [lesion('L1', [-60, 0, 0], 20), lesion('L2', [40, 0, 0], 15)] },
    { id: 'v2', date: '2026-03-02', sliceThicknessMm: 2.5, lesions: [lesion('L1', [-60, 1, 0], 16), lesion('L2', [40, 1, 0], 12)] },
  ];
  // As the analysis worker reads them: in time order, link / unlink / new.
  const asOverrides = (rs: OverrideRecord[]): Override[] => rs.map((o) =>
    o.kind === 'link' ? { kind: 'link', visit: o.visit, lesion: o.lesion, track: o.track ?? '' }
      : o.kind === 'unlink' ? { kind: 'unlink', visit: o.visit, lesion: o.lesion, ...(o.track ? { track: o.track } : {}) }
        : { kind: 'new', visit: o.visit, lesion: o.lesion });

  it('unlink makes the lesion a new track; linking it back restores the automatic tracks', async () => {
    const db = await store();
    const before = runFollowup(visits, { marginMm: 10 });
    expect(before.tracks.map((t) => [t.id, t.lesions])).toEqual([['A', { v1: 'L1', v2: 'L1' }], ['B', { v1: 'L2', v2: 'L2' }]]);
    const t1 = before.tracks[0];
    expect(trackRef(t1)).toBe('v1:L1');

    await unlinkLesion(db, 'P-1', { visit: 'v2', lesion: 'L1', currentTrack: 'A' }, { ref: trackRef(t1), label: 'A' });
    const unlinked = runFollowup(visits, { marginMm: 10, overrides: asOverrides(await patientOverrides(db, 'P-1')) });
    expect(unlinked.tracks.map((t) => [t.id, t.lesions, t.status])).toEqual([
      ['A', { v1: 'L1' }, { v1: 'present', v2: 'gone' }],
      ['B', { v1: 'L2', v2: 'L2' }, { v1: 'present', v2: 'present' }],
      ['C', { v2: 'L1' }, { v2: 'present' }],
    ]);
    // RECIST 1.1: a new lesion is progression.
    expect(unlinked.visits[1].overall).toBe('PD');

    await linkLesion(db, 'P-1', { visit: 'v2', lesion: 'L1', currentTrack: 'C' }, { ref: trackRef(t1), label: 'A' });
    const relinked = runFollowup(visits, { marginMm: 10, overrides: asOverrides(await patientOverrides(db, 'P-1')) });
    expect(relinked.tracks.map((t) => [t.id, t.lesions])).toEqual([['A', { v1: 'L1', v2: 'L1' }], ['B', { v1: 'L2', v2: 'L2' }]]);
    expect(relinked.tracks[0].how.v2).toBe('override');
    expect(await patientOverrides(db, 'P-1')).toHaveLength(1);
  });
});

describe('treatment events', () => {
  it('are added and deleted with trail entries; ids as the import makes them', async () => {
    const db = await store();
    const a = await addTreatment(db, 'P-1', { date: '2026-02-01', kind: 'therapy-start', label: ' First-line chemotherapy ' });
    const b = await addTreatment(db, 'P-1', { date: '2026-02-01', kind: 'therapy-start', label: 'Second agent' });
    await addTreatment(db, 'P-1', { date: '2026-01-20', kind: 'ablation', label: 'Ablation, segment VIII' });
    expect([a.id, b.id]).toEqual(['2026-02-01-therapy-start', '2026-02-01-therapy-start-2']);
    expect((await patientTreatments(db, 'P-1')).map((t) => [t.date, t.label])).toEqual([
      ['2026-01-20', 'Ablation, segment VIII'], ['2026-02-01', 'First-line chemotherapy'], ['2026-02-01', 'Second agent'],
    ]);
    await deleteTreatment(db, 'P-1', a.id);
    expect((await patientTreatments(db, 'P-1')).map((t) => t.id)).toEqual(['2026-01-20-ablation', b.id]);
    const trail = await patientTrail(db, 'P-1');
    expect(trail.map((e) => [e.entity, e.action, e.entityId])).toEqual([
      ['treatment', 'create', a.id], ['treatment', 'create', b.id], ['treatment', 'create', '2026-01-20-ablation'], ['treatment', 'delete', a.id],
    ]);
    expect(trail[3]).toMatchObject({ oldValue: { date: '2026-02-01', kind: 'therapy-start', label: 'First-line chemotherapy' }, newValue: null });
  });

  it('refuses a date that does not exist, an empty label, an unknown patient', async () => {
    const db = await store();
    expect(await failure(addTreatment(db, 'P-1', { date: '2026-02-30', kind: 'ablation', label: 'x' }))).toMatch(/real date/);
    expect(await failure(addTreatment(db, 'P-1', { date: '2026-02-03', kind: 'ablation', label: '  ' }))).toMatch(/1 to 200/);
    expect(await failure(addTreatment(db, 'NOBODY', { date: '2026-02-03', kind: 'ablation', label: 'x' }))).toMatch(/not stored/);
    expect(await db.treatments.count()).toBe(0);
  });
});
