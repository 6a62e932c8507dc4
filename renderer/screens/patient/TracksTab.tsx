import { useCallback, useState } from 'react';
import { showsViable, type TrackSummary } from '../../../src/followup/followup';
import { compareTrackIds } from '../../../src/followup/ids';
import { MAX_TARGETS_PER_ORGAN } from '../../../src/followup/recist';
import type { AuditRecord, JsonValue } from '../../../src/model/records';
import { usePatient } from '../../analysis/PatientContext';
import { trackOfLesion } from '../../charts/chart-data';
import { errorText } from '../../error-text';
import { fmtMm } from '../../format';
import { appDb } from '../../store/db';
import { patientTrail } from '../../store/patients';
import {
  linkLesion, markNewLesion, patientOverrides, removeOverride, setTargets, trackRef, unlinkLesion, type LesionAt,
} from '../../store/track-edits';
import { useStored } from '../../store/use-stored';

const STATUS_TEXT: Record<string, string> = { gone: 'gone', 'not-evaluable': 'not in scanned field' };
const HOW_TEXT: Record<string, string> = { override: 'linked by reader', split: 'split', coalesced: 'merged here' };

/**
 * Lesion tracks × visits, where a reader corrects the matching (link, unlink, mark as new) and
 * chooses the RECIST targets. Each change is stored with its trail entry, then the analysis reruns,
 * so every chart and list shows the corrected tracks.
 */
export function TracksTab() {
  const { patient, analysis, state, reanalyse } = usePatient();
  const [selected, setSelected] = useState<{ visit: string; lesion: string } | null>(null);
  const [revision, setRevision] = useState(0);
  const [problem, setProblem] = useState<string | null>(null);
  const [linkTo, setLinkTo] = useState('');
  // The targets just ticked, shown over the analysis they were ticked on until the rerun brings them back.
  const [pending, setPending] = useState<{ targets: string[]; over: typeof analysis } | null>(null);

  const [overrides, trail] = useStored(
    () => Promise.all([patientOverrides(appDb(), patient.id), patientTrail(appDb(), patient.id)]),
    [patient.id, revision],
  ) ?? [[], []];

  const edit = useCallback(async (change: () => Promise<unknown>) => {
    setProblem(null);
    try {
      await change();
      setRevision((r) => r + 1);
      reanalyse();
    } catch (e) {
      setProblem(errorText(e));
      setPending(null);
    }
  }, [reanalyse]);

  if (!analysis) return null;
  const f = analysis.followup;
  const visits = f.visits;
  const visitIndex = new Map(visits.map((v, k) => [v.id, k]));
  const holder = trackOfLesion(f);
  const busy = state.status === 'running';
  const baseline = visits[0]?.id;
  const viable = showsViable(f);
  const targets = pending?.over === analysis ? pending.targets : f.targets.tracks;
  const trackLabel = (ref: string | undefined) => {
    if (!ref) return '';
    const [v, l] = ref.includes(':') ? ref.split(':') : [null, null];
    return (v && l ? holder.get(`${v}/${l}`) : ref) ?? ref;
  };

  const toggleTarget = (id: string, on: boolean) => {
    const next = on ? [...targets, id] : targets.filter((t) => t !== id);
    setPending({ targets: next, over: analysis });
    void edit(() => setTargets(appDb(), patient.id, next));
  };

  const sel = selected && visitIndex.has(selected.visit) ? selected : null;
  const selTrack = sel ? f.tracks.find((t) => t.id === holder.get(`${sel.visit}/${sel.lesion}`)) : undefined;
  const at: LesionAt | null = sel ? { ...sel, currentTrack: selTrack?.id ?? null } : null;
  const selIndex = sel ? visitIndex.get(sel.visit)! : -1;
  const startedBefore = (t: TrackSummary) => visitIndex.get(t.firstVisit)! < selIndex;
  const candidates = sel ? f.tracks.filter((t) => startedBefore(t) && t.id !== selTrack?.id) : [];
  const lastSize = (t: TrackSummary) => {
    const seen = visits.slice(0, selIndex).filter((v) => t.status[v.id] === 'present');
    const v = seen[seen.length - 1];
    return v ? `${t.segments[v.id] ?? 'outside'}, ${t.longestAxialMm[v.id]} mm at ${v.id}` : '';
  };
  // The lesion's own track is the default: nothing changes until the reader picks another.
  const linkChoice = candidates.some((t) => t.id === linkTo) ? linkTo : (selTrack?.id ?? candidates[0]?.id ?? '');
  const name = (t: TrackSummary) => ({ ref: trackRef(t), label: t.id });

  return (
    <section aria-labelledby="tracks-title" className="tracks">
      <h3 id="tracks-title">Lesion tracks</h3>
      <p className="chart-note">
        Each row follows one lesion from visit to visit. Select a lesion to correct its track. Targets:{' '}
        <strong data-testid="target-list">{[...targets].sort(compareTrackIds).join(', ') || 'none'}</strong>{' '}
        ({f.targets.source === 'named' ? 'chosen by a reader' : 'chosen automatically: the largest measurable lesions at baseline'}).
        RECIST 1.1 takes at most {MAX_TARGETS_PER_ORGAN} target lesions per organ, and the liver is one organ, so at most {MAX_TARGETS_PER_ORGAN} can be ticked.
        {f.targets.source === 'named' && (
          <> <button type="button" className="link-button" disabled={busy} onClick={() => void edit(() => setTargets(appDb(), patient.id, []))} data-testid="targets-automatic">Choose automatically again</button></>
        )}
      </p>
      <div className="table-scroll">
        <table className="data-table track-table" data-testid="track-table">
          <thead>
            <tr>
              <th scope="col">Track</th>
              <th scope="col">Target</th>
              {visits.map((v) => <th scope="col" key={v.id}>{v.date}<br /><span className="muted">{v.id}{v.id === baseline ? ', baseline' : ''}</span></th>)}
            </tr>
          </thead>
          <tbody>
            {f.tracks.map((t) => {
              const isTarget = targets.includes(t.id);
              return (
                <tr key={t.id} data-testid="track-row" data-track={t.id}>
                  <th scope="row">
                    {t.id}
                    {t.segmentChanged && <span className="badge" title={t.segmentChanges.map((c) => `${c.visit}: ${c.from ?? 'outside'} → ${c.to ?? 'outside'}`).join('; ')}>segment changed</span>}
                  </th>
                  <td>
                    {t.firstVisit === baseline ? (
                      <label className="target-box">
                        <input
                          type="checkbox"
                          checked={isTarget}
                          disabled={busy || (!isTarget && targets.length >= MAX_TARGETS_PER_ORGAN)}
                          title={!isTarget && targets.length >= MAX_TARGETS_PER_ORGAN ? `At most ${MAX_TARGETS_PER_ORGAN} targets: untick one first` : undefined}
                          onChange={(e) => toggleTarget(t.id, e.target.checked)}
                          data-testid={`target-${t.id}`}
                        />
                        <span className="sr-only">{t.id} is a RECIST target</span>
                      </label>
                    ) : <span className="muted" title="Only lesions seen at baseline can be targets">—</span>}
                  </td>
                  {visits.map((v) => {
                    const status = t.status[v.id];
                    const lesion = t.lesions[v.id];
                    if (!status) return <td key={v.id} className="muted" data-visit={v.id}></td>;
                    if (status !== 'present' || !lesion) {
                      const text = status === 'merged' ? `merged into ${t.mergedInto?.[v.id] ?? 'another'}` : (STATUS_TEXT[status] ?? status);
                      return <td key={v.id} className="muted" data-visit={v.id} data-status={status}>{text}</td>;
                    }
                    const ids = t.fragments?.[v.id] ?? [lesion];
                    const how = t.how[v.id];
                    return (
                      <td key={v.id} data-visit={v.id} data-status={status} data-lesion={ids.join(' ')}>
                        {ids.map((id) => (
                          <button
                            key={id}
                            type="button"
                            className={`lesion-chip${sel?.visit === v.id && sel.lesion === id ? ' on' : ''}`}
                            aria-pressed={sel?.visit === v.id && sel.lesion === id}
                            onClick={() => { setSelected({ visit: v.id, lesion: id }); setProblem(null); }}
                            data-testid="lesion-chip"
                            data-visit={v.id}
                            data-lesion={id}
                          >
                            {id}
                          </button>
                        ))}
                        <span className="cell-facts">{t.segments[v.id] ?? 'outside'} · {t.longestAxialMm[v.id]} mm</span>
                        {viable && (
                          <span className="cell-facts viable" data-testid="track-viable" title="Longest diameter of the viable (enhancing) tumour, not crossing necrosis (mRECIST)">
                            {' '}· viable {fmtMm(t.viableAxialMm?.[v.id])}
                          </span>
                        )}
                        {(how === 'first' && v.id !== baseline) && <span className="tag new">new</span>}
                        {how && HOW_TEXT[how] && <span className="tag">{HOW_TEXT[how]}</span>}
                      </td>
                    );
                  })}
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>

      {sel && at && (
        <div className="edit-panel" data-testid="track-edit" aria-live="polite">
          <p className="edit-title">
            Lesion <strong>{sel.lesion}</strong> at {sel.visit} ({visits[selIndex]?.date}), now in <strong>{selTrack?.id ?? 'no track'}</strong>
            {selTrack && selTrack.firstVisit === sel.visit ? (sel.visit === baseline ? ' (baseline lesion)' : ' (first seen here: a new lesion)') : ''}.
          </p>
          <div className="edit-actions">
            {candidates.length > 0 ? (
              <span className="link-to">
                <label>
                  Link to
                  <select value={linkChoice} onChange={(e) => setLinkTo(e.target.value)} data-testid="link-track">
                    {selTrack && <option value={selTrack.id}>{selTrack.id} (its track now)</option>}
                    {candidates.map((t) => <option key={t.id} value={t.id}>{t.id} ({lastSize(t) || `from ${t.firstVisit}`})</option>)}
                  </select>
                </label>
                <button
                  type="button"
                  disabled={busy || !linkChoice || linkChoice === selTrack?.id}
                  onClick={() => { const t = candidates.find((c) => c.id === linkChoice); if (t) void edit(() => linkLesion(appDb(), patient.id, at, name(t))); }}
                  data-testid="link-lesion"
                >
                  Link
                </button>
              </span>
            ) : (
              <span className="muted">No earlier track to link to.</span>
            )}
            <button
              type="button"
              disabled={busy || !selTrack || !startedBefore(selTrack)}
              onClick={() => selTrack && void edit(() => unlinkLesion(appDb(), patient.id, at, name(selTrack)))}
              title="Keep this lesion out of its track; the matching may pair it with another track or make it new"
              data-testid="unlink-lesion"
            >
              Unlink from {selTrack?.id ?? 'track'}
            </button>
            <button
              type="button"
              disabled={busy || !selTrack || !startedBefore(selTrack)}
              onClick={() => void edit(() => markNewLesion(appDb(), patient.id, at))}
              title="This lesion was not there before: it starts a track of its own (RECIST 1.1: a new lesion is progression)"
              data-testid="mark-new"
            >
              Mark as new lesion
            </button>
            <button type="button" className="link-button" onClick={() => setSelected(null)}>Close</button>
          </div>
          {busy && <p className="muted" role="status">Updating the tracks…</p>}
        </div>
      )}
      {problem && <p className="notice problem" role="alert">{problem}</p>}

      <h4>Reader corrections</h4>
      {overrides.length === 0 ? (
        <p className="empty">None: every track is as the automatic matching made it.</p>
      ) : (
        <table className="data-table compact fit" data-testid="override-table">
          <thead><tr><th scope="col">When</th><th scope="col">Correction</th><th scope="col"><span className="sr-only">Actions</span></th></tr></thead>
          <tbody>
            {overrides.map((o) => (
              <tr key={o.id} data-testid="override-row" data-kind={o.kind}>
                <td>{localTime(o.at)}</td>
                <td>
                  {o.kind === 'link' ? `${o.visit}/${o.lesion} linked to ${trackLabel(o.track)}`
                    : o.kind === 'unlink' ? `${o.visit}/${o.lesion} kept out of ${trackLabel(o.track)}`
                      : `${o.visit}/${o.lesion} marked as a new lesion`}
                </td>
                <td className="row-actions">
                  <button type="button" className="small" disabled={busy} onClick={() => void edit(() => removeOverride(appDb(), patient.id, o.id))}>Withdraw</button>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}

      <Trail entries={trail} />
    </section>
  );
}

/** The patient's edit trail, newest first. */
function Trail({ entries }: { entries: AuditRecord[] }) {
  const [all, setAll] = useState(false);
  const newest = [...entries].reverse();
  const shown = all ? newest : newest.slice(0, 12);
  return (
    <section className="trail" aria-labelledby="trail-title" data-testid="trail">
      <h4 id="trail-title">Trail</h4>
      <p className="chart-note">Every change to this patient&apos;s records, kept on this computer.</p>
      <table className="data-table compact trail-table">
        <thead><tr><th scope="col">Time</th><th scope="col">By</th><th scope="col">Change</th><th scope="col">Before</th><th scope="col">After</th></tr></thead>
        <tbody>
          {shown.map((a) => (
            <tr key={a.id} data-testid="trail-row" data-entity={a.entity} data-action={a.action}>
              <td>{localTime(a.at)}</td>
              <td data-testid="trail-by">{a.by || '—'}</td>
              <td>{what(a)}</td>
              <td>{value(a.oldValue, a.field)}</td>
              <td>{value(a.newValue, a.field)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {newest.length > shown.length && <button type="button" className="link-button" onClick={() => setAll(true)}>Show all {newest.length} entries</button>}
    </section>
  );
}

const ACTION_WORDS: Record<string, string> = { create: 'added', update: 'changed', delete: 'removed', import: 'imported', restore: 'restored' };

function what(a: AuditRecord): string {
  const act = ACTION_WORDS[a.action] ?? a.action;
  if (a.entity === 'override') return `${act === 'added' ? 'correction' : `correction ${act}`}: ${a.field}`;
  if (a.entity === 'patient') return a.field === '*' ? `patient ${act}` : `${a.field} ${act}`;
  const field = a.field === 'viableAxialMm' ? 'viable diameter' : a.field;
  return `${a.entity} ${act}${field && field !== '*' && field !== a.entity ? ` (${field === 'viable diameter' ? `${a.entityId}, ${field}` : field})` : ''}`;
}

function value(v: JsonValue, field: string): string {
  if (v === null) return field === 'targets' ? 'automatic' : '—';
  if (isOverride(v)) {
    const track = typeof v.track === 'string' ? ` ${v.kind === 'link' ? 'to' : 'from'} the track of ${v.track.replace(':', '/')}` : '';
    return `${v.kind} ${v.visit}/${v.lesion}${track}`;
  }
  if (Array.isArray(v)) {
    // A point in world mm, e.g. a mark's centre, reads as one: (68.4, −45.8, 7.5) mm.
    if (v.length === 3 && v.every((x) => typeof x === 'number')) return `(${v.map((x) => (x as number).toFixed(1)).join(', ')}) mm`;
    return v.map((x) => value(x, '')).join(', ') || 'none';
  }
  if (typeof v === 'object') {
    return Object.entries(v).map(([k, x]) => `${FIELD_WORDS[k] ?? k} ${value(x, k)}${typeof x === 'number' && /Mm$/.test(k) ? ' mm' : ''}`).join('; ');
  }
  return typeof v === 'number' && /Mm$/.test(field) ? `${v} mm` : String(v);
}

/** Names of stored fields as the trail shows them beside their values. */
const FIELD_WORDS: Record<string, string> = {
  id: 'id', centreMm: 'centre', longestAxialMm: 'longest axial', shortAxisMm: 'short axis', viableAxialMm: 'viable',
  endpointsMm: 'caliper ends', heightCm: 'height (cm)', weightKg: 'weight (kg)', source: 'source',
};

/** A correction as stored in the trail when it was withdrawn or replaced. */
function isOverride(v: JsonValue): v is { kind: string; visit: string; lesion: string; track?: string } {
  return typeof v === 'object' && v !== null && !Array.isArray(v) && typeof v.kind === 'string' && typeof v.visit === 'string' && typeof v.lesion === 'string';
}

function localTime(iso: string): string {
  const d = new Date(iso);
  const p = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())} ${p(d.getHours())}:${p(d.getMinutes())}`;
}
