import { LANDMARK_NAMES, type LandmarkName, type LandmarkSet } from '../../src/segments/landmarks';
import { oneDecimal } from '../format';
import { LANDMARK_LABELS, type LandmarkNotes } from './landmark-qc';

export type LandmarkMode =
  /** The map is built from this visit's landmarks: they can be moved. */
  | 'built'
  /** An imported map, but a liver mask too: a map can be built from landmarks instead. */
  | 'imported-with-liver'
  /** An imported map and no liver mask: landmarks have nothing to divide. */
  | 'imported';

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
}

/** The landmark set: each point with its position and the checks that concern it, right beside it. */
export function LandmarkPanel({ mode, landmarks, unsaved, problems, qc, onShow, onPlace, placing, onRevert, onStartBuilding, busy, status }: Props) {
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
  return (
    <section className="side-section" aria-labelledby="landmarks-title" data-testid="landmark-panel">
      <h3 id="landmarks-title">Landmarks</h3>
      <p className="side-note">
        Drag a point on the image to move it within the slice, or choose Place and click where it lies. The segment map is
        rebuilt when you let go.
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
          return (
            <li key={name} data-testid="landmark-row" data-landmark={name} className={notes.length ? 'has-notes' : undefined}>
              <div className="landmark-line">
                <span className="landmark-name">{LANDMARK_LABELS[name].full} <span className="muted">({LANDMARK_LABELS[name].short})</span></span>
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
