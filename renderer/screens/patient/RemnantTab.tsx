import { useMemo, useState, type FormEvent } from 'react';
import type { ProposedResection } from '../../../src/manifest/manifest';
import { bodySurfaceAreaM2, standardisedLiverVolumeMl } from '../../../src/remnant/body';
import type { PatientRemnant } from '../../../src/remnant/for-patient';
import { RESECTION_PRESETS } from '../../../src/remnant/resections';
import type { VisitVolumetry } from '../../../src/remnant/volumetry';
import type { SegmentName } from '../../../src/segments/segment-map';
import { usePatient } from '../../analysis/PatientContext';
import { visitRemnant } from '../../analysis/remnant';
import type { VisitResult } from '../../analysis/types';
import { errorText } from '../../error-text';
import { appDb } from '../../store/db';
import { updatePatient } from '../../store/patients';

const ml = (x: number) => x.toFixed(1);
const pct = (share: number) => `${(share * 100).toFixed(1)}%`;
const BY_HAND = '';
/** Lesions by their track, as the other screens name them, with this visit's own id beside it. */
const named = (lesion: string, track: string | null | undefined) => (track ? `${track} (${lesion})` : lesion);

/**
 * Volumes per segment of one visit and the liver a resection would leave: pick a named resection
 * or tick segments, read the remnant against the commonly quoted minimums and the lesions it keeps.
 */
export function RemnantTab() {
  const { patient, analysis, reload, reanalyse } = usePatient();
  const visits = analysis?.visits ?? [];
  const [visitId, setVisitId] = useState<string | null>(null);
  const [choice, setChoice] = useState<ProposedResection | null>(analysis?.manifest.resection ?? null);
  if (!analysis || visits.length === 0) return null;
  const visit = visits.find((v) => v.id === visitId) ?? visits[visits.length - 1];

  let plan: PatientRemnant | null = null;
  let problem: string | null = null;
  try {
    plan = choice && visitRemnant(analysis, visit, patient, choice);
  } catch (e) {
    problem = errorText(e);
  }
  const removed = new Set<SegmentName>(plan?.removedSegments ?? []);
  const toggle = (s: SegmentName) => {
    const next = removed.has(s) ? [...removed].filter((x) => x !== s) : [...removed, s];
    setChoice(next.length ? { segments: visit.volumetry.segments.map((r) => r.segment).filter((x) => next.includes(x)) } : null);
  };

  return (
    <section className="remnant" aria-labelledby="remnant-title" data-testid="remnant-tab">
      <h3 id="remnant-title">Liver volumes and remnant</h3>
      <div className="remnant-bar">
        <label>
          Visit
          <select data-testid="remnant-visit" value={visit.id} onChange={(e) => setVisitId(e.target.value)}>
            {visits.map((v, k) => (
              <option key={v.id} value={v.id}>{v.date} — {v.id}{k === visits.length - 1 ? ' (latest)' : ''}</option>
            ))}
          </select>
        </label>
        <label>
          Resection (Brisbane 2000 terminology)
          <select
            data-testid="remnant-preset"
            value={choice?.preset ?? BY_HAND}
            onChange={(e) => setChoice(e.target.value === BY_HAND ? null : { preset: e.target.value })}
          >
            <option value={BY_HAND}>{choice?.segments ? 'Segments ticked below' : 'None: tick segments below'}</option>
            {RESECTION_PRESETS.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}{p.alsoCalled.length ? ` (${p.alsoCalled.join('; ')})` : ''} — removes {p.removes.join(', ')}
              </option>
            ))}
          </select>
        </label>
        {choice && <button type="button" onClick={() => setChoice(null)}>Clear</button>}
        {JSON.stringify(choice ?? null) !== JSON.stringify(patient.resection ?? null) && (
          <button
            type="button"
            data-testid="remnant-keep"
            onClick={() => void updatePatient(appDb(), patient.id, { resection: choice ?? undefined }).then(reanalyse)}
          >
            {choice ? 'Keep as the proposed resection' : 'Withdraw the proposed resection'}
          </button>
        )}
        {patient.resection && JSON.stringify(choice) === JSON.stringify(patient.resection) && (
          <span className="kept" data-testid="remnant-kept">Proposed resection for the board summary</span>
        )}
      </div>

      <div className="remnant-layout">
        <VolumetryTable visit={visit} removed={removed} planned={plan !== null} onToggle={toggle} />
        <div className="remnant-result">
          {problem && <p className="notice problem" role="alert">{problem}</p>}
          {!plan && !problem && (
            <p className="empty" data-testid="remnant-none">Choose a named resection or tick the segments to remove to see the remnant.</p>
          )}
          {plan && <PlanSummary plan={plan} />}
          <BodySize heightCm={patient.heightCm} weightKg={patient.weightKg} patientId={patient.id} onSaved={reload} />
        </div>
      </div>
    </section>
  );
}

function VolumetryTable({ visit, removed, planned, onToggle }: {
  visit: VisitResult;
  removed: ReadonlySet<SegmentName>;
  planned: boolean;
  onToggle(s: SegmentName): void;
}) {
  const v: VisitVolumetry = visit.volumetry;
  const sum = (f: (s: VisitVolumetry['segments'][number]) => number) => v.segments.reduce((a, s) => a + f(s), 0);
  const segmentSum = sum((s) => s.volumeMl);
  // Checked against the analysis's own liver volume, counted on the same map.
  const addsUp = Math.abs(segmentSum - visit.analysis.liverVolumeMl) < 0.05;
  const est = v.estimated;
  // The estimate has its own flag above; the other notes are listed under the table.
  const notes = v.notes.filter((n) => !n.startsWith('Tumour volumes are ESTIMATES'));
  return (
    <div className="volumetry">
      {est && (
        <p className="notice estimate" data-testid="estimate-flag">
          <strong>Estimated tumour volumes.</strong> Visit {visit.id} has manual marks only: each tumour volume is an
          ellipsoid from the marked diameters (π/6 × longest × short axis²), not a measured volume, so the
          tumour-free volumes and the remnant are estimates too.
        </p>
      )}
      <table className="data-table volumetry-table" data-testid="volumetry-table">
        <caption>Visit {visit.id}, {visit.date}: volumes in mL</caption>
        <thead>
          <tr>
            <th scope="col">Remove</th>
            <th scope="col">Segment</th>
            <th scope="col" className="num">Volume (mL)</th>
            <th scope="col" className="num">Tumour (mL){est ? ', estimated' : ''}</th>
            <th scope="col" className="num">Tumour-free (mL)</th>
            <th scope="col">In the plan</th>
          </tr>
        </thead>
        <tbody>
          {v.segments.map((s) => {
            const gone = removed.has(s.segment);
            return (
              <tr key={s.segment} className={gone ? 'removed' : undefined} data-testid="volumetry-row" data-segment={s.segment} data-removed={gone}>
                <td>
                  <input
                    type="checkbox"
                    checked={gone}
                    onChange={() => onToggle(s.segment)}
                    aria-label={`Remove segment ${s.segment}`}
                    data-testid={`remove-${s.segment}`}
                  />
                </td>
                <th scope="row">{s.segment}</th>
                <td className="num">{ml(s.volumeMl)}</td>
                <td className={`num${est && s.tumourMl > 0 ? ' estimated' : ''}`}>{est && s.tumourMl > 0 ? '≈ ' : ''}{ml(s.tumourMl)}</td>
                <td className="num" data-testid="tumour-free-ml">{ml(s.tumourFreeMl)}</td>
                <td>{planned ? (gone ? 'removed' : 'stays') : '—'}</td>
              </tr>
            );
          })}
        </tbody>
        <tfoot>
          <tr data-testid="volumetry-total">
            <td />
            <th scope="row">Liver</th>
            <td className="num" data-testid="liver-ml">{ml(v.liverVolumeMl)}</td>
            <td className="num">{est ? '≈ ' : ''}{ml(v.tumourVolumeMl)}</td>
            <td className="num" data-testid="tumour-free-total">{ml(v.tumourFreeLiverMl)}</td>
            <td />
          </tr>
        </tfoot>
      </table>
      <p className={addsUp ? 'check ok' : 'check bad'} data-testid="segment-sum-check">
        {addsUp ? '✓' : '✗'} Segment volumes add up to {ml(segmentSum)} mL; the liver volume of this visit's segment map is {ml(visit.analysis.liverVolumeMl)} mL.
      </p>
      {v.tumourOutsideSegmentsMl > 0 && (
        <p className="hint">{ml(v.tumourOutsideSegmentsMl)} mL of tumour lies outside the segment map's liver and is counted in no segment.</p>
      )}
      {notes.length > 0 && <ul className="notes">{notes.map((n) => <li key={n}>{n}</li>)}</ul>}
    </div>
  );
}

function PlanSummary({ plan }: { plan: PatientRemnant }) {
  const est = plan.estimated ? ' (estimate)' : '';
  const sources = [...new Set(plan.cautions.map((c) => c.source))];
  const compared = plan.comparedShare;
  return (
    <div className="plan" data-testid="remnant-plan">
      <h4 data-testid="remnant-label">{plan.label}</h4>
      <dl className="plan-figures">
        <div>
          <dt>Remnant, tumour-free{est}</dt>
          <dd><span data-testid="remnant-ml">{ml(plan.remnantMl)}</span> mL</dd>
        </div>
        <div>
          <dt>Share of the tumour-free liver{est}</dt>
          <dd><span data-testid="remnant-share">{pct(plan.remnantShare)}</span> <small>of {ml(plan.tumourFreeLiverMl)} mL</small></dd>
        </div>
        {plan.bsaM2 !== null && plan.standardisedLiverMl !== null && plan.standardisedRemnantShare !== null && (
          <>
            <div>
              <dt>Body surface area (Mosteller)</dt>
              <dd data-testid="bsa">{plan.bsaM2.toFixed(2)} m²</dd>
            </div>
            <div>
              <dt>Standardised total liver volume (Vauthey)</dt>
              <dd>{ml(plan.standardisedLiverMl)} mL</dd>
            </div>
            <div>
              <dt>Standardised remnant{est}</dt>
              <dd data-testid="standardised-share">{pct(plan.standardisedRemnantShare)}</dd>
            </div>
          </>
        )}
      </dl>
      {plan.bsaM2 === null && (
        <p className="hint">Height and weight are needed for the standardised remnant; until then the measured share is compared.</p>
      )}

      <h4>Minimum remnant shares</h4>
      <p className="hint" data-testid="cautions-note">{plan.cautionsNote}</p>
      {plan.overFull && <p className="notice estimate" data-testid="remnant-over-full">{plan.overFull}</p>}
      <ShareScale value={compared.value} minimums={plan.cautions.map((c) => c.minimumShare)} />
      <table className="data-table cautions-table">
        <thead>
          <tr>
            <th scope="col">Liver</th>
            <th scope="col" className="num">Commonly quoted minimum</th>
            <th scope="col" className="num">{compared.kind === 'standardised' ? 'Standardised remnant' : 'Measured share'}</th>
            <th scope="col">Compared share is, against this minimum</th>
          </tr>
        </thead>
        <tbody>
          {plan.cautions.map((c) => (
            <tr key={c.context} data-testid="remnant-caution" data-above={c.met}>
              <th scope="row">{c.context}</th>
              <td className="num">{pct(c.minimumShare)}</td>
              <td className="num">{pct(compared.value)}</td>
              <td className="relation">{minimumRelation(c.met)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {sources.map((s) => <p key={s} className="source">Source: {s}</p>)}

      <h4>Lesions with margin alerts</h4>
      {plan.alertLesions.length === 0 ? (
        <p className="hint" data-testid="remnant-alerts-none">No lesion with a margin alert would stay in the remnant or lie at the cut.</p>
      ) : (
        <ul className="alert-lesions" data-testid="remnant-alerts">
          {plan.alertLesions.map((a) => (
            <li key={a.lesion} data-lesion={a.lesion} className={a.where === 'in remnant' ? 'stays' : 'cut'}>
              <strong>{named(a.lesion, a.track)}</strong> in {a.segment ?? 'no segment'},{' '}
              {a.marginMm === null ? 'margin not measured' : `${a.marginMm.toFixed(1)} mm`} from {a.nearestOtherSegment ?? 'another segment'}:{' '}
              {ALERT_WHERE[a.where]}
            </li>
          ))}
        </ul>
      )}
      <p className="hint" data-testid="remnant-lesions">
        Lesions left wholly in the remnant: {plan.lesionsInRemnant.map((id) => named(id, plan.lesionTracks[id])).join(', ') || 'none'}.
      </p>
      {plan.lesionsCrossingCut.length > 0 && (
        <p className="hint" data-testid="remnant-crossing">
          Crossing the cut (part in a removed segment, part in one that stays):{' '}
          {plan.lesionsCrossingCut.map((c) => `${named(c.id, plan.lesionTracks[c.id])}, ${pct(c.keptShare)} of it in the remnant`).join('; ')}.
        </p>
      )}
      {plan.warnings.length > 0 && (
        <ul className="warnings" data-testid="remnant-warnings">
          {plan.warnings.map((w) => <li key={w}>{w}</li>)}
        </ul>
      )}
    </div>
  );
}

/** Neutral words for where the compared share lies against a minimum: a figure to weigh, not a verdict. */
const minimumRelation = (atOrAbove: boolean) => (atOrAbove ? 'above' : 'below');

const ALERT_WHERE: Record<PatientRemnant['alertLesions'][number]['where'], string> = {
  'in remnant': 'would stay in the remnant',
  'crosses the cut': 'crosses the cut: part of it would stay',
  'at transection': 'taken out, but close to the cut towards a segment that stays',
};

/**
 * The compared share on a 0–100 % scale with the minimums marked, so distance to each reads at a
 * glance. Over 100 % there is no fill: a full bar would read as "all of the liver"; a double end mark
 * and the figure point to the note above the scale instead.
 */
function ShareScale({ value, minimums }: { value: number; minimums: number[] }) {
  const at = (x: number) => `${Math.min(100, Math.max(0, x * 100))}%`;
  return (
    <div className="share-scale" role="img" aria-label={`Compared share ${pct(value)}; minimums ${minimums.map(pct).join(', ')}`}>
      {value <= 1 ? <div className="share-fill" style={{ width: at(value) }} /> : <span className="share-over" data-testid="share-over"><span>{pct(value)}, over the scale: see the note</span></span>}
      {minimums.map((m) => (
        <span key={m} className="share-tick" style={{ left: at(m) }}><span>{pct(m)}</span></span>
      ))}
      <span className="share-axis share-axis-0">0%</span>
      <span className="share-axis share-axis-100">100%</span>
    </div>
  );
}

/** Height and weight for the standardised remnant; entered here when the import lacked them. */
function BodySize({ heightCm, weightKg, patientId, onSaved }: {
  heightCm?: number;
  weightKg?: number;
  patientId: string;
  onSaved(): void;
}) {
  const known = heightCm !== undefined && weightKg !== undefined;
  const [editing, setEditing] = useState(false);
  const [height, setHeight] = useState(heightCm?.toString() ?? '');
  const [weight, setWeight] = useState(weightKg?.toString() ?? '');
  const [error, setError] = useState<string | null>(null);
  const [saving, setSaving] = useState(false);
  const preview = useMemo(() => {
    try {
      const bsa = bodySurfaceAreaM2(Number(height), Number(weight));
      return `BSA ${bsa.toFixed(2)} m², standardised total liver volume ${ml(standardisedLiverVolumeMl(bsa))} mL`;
    } catch {
      return null;
    }
  }, [height, weight]);

  if (known && !editing) {
    return (
      <p className="body-size" data-testid="body-size">
        Height {heightCm} cm, weight {weightKg} kg.{' '}
        <button type="button" className="link-button" onClick={() => setEditing(true)}>Change</button>
      </p>
    );
  }
  const save = async (e: FormEvent) => {
    e.preventDefault();
    const h = Number(height);
    const w = Number(weight);
    try {
      // The same checks the standardised remnant applies, so a value saved here is one it can use.
      standardisedLiverVolumeMl(bodySurfaceAreaM2(h, w));
    } catch (err) {
      setError(errorText(err));
      return;
    }
    setSaving(true);
    try {
      await updatePatient(appDb(), patientId, { heightCm: h, weightKg: w });
      setError(null);
      setEditing(false);
      onSaved();
    } catch (err) {
      setError(errorText(err));
    } finally {
      setSaving(false);
    }
  };
  return (
    <form className="body-form" onSubmit={(e) => void save(e)} data-testid="body-form">
      <p className="hint">
        {known ? 'Change' : 'Enter'} height and weight for the standardised remnant. They are stored with the patient
        and the change is recorded in the patient's edit trail.
      </p>
      <div className="form-grid">
        <label>
          Height (cm)
          <input type="number" inputMode="decimal" min={100} max={250} step="any" required value={height}
            onChange={(e) => setHeight(e.target.value)} data-testid="body-height" />
        </label>
        <label>
          Weight (kg)
          <input type="number" inputMode="decimal" min={25} max={350} step="any" required value={weight}
            onChange={(e) => setWeight(e.target.value)} data-testid="body-weight" />
        </label>
      </div>
      {preview && <p className="hint">{preview}</p>}
      {error && <p className="notice problem" role="alert">{error}</p>}
      <div className="dialog-actions">
        {known && <button type="button" onClick={() => setEditing(false)}>Cancel</button>}
        <button type="submit" className="primary" disabled={saving} data-testid="body-save">Save height and weight</button>
      </div>
    </form>
  );
}
