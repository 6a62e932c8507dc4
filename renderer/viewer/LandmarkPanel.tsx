import { LANDMARK_NAMES, OPTIONAL_LANDMARK, type LandmarkName, type LandmarkSet } from '../../src/segments/landmarks';
import { oneDecimal } from '../format';
import { LANDMARK_LABELS, type LandmarkNotes } from './landmark-qc';
import type { LandmarkProposal } from './volume-messages';

export type LandmarkMode =
  /** The map is built from this visit's landmarks: they can be moved. */
  | 'built'
  /** An imported map, but a liver mask too: a map can be built from landmarks instead. */
  | 'imported-with-liver'
  /** An imported map and no liver mask: landmarks have nothing to divide. */
  | 'imported'
  /** Neither a segment map nor a liver mask yet: the liver comes first. */
  | 'no-liver';

/** Landmarks carried from an earlier visit, shown until the reader confirms them. */
export interface ProposalState {
  proposal: LandmarkProposal;
  /** Points the reader moved (each counts as confirmed). */
  moved: LandmarkName[];
}

interface Props {
  mode: LandmarkMode;
  landmarks: LandmarkSet | null;
  /** Moves not stored because the plane rule cannot use the set yet. */
  unsaved: boolean;
  problems: LandmarkNotes | null;
  qc: LandmarkNotes | null;
  onShow(name: LandmarkName): void;
  /** Arms placing: the next click on the image puts the landmark there. */
  onPlace(name: LandmarkName | null): void;
  placing: LandmarkName | null;
  onRevert(): void;
  onStartBuilding(): void;
  busy: boolean;
  status: string | null;
  /** Set while the points shown are only proposed. */
  proposed?: ProposalState | null;
  onConfirmProposal?(): void;
}

/** The landmark set: each point with its position and the checks that concern it, right beside it. */
export function LandmarkPanel({ mode, landmarks, unsaved, problems, qc, onShow, onPlace, placing, onRevert, onStartBuilding, busy, status, proposed, onConfirmProposal }: Props) {
  if (mode === 'no-liver') {
    return (
      <section className="side-section" aria-labelledby="landmarks-title" data-testid="landmark-panel">
        <h3 id="landmarks-title">Landmarks</h3>
        <p className="side-note">
          This visit has a scan but no liver mask and no segment map yet. Grow the liver from a click (below) and accept it;
          landmarks are then proposed from an earlier visit that has them, or placed by hand.
        </p>
      </section>
    );
  }
  if (mode === 'imported') {
    return (
      <section className="side-section" aria-labelledby="landmarks-title" data-testid="landmark-panel">
        <h3 id="landmarks-title">Landmarks</h3>
        <p className="side-note">
          This visit&apos;s segment map was imported, and the visit has no liver mask. A map built from landmarks divides a liver
          mask by the vein planes, so without one there is nothing to build it from. Import the visit again with a liver mask
          to place landmarks.
        </p>
      </section>
    );
  }
  if (mode === 'imported-with-liver') {
    return (
      <section className="side-section" aria-labelledby="landmarks-title" data-testid="landmark-panel">
        <h3 id="landmarks-title">Landmarks</h3>
        <p className="side-note">
          This visit&apos;s segment map was imported. It also has a liver mask, so the map can instead be built from six landmarks
          placed on this scan. The imported map is then removed from the visit (a backup made before keeps it).
        </p>
        <button type="button" onClick={onStartBuilding} disabled={busy} data-testid="start-landmarks">Place landmarks and build the map…</button>
      </section>
    );
  }
  if (!landmarks) {
    return (
      <section className="side-section" aria-labelledby="landmarks-title" data-testid="landmark-panel">
        <h3 id="landmarks-title">Landmarks</h3>
        <p className="side-note">
          This visit has a liver mask but no landmark set, and no earlier visit lends one. Place six landmarks to build its
          segment map; until then the visit is left out of the analysis.
        </p>
        <button type="button" onClick={onStartBuilding} disabled={busy} data-testid="start-landmarks">Place landmarks and build the map…</button>
      </section>
    );
  }
  const p = proposed?.proposal;
  return (
    <section className="side-section" aria-labelledby="landmarks-title" data-testid="landmark-panel">
      <h3 id="landmarks-title">Landmarks</h3>
      {p && proposed && (
        <div className="proposal-box" data-testid="landmark-proposal">
          <p>
            <strong>Proposed from visit {p.fromVisit}</strong>: its landmarks carried onto this scan through the rigid alignment
            of the two liver masks (surface residual {p.residualMm === null ? 'not fitted' : `${p.residualMm.toFixed(1)} mm RMS`},
            rotation {p.rotationDeg.toFixed(1)}°). They are not used until you confirm them: check each point, move any that
            is off (a moved point counts as confirmed), then confirm.
          </p>
          {p.warnings.map((w) => <p key={w} className="landmark-note-text">{w}</p>)}
          {p.set.points[OPTIONAL_LANDMARK] && <p className="muted">The umbilical part of the left portal vein is carried over too (not drawn).</p>}
          <button type="button" onClick={onConfirmProposal} disabled={busy || !!problems} data-testid="confirm-proposal">
            Confirm {proposed.moved.length > 0 ? `the ${LANDMARK_NAMES.length - proposed.moved.length} unmoved points and ` : 'all points and '}build the map
          </button>
        </div>
      )}
      <p className="side-note">
        Drag a point on the image to move it within the slice, or choose Place and click where it lies.
        {proposed ? ' The segment map is built once the points are confirmed.' : ' The segment map is rebuilt when you let go.'}
      </p>
      {status && <p className="status-line" role="status" data-testid="landmark-status">{status}</p>}
      {unsaved && (
        <div className="notice problem" role="alert" data-testid="landmarks-unsaved">
          <p>Not saved: the segment map cannot be built from these positions. Move the points marked below, or undo.</p>
          <button type="button" onClick={onRevert}>Undo unsaved moves</button>
        </div>
      )}
      <ul className="landmark-list">
        {LANDMARK_NAMES.map((name) => {
          const p = landmarks?.points[name];
          const notes = [...(problems?.byLandmark[name] ?? []), ...(qc?.byLandmark[name] ?? [])];
          const state = proposed ? (proposed.moved.includes(name) ? 'moved' : 'proposed') : null;
          return (
            <li key={name} data-testid="landmark-row" data-landmark={name} data-state={state ?? undefined} className={notes.length ? 'has-notes' : undefined}>
              <div className="landmark-line">
                <span className="landmark-name">
                  {LANDMARK_LABELS[name].full} <span className="muted">({LANDMARK_LABELS[name].short})</span>
                  {state && <span className="landmark-state" data-testid="landmark-state"> · {state === 'moved' ? 'moved, confirmed' : 'proposed'}</span>}
                </span>
                <span className="landmark-actions">
                  <button type="button" className="link-button" onClick={() => onShow(name)} disabled={!p}>Show</button>
                  <button
                    type="button"
                    className="link-button"
                    aria-pressed={placing === name}
                    onClick={() => onPlace(placing === name ? null : name)}
                    disabled={busy}
                    data-testid="place-landmark"
                  >
                    {placing === name ? 'Click the image…' : 'Place'}
                  </button>
                </span>
              </div>
              {p && <div className="coords">{p.map(oneDecimal).join(', ')} mm</div>}
              {notes.map((n) => <p key={n} className="landmark-note-text" data-testid="landmark-note">{n}</p>)}
            </li>
          );
        })}
      </ul>
      {[...(problems?.general ?? []), ...(qc?.general ?? [])].map((n) => <p key={n} className="side-note" data-testid="landmark-general">{n}</p>)}
    </section>
  );
}
