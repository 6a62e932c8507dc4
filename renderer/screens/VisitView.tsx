import { usePatient } from '../analysis/PatientContext';
import { AnalysisStatus } from '../components/AnalysisStatus';
import { go } from '../navigation';

const mm = (x: number | null | undefined) => (x === null || x === undefined ? '—' : x.toFixed(1));

/** One visit: its lesions with segment, size and margin. */
export function VisitView({ visitId, lesionId }: { visitId: string; lesionId?: string }) {
  const { patient, state, analysis } = usePatient();
  const visit = analysis?.visits.find((v) => v.id === visitId);
  return (
    <div className="visit-view" data-testid="visit-view">
      <nav className="crumbs">
        <a href="#/" onClick={(e) => { e.preventDefault(); go({ screen: 'patients' }); }}>All patients</a>
        {' › '}
        <a href="#" onClick={(e) => { e.preventDefault(); go({ screen: 'patient', patientId: patient.id }); }}>{patient.id}</a>
        {' › '}
        <span>visit {visitId}{visit ? ` (${visit.date})` : ''}</span>
      </nav>
      <AnalysisStatus state={state} />
      {analysis && !visit && <p className="notice error" role="alert">Visit {visitId} is not among {patient.id}&apos;s visits.</p>}
      {visit && (
        <table className="data-table" data-testid="lesion-table">
          <thead>
            <tr>
              <th scope="col">Lesion</th><th scope="col">Segment</th><th scope="col">Longest axial (mm)</th>
              <th scope="col">Short axis (mm)</th><th scope="col">Volume (mL)</th><th scope="col">Margin (mm)</th>
              <th scope="col">Nearest other segment</th>
            </tr>
          </thead>
          <tbody>
            {visit.analysis.lesions.map((l) => (
              <tr key={l.id} data-testid="lesion-row" data-lesion={l.id} className={l.id === lesionId ? 'selected' : undefined}>
                <th scope="row">{l.id}</th>
                <td>{l.segment ?? 'outside'}</td>
                <td>{mm(l.longestAxialMm)}</td>
                <td>{mm(l.shortAxisMm)}</td>
                <td>{l.volumeMl === null ? '—' : l.volumeMl.toFixed(2)}</td>
                <td className={l.marginAlert ? 'alert-cell' : undefined}>{mm(l.marginMm)}</td>
                <td>{l.nearestOtherSegment ?? '—'}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </div>
  );
}
