import { useEffect, useState } from 'react';
import type { Vec3 } from '../../src/geometry/mat4';
import { LESION_DEFAULTS } from '../../src/image/grow-lesion';
import { LIVER_DEFAULTS } from '../../src/image/grow-liver';
import { errorText } from '../error-text';
import { appDb } from '../store/db';
import { saveGrownMask } from '../store/grown-masks';
import { runJob } from '../workers/job-client';
import type { GrowRequest, GrowResult } from './grow-messages';

export type GrowKind = 'liver' | 'lesion';

interface Props {
  patientId: string;
  visitId: string;
  /** What the next click on the image seeds, if anything. */
  picking: GrowKind | null;
  onPicking(kind: GrowKind | null): void;
  /** The point the reader clicked for `picking` (a new object per click). */
  seed: { kind: GrowKind; p: Vec3 } | null;
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

  useEffect(() => {
    if (!seed) return;
    const stop = new AbortController();
    setResult(null);
    setProblem(null);
    setProgress({ done: 0, step: 'starting' });
    const request: GrowRequest = seed.kind === 'liver'
      ? { kind: 'liver', patientId, visitId, seedMm: seed.p, params: { openingMm, closingMm } }
      : { kind: 'lesion', patientId, visitId, seedMm: seed.p, params: { maxRadiusMm } };
    runJob<GrowResult>(new Worker(new URL('../workers/grow.worker.ts', import.meta.url), { type: 'module' }), request, {
      crashed: 'growing stopped unexpectedly',
      signal: stop.signal,
      onProgress: (done, _total, step) => setProgress({ done, step }),
    }).then(
      (r) => { setResult(r); setProgress(null); },
      (e: unknown) => { setProblem(errorText(e)); setProgress(null); },
    );
    return () => stop.abort();
    // A new click (a new seed object) starts a new run; the settings are read at that moment.
  }, [seed]);

  const accept = async () => {
    if (!result) return;
    setSaving(true);
    try {
      if (result.kind === 'liver') {
        const p = result.params;
        await saveGrownMask(appDb(), patientId, visitId, 'liver', result, {
          seedMm: [...result.seedMm], window: [...p.window], openingMm: p.openingMm, closingMm: p.closingMm,
          smoothingSteps: p.smoothingSteps, conductance: p.conductance, fillHoles: p.fillHoles,
        });
        onAccepted(`Liver mask of ${result.volumeMl.toFixed(0)} mL stored for visit ${visitId}; the segment map and analysis are updating.`);
      } else {
        await saveGrownMask(appDb(), patientId, visitId, 'lesions', result, {
          seedMm: [...result.seedMm], kind: result.lesionKind, threshold: result.threshold, maxRadiusMm: result.params.maxRadiusMm,
        });
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
    <section className="side-section" aria-labelledby="grow-title" data-testid="grow-panel">
      <h3 id="grow-title">Grow from a click</h3>
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
      {running && (
        <div className="analysis-progress" role="status" data-testid="grow-progress">
          <progress max={100} value={progress.done} />
          <span>{progress.step}…</span>
        </div>
      )}
      {problem && <p className="notice problem" role="alert" data-testid="grow-problem">{problem}</p>}
      {result && (
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
    </section>
  );
}
