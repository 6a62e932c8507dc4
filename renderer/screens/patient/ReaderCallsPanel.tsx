import { useCallback, useState } from 'react';
import type { VisitFollowup } from '../../../src/followup/followup';
import type { NewLesionCall } from '../../../src/followup/reader-calls';
import { NON_TARGET_CALLS, OUTSIDE_LIVER_CALLS, type NonTargetCall, type OutsideLiverCall } from '../../../src/followup/recist';
import { usePatient } from '../../analysis/PatientContext';
import { errorText } from '../../error-text';
import { appDb } from '../../store/db';
import { saveReaderCall, type ReaderCallChange } from '../../store/reader-calls';

const NON_TARGET_TEXT: Record<NonTargetCall, string> = { present: 'present', absent: 'absent', 'unequivocal-progression': 'unequivocal progression' };
const OUTSIDE_TEXT: Record<OutsideLiverCall, string> = { none: 'none', 'not-assessed': 'not assessed', stable: 'stable', progression: 'progression' };
/** Lesions under this longest diameter are offered the "too small to measure" call (RECIST 1.1's measurable size on CT). */
const OFFER_TOO_SMALL_BELOW_MM = 10;

/**
 * The reader's calls at each follow-up visit: what the images alone cannot say. Per visit the
 * non-target lesions as a whole and the disease outside the liver; per lesion whether a new lesion is
 * unequivocal, whether a missing target is confirmed gone, and whether a small lesion is present but
 * too small to measure. Each change is stored with its signed trail entry and the response is recomputed.
 */
export function ReaderCallsPanel() {
  const { patient, analysis, state, reanalyse } = usePatient();
  const [problem, setProblem] = useState<string | null>(null);
  const edit = useCallback(async (visitId: string, change: ReaderCallChange) => {
    setProblem(null);
    try {
      await saveReaderCall(appDb(), patient.id, visitId, change);
      reanalyse();
    } catch (e) {
      setProblem(errorText(e));
    }
  }, [patient.id, reanalyse]);

  if (!analysis) return null;
  const f = analysis.followup;
  const busy = state.status === 'running';
  const lesionAt = (track: string, visit: string) => f.tracks.find((t) => t.id === track)?.lesions[visit];

  const lesionCalls = (v: VisitFollowup) => {
    const calls = analysis.manifest.visits.find((m) => m.id === v.id)?.readerCalls ?? {};
    const newTracks = [...v.unequivocalNewLesions.map((u) => u.track), ...v.equivocalNewLesions];
    const small = analysis.visits.find((r) => r.id === v.id)?.analysis.lesions
      .filter((l) => l.longestAxialMm < OFFER_TOO_SMALL_BELOW_MM || calls.tooSmall?.includes(l.id)) ?? [];
    const items = [
      ...newTracks.map((track) => {
        const lesion = lesionAt(track, v.id);
        if (!lesion) return null;
        const call = calls.newLesions?.[lesion] ?? '';
        return (
          <li key={`new-${track}`}>
            <label>
              New lesion {track} ({lesion}){' '}
              <select value={call} disabled={busy} data-testid={`new-lesion-${v.id}-${lesion}`}
                onChange={(e) => void edit(v.id, { call: 'newLesion', lesion, value: (e.target.value || null) as NewLesionCall | null })}>
                <option value="">by size ({v.equivocalNewLesions.includes(track) ? 'equivocal' : 'unequivocal'})</option>
                <option value="equivocal">equivocal</option>
                <option value="unequivocal">unequivocal</option>
              </select>
            </label>
          </li>
        );
      }),
      ...v.goneLesions.map((track) => (
        <li key={`gone-${track}`}>
          <label>
            <input type="checkbox" checked={!v.unconfirmedGone.includes(track)} disabled={busy} data-testid={`confirmed-gone-${v.id}-${track}`}
              onChange={(e) => void edit(v.id, { call: 'confirmedGone', track, on: e.target.checked })} />
            {' '}{track} missing: confirmed gone
          </label>
        </li>
      )),
      ...small.map((l) => (
        <li key={`small-${l.id}`}>
          <label>
            <input type="checkbox" checked={calls.tooSmall?.includes(l.id) ?? false} disabled={busy} data-testid={`too-small-${v.id}-${l.id}`}
              onChange={(e) => void edit(v.id, { call: 'tooSmall', lesion: l.id, on: e.target.checked })} />
            {' '}{l.id} ({l.longestAxialMm.toFixed(1)} mm) present, too small to measure
          </label>
        </li>
      )),
    ].filter((x) => x !== null);
    return items.length ? <ul className="reader-lesion-calls">{items}</ul> : <span className="muted">none to call</span>;
  };

  return (
    <section aria-labelledby="reader-calls-title" data-testid="reader-calls">
      <h4 id="reader-calls-title">Reader&apos;s calls</h4>
      <p className="hint">Calls the images alone cannot make, which the response rules take as given (see the notes below). Each change is signed with the reader name and the response recomputed.</p>
      {problem && <p className="notice problem" role="alert">{problem}</p>}
      <table className="data-table compact" data-testid="reader-calls-table">
        <thead>
          <tr>
            <th scope="col">Visit</th>
            <th scope="col">Non-target lesions</th>
            <th scope="col">Disease outside the liver</th>
            <th scope="col">Lesions</th>
          </tr>
        </thead>
        <tbody>
          {f.visits.slice(1).map((v) => {
            const calls = analysis.manifest.visits.find((m) => m.id === v.id)?.readerCalls ?? {};
            return (
              <tr key={v.id} data-visit={v.id}>
                <th scope="row">{v.id}</th>
                <td>
                  <select value={calls.nonTarget ?? ''} disabled={busy} aria-label={`Non-target lesions at ${v.id}`} data-testid={`non-target-${v.id}`}
                    onChange={(e) => void edit(v.id, { call: 'nonTarget', value: (e.target.value || null) as NonTargetCall | null })}>
                    <option value="">from the masks</option>
                    {NON_TARGET_CALLS.map((c) => <option key={c} value={c}>{NON_TARGET_TEXT[c]}</option>)}
                  </select>
                </td>
                <td>
                  <select value={calls.outsideLiver ?? ''} disabled={busy} aria-label={`Disease outside the liver at ${v.id}`} data-testid={`outside-liver-${v.id}`}
                    onChange={(e) => void edit(v.id, { call: 'outsideLiver', value: (e.target.value || null) as OutsideLiverCall | null })}>
                    <option value="">not assessed (not given)</option>
                    {OUTSIDE_LIVER_CALLS.map((c) => <option key={c} value={c}>{OUTSIDE_TEXT[c]}</option>)}
                  </select>
                </td>
                <td>{lesionCalls(v)}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </section>
  );
}
