import { COMPUTED_RESPONSE } from '../../../src/caution';
import { bestResponseText } from '../../../src/followup/best-response';
import type { VisitFollowup } from '../../../src/followup/followup';
import { PLANE_APPROXIMATION } from '../../../src/segments/build';
import { usePatient } from '../../analysis/PatientContext';
import { RouteLink } from '../../components/RouteLink';
import { fmtMm, fmtPct } from '../../format';
import { ReaderCallsPanel } from './ReaderCallsPanel';


/** The visit timeline: each visit's inputs, lesions, alerts and response category. */
export function OverviewTab() {
  const { patient, analysis } = usePatient();
  if (!analysis) return null;
  const byId = new Map<string, VisitFollowup>(analysis.followup.visits.map((v) => [v.id, v]));
  return (
    <section aria-labelledby="timeline-title">
      <h3 id="timeline-title">Visits</h3>
      <table className="data-table" data-testid="visit-table">
        <thead>
          <tr>
            <th scope="col">Date</th>
            <th scope="col">Visit</th>
            <th scope="col">Segment map</th>
            <th scope="col">Lesions</th>
            <th scope="col">Margin alerts</th>
            <th scope="col">Target sum{analysis.followup.criteria === 'mRECIST' ? ' (viable)' : ''}</th>
            <th scope="col">vs baseline</th>
            <th scope="col">vs nadir</th>
            <th scope="col">Response ({analysis.followup.criteria}, computed)</th>
            <th scope="col">New</th>
          </tr>
        </thead>
        <tbody>
          {[...analysis.manifest.visits.map((v) => ({ v, waiting: null })), ...analysis.waitingVisits.map((w) => ({ v: null, waiting: w }))]
            .sort((a, b) => (a.v ?? a.waiting!).date.localeCompare((b.v ?? b.waiting!).date)).map(({ v: mv, waiting }) => {
            if (!mv) {
              return (
                <tr key={waiting!.id} data-testid="visit-row" data-visit={waiting!.id} data-waiting="true">
                  <td>{waiting!.date}</td>
                  <th scope="row"><RouteLink to={{ screen: 'visit', patientId: patient.id, visitId: waiting!.id }}>{waiting!.id}</RouteLink></th>
                  <td colSpan={8} className="muted">no segment map yet: open the visit to grow the liver and confirm its landmarks; left out of the analysis until then</td>
                </tr>
              );
            }
            const k = analysis.manifest.visits.indexOf(mv);
            const f = byId.get(mv.id);
            const result = analysis.visits.find((v) => v.id === mv.id);
            const lesions = result?.analysis.lesions ?? [];
            const r = f?.response;
            return (
              <tr key={mv.id} data-testid="visit-row" data-visit={mv.id}>
                <td>{mv.date}</td>
                <th scope="row">
                  <RouteLink to={{ screen: 'visit', patientId: patient.id, visitId: mv.id }}>{mv.id}</RouteLink>
                </th>
                <td>{mv.segments ? 'imported' : <>built from landmarks <span className="muted">(flat planes)</span></>}</td>
                <td>{lesions.length} ({[mv.lesions && 'mask', mv.marks && 'marks'].filter(Boolean).join(' + ')})</td>
                <td className={f?.marginAlerts.length ? 'alert-cell' : undefined}>{f?.marginAlerts.join(', ') || '—'}</td>
                {/* A target not evaluable makes the sum NE, never a smaller sum or −100%. */}
                <td data-testid="target-sum">{r && !r.targetSumComplete ? 'NE' : fmtMm(r?.targetSumMm, 1)}</td>
                <td>{k === 0 ? 'baseline' : r && !r.targetSumComplete ? 'NE' : fmtPct(r?.changeFromBaselinePct, 1)}</td>
                <td>{k === 0 ? '—' : r && !r.targetSumComplete ? 'NE' : fmtPct(r?.changeFromNadirPct, 1)}</td>
                <td>
                  <span className={`category category-${(f?.overall ?? 'none').replace(/[^A-Za-z]/g, '')}`} data-testid="response">
                    {k === 0 ? 'baseline' : (f?.overall ?? '—')}
                  </span>
                </td>
                <td>{f?.newLesions.join(', ') || '—'}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
      <p className="hint" data-testid="computed-response-note">{COMPUTED_RESPONSE}</p>
      {analysis.manifest.visits.some((v) => !v.segments) && <p className="hint" data-testid="plane-approximation">{PLANE_APPROXIMATION}</p>}
      <p data-testid="best-response">Best overall response ({analysis.followup.criteria}): {bestResponseText(analysis.followup.bestResponse)}</p>
      {analysis.followup.visits.length > 1 && <ReaderCallsPanel />}
      {analysis.followup.departures.length > 0 && <p>Protocol settings: {analysis.followup.departures.join('; ')}</p>}
      {analysis.followup.notes.length > 0 && (
        <ul className="notes">
          {analysis.followup.notes.map((n) => <li key={n}>{n}</li>)}
        </ul>
      )}
      {(analysis.visits.some((v) => v.warnings.length > 0) || analysis.followup.warnings.length > 0) && (
        <details className="warnings">
          <summary>Warnings</summary>
          <ul>
            {analysis.visits.flatMap((v) => v.warnings.map((w) => <li key={`${v.id}:${w}`}>visit {v.id}: {w}</li>))}
            {analysis.followup.warnings.map((w) => <li key={w}>{w}</li>)}
          </ul>
        </details>
      )}
    </section>
  );
}
