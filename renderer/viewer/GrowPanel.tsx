import { useEffect, useState } from 'react';
import type { Vec3 } from '../../src/geometry/mat4';
import { LESION_DEFAULTS } from '../../src/image/grow-lesion';
import { LIVER_DEFAULTS } from '../../src/image/grow-liver';
import { errorText } from '../error-text';
import { appDb } from '../store/db';
import { restoreMask, saveGrownMask } from '../store/grown-masks';
import type { VolumeRecord } from '../../src/model/records';
import { runJob } from '../workers/job-client';
import type { BrushedMask, GrowRequest, GrowResult } from './grow-messages';

export type GrowKind = 'liver' | 'lesion' | 'brush-add' | 'brush-erase';
type MaskRole = 'liver' | 'lesions';

/** One stored change the reader can take back: the role's volume record as it was before. */
interface UndoStep {
  role: MaskRole;
  before: VolumeRecord | undefined;
  what: string;
}

interface Props {
  patientId: string;
  visitId: string;
  /** What the next click on the image seeds, if anything. */
  picking: GrowKind | null;
  onPicking(kind: GrowKind | null): void;
  /** The point the reader clicked for `picking` (a new object per click); a brush stroke's whole path. */
  seed: { kind: GrowKind; p: Vec3; path?: Vec3[] } | null;
  /** After a grown mask is stored: the images and the analysis need reloading. */
  onAccepted(text: string): void;
  busy: boolean;
}

const mm = (p: Vec3) => p.map((x) => x.toFixed(1)).join(', ');

/**
 * Liver mask from a click and lesion from a click: the reader sets the settings, clicks on the image,
 * the grower runs in a worker with its progress shown, and the result (with every setting it used)
 * waits for the reader to accept or discard it. Accepting stores the mask with an edit-trail entry.
 */
export function GrowPanel({ patientId, visitId, picking, onPicking, seed, onAccepted, busy }: Props) {
  const [openingMm, setOpeningMm] = useState(LIVER_DEFAULTS.openingMm);
  const [closingMm, setClosingMm] = useState(LIVER_DEFAULTS.closingMm);
  const [maxRadiusMm, setMaxRadiusMm] = useState(LESION_DEFAULTS.maxRadiusMm);
  const [progress, setProgress] = useState<{ done: number; step: string } | null>(null);
  const [result, setResult] = useState<GrowResult | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const [saving, setSaving] = useState(false);
  const [brushMm, setBrushMm] = useState(5);
  const [brushRole, setBrushRole] = useState<MaskRole>('liver');
  const [undo, setUndo] = useState<UndoStep[]>([]);

  useEffect(() => {
    if (!seed) return;
    const stop = new AbortController();
    setResult(null);
    setProblem(null);
    setProgress({ done: 0, step: 'starting' });
    const request: GrowRequest = seed.kind === 'liver'
      ? { kind: 'liver', patientId, visitId, seedMm: seed.p, params: { openingMm, closingMm } }
      : seed.kind === 'lesion'
        ? { kind: 'lesion', patientId, visitId, seedMm: seed.p, params: { maxRadiusMm } }
        : { kind: 'brush', patientId, visitId, pathMm: seed.path ?? [seed.p], role: brushRole, radiusMm: brushMm, erase: seed.kind === 'brush-erase' };
    runJob<GrowResult>(new Worker(new URL('../workers/grow.worker.ts', import.meta.url), { type: 'module' }), request, {
      crashed: 'growing stopped unexpectedly',
      signal: stop.signal,
      onProgress: (done, _total, step) => setProgress({ done, step }),
    }).then(
      (r) => {
        setProgress(null);
        // A brush dab is stored at once (each one in the edit trail, each one undoable).
        if (r.kind === 'brush') void storeBrush(r);
        else setResult(r);
      },
      (e: unknown) => { setProblem(errorText(e)); setProgress(null); },
    );
    return () => stop.abort();
    // A new click (a new seed object) starts a new run; the settings are read at that moment.
  }, [seed]);

  const storeBrush = async (r: BrushedMask) => {
    setSaving(true);
    try {
      const stroke = r.pathMm.length > 1 ? `stroke of ${r.dabs} ${r.radiusMm} mm balls` : `${r.radiusMm} mm ball`;
      const what = `${r.erase ? 'erased' : 'added'} a ${stroke} ${r.erase ? 'from' : 'to'} the ${r.role === 'liver' ? 'liver' : 'lesion'} mask (${r.changed} voxels)`;
      // One entry per click or stroke, with its path (0.1 mm), so the trail can redraw it.
      const before = await saveGrownMask(appDb(), patientId, visitId, r.role, r, {
        brush: r.erase ? 'erase' : 'add', centreMm: r.pathMm[0].map((x) => Math.round(x * 10) / 10),
        ...(r.pathMm.length > 1 ? { pathMm: r.pathMm.map((p) => p.map((x) => Math.round(x * 10) / 10)), dabs: r.dabs } : {}),
        radiusMm: r.radiusMm, voxels: r.changed,
      });
      setUndo((u) => [...u, { role: r.role, before, what }]);
      onAccepted(`Brush: ${what}; the analysis is updating.`);
    } catch (e) {
      setProblem(errorText(e));
    } finally {
      setSaving(false);
    }
  };
  const undoLast = async () => {
    const step = undo[undo.length - 1];
    if (!step) return;
    setSaving(true);
    try {
      await restoreMask(appDb(), patientId, visitId, step.role, step.before);
      setUndo((u) => u.slice(0, -1));
      onAccepted(`Undone: ${step.what}.`);
    } catch (e) {
      setProblem(errorText(e));
    } finally {
      setSaving(false);
    }
  };

  const accept = async () => {
    if (!result || result.kind === 'brush') return;
    setSaving(true);
    try {
      let before: VolumeRecord | undefined;
      if (result.kind === 'liver') {
        const p = result.params;
        before = await saveGrownMask(appDb(), patientId, visitId, 'liver', result, {
          seedMm: [...result.seedMm], window: [...p.window], openingMm: p.openingMm, closingMm: p.closingMm,
          smoothingSteps: p.smoothingSteps, conductance: p.conductance, fillHoles: p.fillHoles,
        });
        setUndo((u) => [...u, { role: 'liver', before, what: 'the grown liver mask' }]);
        onAccepted(`Liver mask of ${result.volumeMl.toFixed(0)} mL stored for visit ${visitId}; the segment map and analysis are updating.`);
      } else {
        before = await saveGrownMask(appDb(), patientId, visitId, 'lesions', result, {
          seedMm: [...result.seedMm], kind: result.lesionKind, threshold: result.threshold, maxRadiusMm: result.params.maxRadiusMm,
        });
        setUndo((u) => [...u, { role: 'lesions', before, what: 'the grown lesion' }]);
        onAccepted(`Lesion of ${result.volumeMl.toFixed(2)} mL added to the lesion mask of visit ${visitId}; the analysis is updating.`);
      }
      setResult(null);
    } catch (e) {
      setProblem(errorText(e));
    } finally {
      setSaving(false);
    }
  };

  const number = (label: string, value: number, set: (x: number) => void, testId: string, min: number, max: number, step: number) => (
    <label className="grow-setting">
      {label}
      <input type="number" value={value} min={min} max={max} step={step} data-testid={testId}
        onChange={(e) => { const x = Number(e.target.value); if (Number.isFinite(x) && x >= min && x <= max) set(x); }} />
    </label>
  );
  const running = progress !== null;
  return (
    <details className="side-section" data-testid="grow-panel">
      <summary data-testid="grow-open"><h3 className="inline-title">Grow from a click, brush</h3></summary>
      <div className="grow-settings">
        {number('Opening (mm)', openingMm, setOpeningMm, 'grow-opening', 0, 20, 0.5)}
        {number('Closing (mm)', closingMm, setClosingMm, 'grow-closing', 0, 20, 0.5)}
        {number('Lesion size limit (mm)', maxRadiusMm, setMaxRadiusMm, 'grow-limit', 5, 100, 1)}
      </div>
      <div className="grow-buttons">
        <button type="button" aria-pressed={picking === 'liver'} disabled={running || busy || saving} data-testid="grow-liver"
          onClick={() => onPicking(picking === 'liver' ? null : 'liver')}>Liver from a click</button>
        <button type="button" aria-pressed={picking === 'lesion'} disabled={running || busy || saving} data-testid="grow-lesion"
          onClick={() => onPicking(picking === 'lesion' ? null : 'lesion')}>Lesion from a click</button>
      </div>
      <h4 className="grow-subtitle">Brush</h4>
      <div className="grow-settings">
        {number('Brush radius (mm)', brushMm, setBrushMm, 'brush-radius', 0.5, 50, 0.5)}
        <label className="grow-setting">
          Edits
          <select value={brushRole} onChange={(e) => setBrushRole(e.target.value as MaskRole)} data-testid="brush-role">
            <option value="liver">liver mask</option>
            <option value="lesions">lesion mask</option>
          </select>
        </label>
      </div>
      <div className="grow-buttons">
        <button type="button" aria-pressed={picking === 'brush-add'} disabled={running || busy || saving} data-testid="brush-add"
          onClick={() => onPicking(picking === 'brush-add' ? null : 'brush-add')}>Add</button>
        <button type="button" aria-pressed={picking === 'brush-erase'} disabled={running || busy || saving} data-testid="brush-erase"
          onClick={() => onPicking(picking === 'brush-erase' ? null : 'brush-erase')}>Erase</button>
        <button type="button" disabled={undo.length === 0 || running || busy || saving} data-testid="mask-undo" onClick={() => void undoLast()}
          title={undo.length ? `Undo: ${undo[undo.length - 1].what}` : 'Nothing to undo'}>Undo{undo.length ? ` (${undo.length})` : ''}</button>
      </div>
      {running && (
        <div className="analysis-progress" role="status" data-testid="grow-progress">
          <progress max={100} value={progress.done} />
          <span>{progress.step}…</span>
        </div>
      )}
      {problem && <p className="notice problem" role="alert" data-testid="grow-problem">{problem}</p>}
      {result && result.kind !== 'brush' && (
        <div className="grow-result" data-testid="grow-result">
          {result.kind === 'liver' ? (
            <>
              <p><strong>Liver {result.volumeMl.toFixed(0)} mL</strong> from the seed at ({mm(result.seedMm)}) mm.</p>
              <table className="grow-params">
                <tbody>
                  <tr><th>Window</th><td>{result.params.window[0].toFixed(0)} to {result.params.window[1].toFixed(0)}</td></tr>
                  <tr><th>Noise at the seed</th><td>{result.noiseLevel.toFixed(1)}</td></tr>
                  <tr><th>Smoothing</th><td>{result.params.smoothingSteps} diffusion steps, κ {result.params.conductance.toFixed(0)}</td></tr>
                  <tr><th>Opening / closing</th><td>{result.params.openingMm} mm / {result.params.closingMm} mm</td></tr>
                  <tr><th>Holes</th><td>{result.params.fillHoles ? 'filled' : 'kept'}</td></tr>
                </tbody>
              </table>
            </>
          ) : (
            <>
              <p><strong>{result.lesionKind === 'hypodense' ? 'Hypodense' : 'Hyperdense'} lesion, {result.volumeMl.toFixed(2)} mL</strong>: longest axial
                {' '}{result.longestAxialMm.toFixed(1)} mm, short axis {result.shortAxisMm.toFixed(1)} mm.</p>
              <table className="grow-params">
                <tbody>
                  <tr><th>At the click / liver around</th><td>{result.lesionValue.toFixed(0)} / {result.liverValue.toFixed(0)}</td></tr>
                  <tr><th>Threshold</th><td>{result.threshold.toFixed(0)}</td></tr>
                  <tr><th>Size limit</th><td>{result.params.maxRadiusMm} mm from the click{result.reachedLimit ? ' (reached)' : ''}</td></tr>
                </tbody>
              </table>
            </>
          )}
          {result.warnings.map((w) => <p key={w} className="notice problem">{w}</p>)}
          <div className="grow-buttons">
            <button type="button" onClick={() => void accept()} disabled={saving || busy} data-testid="grow-accept">Accept</button>
            <button type="button" onClick={() => setResult(null)} disabled={saving} data-testid="grow-discard">Discard</button>
          </div>
        </div>
      )}
    </details>
  );
}
