import { showsViable } from '../../../src/followup/followup';
import { usePatient } from '../../analysis/PatientContext';
import { alertRows } from '../../charts/alert-rows';
import { oneDecimal } from '../../format';
import { RouteLink } from '../../components/RouteLink';

/** Lesions closer than the set margin to another segment, at every visit; each opens in the visit view. */
export function AlertsTab() {
  const { patient, analysis } = usePatient();
  if (!analysis) return null;
  const f = analysis.followup;
  const rows = alertRows(f, analysis.visits);
  const viable = showsViable(f);
  const latest = analysis.visits[analysis.visits.length - 1]?.id;
  return (
    <section aria-labelledby="alerts-title">
      <h3 id="alerts-title">Margin alerts</h3>
      <p className="chart-note">
        Lesions whose edge lies {f.marginMm} mm or less (the set margin for this patient) from the border of another segment. The margin is
        measured from the lesion&apos;s outer voxel faces to the border surface, the faces of the other segment&apos;s voxels; 0 mm means the
        lesion touches or spans the border. A lesion near a border may commit a resection or ablation plan to the neighbouring segment.
      </p>
      {rows.length === 0 ? (
        <p className="empty" data-testid="no-alerts">No lesion lies within {f.marginMm} mm of another segment at any visit.</p>
      ) : (
        <table className="data-table alert-table" data-testid="alert-table">
          <thead>
            <tr>
              <th scope="col">Date</th><th scope="col">Visit</th><th scope="col">Lesion</th><th scope="col">Track</th><th scope="col">Target</th><th scope="col">Segment</th>
              <th scope="col">Neighbouring segment</th><th scope="col">Distance to border (mm)</th><th scope="col">Longest axial (mm)</th>
              {viable && <th scope="col" title="Longest diameter of the viable (enhancing) tumour, mRECIST">Viable (mm)</th>}
              <th scope="col"><span className="sr-only">Open</span></th>
            </tr>
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={`${r.visit}/${r.lesion}`} data-testid="alert-row" data-visit={r.visit} data-lesion={r.lesion} className={r.visit === latest ? 'latest' : undefined}>
                <td>{r.date}</td>
                <td>{r.visit}{r.visit === latest ? <span className="badge">latest</span> : null}</td>
                <th scope="row">{r.lesion}</th>
                <td>{r.track ?? '—'}</td>
                <td data-testid="alert-target">{r.target ? 'yes' : 'no'}</td>
                <td>{r.segment ?? 'outside'}</td>
                <td>{r.nearestOtherSegment ?? '—'}</td>
                <td className="num alert-cell" data-testid="alert-margin">{oneDecimal(r.marginMm)}</td>
                <td className="num">{oneDecimal(r.longestAxialMm)}</td>
                {viable && <td className="num">{oneDecimal(r.viableAxialMm)}</td>}
                <td>
                  <RouteLink to={{ screen: 'visit', patientId: patient.id, visitId: r.visit, lesionId: r.lesion }} data-testid="alert-open">
                    Show {r.lesion} in the viewer ›
                  </RouteLink>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </section>
  );
}
