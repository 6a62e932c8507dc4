import type { Vec3 } from '../geometry/mat4.js';
import { distance } from '../geometry/vec3.js';
import { badInput } from '../errors.js';
import { assignCandidates, type Candidates } from './hungarian.js';
import { compareIds, currentTrackRef, trackId } from './ids.js';

/**
 * Lesion tracks: which lesion at each visit is the same lesion as before.
 *
 * Visits are taken in date order, their lesion centres already in the baseline's world space. At
 * each visit:
 * 1. Reader overrides for the visit are applied first (`link` fixes a lesion to a track, several
 *    links to one track make fragments; `new` makes a lesion start its own track; `unlink` forbids
 *    one lesion–track pairing, or, without a track, all automatic pairing of that lesion).
 * 2. The remaining lesions are paired with the remaining tracks by optimal assignment. A pair is
 *    allowed only within a gate that grows with lesion size (centres of the same lesion shift
 *    with deformation, registration error and uneven growth, more for big lesions) and with the
 *    alignment's uncertainty; its cost is distance / gate, and leaving a lesion or a track unpaired
 *    costs 0.5, so any allowed pair beats two unpaired ends, and among competing pairings the
 *    total normalised distance is least.
 * 3. Split: an unpaired lesion within the gate of a track already paired at this visit, where the
 *    track's previous extent (a ball around it) holds both this lesion and the paired one whole, is
 *    a fragment of that track; RECIST 1.1 then sums the fragments' diameters. Holding them whole,
 *    not just their centres, keeps a new lesion beside a small one from passing as a fragment —
 *    which would hide a progression.
 * 4. Merge: a track left unpaired that was seen at the previous visit, within the gate of a lesion
 *    paired to another track, where that lesion's extent overlaps both tracks' previous extents,
 *    has coalesced: the lesion goes to the lower-numbered track (the one a reader linked, if any),
 *    the other is marked merged into it and counts 0 mm (RECIST 1.1: the coalesced lesion is
 *    measured whole). A merged track stays merged until a reader links a lesion to it.
 * 5. Lesions still unpaired start new tracks, lettered A, B, … Z, AA, AB, … (ids.ts) in order of first
 *    appearance and, within a visit, in natural lesion-id order. Tracks still unpaired are gone — or not evaluable
 *    when their last position lies outside this visit's scanned field.
 *
 * Track ids depend only on the input and the overrides, so recomputing gives the same ids; a link
 * may name its track as "C" or, robust to renumbering, as "v1:L2" (the track holding L2 at v1).
 */

export type Override =
  | { kind: 'link'; visit: string; lesion: string; track: string }
  | { kind: 'unlink'; visit: string; lesion: string; track?: string }
  | { kind: 'new'; visit: string; lesion: string };

export interface TrackLesion {
  id: string;
  /** Centre in the baseline's world space, mm. */
  centreMm: Vec3;
  longestAxialMm: number;
}

export interface TrackVisitInput {
  id: string;
  lesions: readonly TrackLesion[];
  /** Extra matching allowance for this visit's alignment uncertainty, mm. */
  slackMm: number;
  /** Whether a baseline-space point lies inside this visit's scanned field; absent means always. */
  inView?: (p: Vec3) => boolean;
}

export type TrackStatus = 'present' | 'gone' | 'merged' | 'not-evaluable';
/** How a present track got its lesion(s) at a visit. */
export type LinkHow = 'first' | 'matched' | 'override' | 'split' | 'coalesced';

export interface TrackAtVisit {
  status: TrackStatus;
  /** Present: the track's lesion ids, largest first (several for a split). */
  lesions: string[];
  how?: LinkHow;
  mergedInto?: string;
}

export interface Track {
  id: string;
  /** Index of the visit where the track starts. */
  firstVisit: number;
  /** One entry per visit; null before the track starts. */
  visits: (TrackAtVisit | null)[];
}

export interface Tracking {
  tracks: Track[];
  warnings: string[];
}

/** Every pair may be this far apart, mm, before size and alignment allowances. */
export const GATE_BASE_MM = 10;
/** Gate growth per mm of the larger longest diameter of the pair. */
export const GATE_SIZE_FACTOR = 0.75;
/** Allowance on the containment/overlap tests of splits and merges, mm, plus the visit's slack. */
export const SPLIT_MERGE_TOLERANCE_MM = 3;
const UNPAIRED_COST = 0.5;

export function gateMm(lesionMm: number, trackMm: number, slackMm: number): number {
  return GATE_BASE_MM + GATE_SIZE_FACTOR * Math.max(lesionMm, trackMm) + slackMm;
}

/** Where and how big a track was when last seen. */
interface Reference {
  centre: Vec3;
  /** Radius of a ball holding all of the track's lesions, mm. */
  radiusMm: number;
  /** Longest diameter (sum over fragments), mm. */
  sizeMm: number;
}

interface TrackState {
  track: Track;
  ref: Reference;
  lastPresent: number;
  mergedInto: number | null;
}

export function buildTracks(visits: readonly TrackVisitInput[], overrides: readonly Override[] = []): Tracking {
  const warnings: string[] = [];
  const states: TrackState[] = [];
  /** "visitIndex:lesionId" → track index, for "v1:L2" references. */
  const holder = new Map<string, number>();
  const visitIndex = new Map(visits.map((v, n) => [v.id, n]));

  for (const o of overrides) {
    if (!visitIndex.has(o.visit)) warnings.push(`override for lesion ${o.lesion} names visit ${o.visit}, which is not in the series; ignored`);
  }

  visits.forEach((visit, k) => {
    const lesions = visit.lesions;
    const index = new Map<string, number>();
    lesions.forEach((l, n) => {
      if (index.has(l.id)) throw badInput(`visit ${visit.id}`, `lesion id ${l.id} occurs twice`);
      index.set(l.id, n);
    });
    const resolveTrack = (ref: string): number | null => {
      const colon = ref.indexOf(':');
      if (colon > 0) {
        const v = visitIndex.get(ref.slice(0, colon));
        if (v === undefined || v >= k) return null;
        return holder.get(`${v}:${ref.slice(colon + 1)}`) ?? null;
      }
      const id = currentTrackRef(ref);
      const t = states.findIndex((s) => s.track.id === id);
      return t >= 0 ? t : null;
    };

    // 1. Overrides.
    const decisive = new Map<number, Override>();
    const forbidden = new Set<string>();
    for (const o of overrides) {
      if (o.visit !== visit.id) continue;
      const n = index.get(o.lesion);
      if (n === undefined) {
        warnings.push(`override at visit ${visit.id} names lesion ${o.lesion}, which that visit does not have; ignored`);
        continue;
      }
      if (o.kind === 'unlink' && o.track !== undefined) {
        const t = resolveTrack(o.track);
        if (t === null) warnings.push(`unlink at visit ${visit.id} names track ${o.track}, unknown before that visit; ignored`);
        else forbidden.add(`${n}/${t}`);
        continue;
      }
      decisive.set(n, o);
    }
    const lesionTrack = new Int32Array(lesions.length).fill(-1);
    const how = new Map<number, LinkHow>();
    const excluded = new Uint8Array(lesions.length);
    for (const [n, o] of decisive) {
      excluded[n] = 1;
      if (o.kind !== 'link') continue;
      const t = resolveTrack(o.track);
      if (t === null) {
        warnings.push(`link at visit ${visit.id} names track ${o.track}, unknown before that visit; lesion ${o.lesion} left to start its own track`);
        continue;
      }
      lesionTrack[n] = t;
      how.set(t, 'override');
      states[t].mergedInto = null;
    }

    // 2. Optimal assignment of the rest.
    const linkedTracks = new Set(how.keys());
    const rows = lesions.map((_, n) => n).filter((n) => !excluded[n]);
    const cols = states.map((_, t) => t).filter((t) => states[t].mergedInto === null && !linkedTracks.has(t));
    // Only pairs within their gate are candidates; most pairs of a many-lesion visit are far apart
    // on some axis, so they cost one comparison and no square root.
    const candidates: Candidates[] = [];
    for (const n of rows) {
      const own: Candidates = { cols: [], costs: [] };
      const a = lesions[n].centreMm;
      for (let c = 0; c < cols.length; c++) {
        const t = cols[c];
        if (forbidden.size > 0 && forbidden.has(`${n}/${t}`)) continue;
        const b = states[t].ref.centre;
        const g = gateMm(lesions[n].longestAxialMm, states[t].ref.sizeMm, visit.slackMm);
        if (Math.abs(a[0] - b[0]) > g || Math.abs(a[1] - b[1]) > g || Math.abs(a[2] - b[2]) > g) continue;
        const d = distance(a, b);
        if (d > g) continue;
        own.cols.push(c);
        own.costs.push(d / g);
      }
      candidates.push(own);
    }
    for (const [r, c] of assignCandidates(candidates, cols.length, UNPAIRED_COST)) {
      lesionTrack[rows[r]] = cols[c];
      how.set(cols[c], 'matched');
    }
    const tol = SPLIT_MERGE_TOLERANCE_MM + visit.slackMm;
    const lesionsOf = (t: number) => lesions.map((_, n) => n).filter((n) => lesionTrack[n] === t);

    // 3. Splits: an unpaired lesion joins a paired track whose previous extent holds both.
    for (const n of sortedByLesionId(rows.filter((n) => lesionTrack[n] < 0), lesions)) {
      let best = -1, bestD = Infinity;
      for (const t of how.keys()) {
        if (forbidden.has(`${n}/${t}`)) continue;
        const ref = states[t].ref;
        const d = distance(lesions[n].centreMm, ref.centre);
        if (d > gateMm(lesions[n].longestAxialMm, ref.sizeMm, visit.slackMm)) continue;
        const inside = (m: number) => distance(lesions[m].centreMm, ref.centre) + lesions[m].longestAxialMm / 2 <= ref.radiusMm + tol;
        if (!inside(n) || !lesionsOf(t).every(inside)) continue;
        if (d < bestD) { bestD = d; best = t; }
      }
      if (best >= 0) {
        lesionTrack[n] = best;
        if (how.get(best) === 'matched') how.set(best, 'split');
      }
    }

    // 4. Merges: an unpaired track seen last visit whose neighbour's lesion now covers both.
    const mergesInto = new Map<number, number[]>();
    // Each paired track's lesions, gathered once: the loop below asks for every pair of tracks.
    const members = new Map<number, number[]>();
    lesionTrack.forEach((t, n) => {
      if (t < 0) return;
      const list = members.get(t);
      if (list) list.push(n);
      else members.set(t, [n]);
    });
    for (const b of cols) {
      if (how.has(b) || states[b].lastPresent !== k - 1) continue;
      const refB = states[b].ref;
      let bestLesion = -1, bestD = Infinity;
      for (const a of how.keys()) {
        const own = members.get(a) ?? [];
        if (own.length !== 1) continue;
        const l = lesions[own[0]];
        if (forbidden.has(`${own[0]}/${b}`)) continue;
        const d = distance(l.centreMm, refB.centre);
        if (d > gateMm(l.longestAxialMm, refB.sizeMm, visit.slackMm)) continue;
        if (d > l.longestAxialMm / 2 + refB.radiusMm + tol) continue;
        const refA = states[a].ref;
        if (distance(l.centreMm, refA.centre) > l.longestAxialMm / 2 + refA.radiusMm + tol) continue;
        if (d < bestD) { bestD = d; bestLesion = own[0]; }
      }
      if (bestLesion >= 0) mergesInto.set(bestLesion, [...(mergesInto.get(bestLesion) ?? []), b]);
    }
    const mergedNow = new Map<number, number>();
    for (const [n, bs] of mergesInto) {
      const a = lesionTrack[n];
      const group = [a, ...bs];
      const primary = how.get(a) === 'override' ? a : Math.min(...group);
      lesionTrack[n] = primary;
      how.delete(a);
      how.set(primary, 'coalesced');
      for (const t of group) {
        if (t === primary) continue;
        mergedNow.set(t, primary);
        states[t].mergedInto = primary;
      }
    }

    // 5. New tracks, then the status of every track at this visit.
    for (const n of sortedByLesionId(lesions.map((_, n) => n).filter((n) => lesionTrack[n] < 0), lesions)) {
      const t = states.length;
      states.push({
        track: { id: trackId(t), firstVisit: k, visits: new Array<TrackAtVisit | null>(visits.length).fill(null) },
        ref: { centre: lesions[n].centreMm, radiusMm: 0, sizeMm: 0 },
        lastPresent: k,
        mergedInto: null,
      });
      lesionTrack[n] = t;
      how.set(t, 'first');
    }
    const final = new Map<number, number[]>();
    lesionTrack.forEach((t, n) => {
      const list = final.get(t);
      if (list) list.push(n);
      else final.set(t, [n]);
    });
    states.forEach((s, t) => {
      const own = final.get(t) ?? [];
      if (own.length > 0) {
        own.sort((x, y) => lesions[y].longestAxialMm - lesions[x].longestAxialMm || compareIds(lesions[x].id, lesions[y].id));
        s.track.visits[k] = { status: 'present', lesions: own.map((n) => lesions[n].id), how: how.get(t) ?? 'matched' };
        s.ref = reference(own.map((n) => lesions[n]));
        s.lastPresent = k;
        for (const n of own) holder.set(`${k}:${lesions[n].id}`, t);
        return;
      }
      const into = mergedNow.get(t) ?? s.mergedInto;
      if (into !== null && into !== undefined && final.has(into)) {
        s.track.visits[k] = { status: 'merged', lesions: [], mergedInto: states[into].track.id };
      } else if (visit.inView && !visit.inView(s.ref.centre)) {
        s.track.visits[k] = { status: 'not-evaluable', lesions: [] };
      } else {
        s.track.visits[k] = { status: 'gone', lesions: [] };
      }
    });
  });

  return { tracks: states.map((s) => s.track), warnings };
}

function reference(ls: readonly TrackLesion[]): Reference {
  if (ls.length === 1) return { centre: ls[0].centreMm, radiusMm: ls[0].longestAxialMm / 2, sizeMm: ls[0].longestAxialMm };
  let w = 0;
  const c = [0, 0, 0];
  for (const l of ls) {
    const lw = Math.max(l.longestAxialMm, 1e-3);
    w += lw;
    for (let a = 0; a < 3; a++) c[a] += lw * l.centreMm[a];
  }
  const centre: Vec3 = [c[0] / w, c[1] / w, c[2] / w];
  let radiusMm = 0, sizeMm = 0;
  for (const l of ls) {
    radiusMm = Math.max(radiusMm, distance(l.centreMm, centre) + l.longestAxialMm / 2);
    sizeMm += l.longestAxialMm;
  }
  return { centre, radiusMm, sizeMm };
}

function sortedByLesionId(ns: number[], lesions: readonly TrackLesion[]): number[] {
  return [...ns].sort((a, b) => compareIds(lesions[a].id, lesions[b].id));
}
