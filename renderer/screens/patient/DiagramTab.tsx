import { useState } from 'react';
import { showsViable } from '../../../src/followup/followup';
import { usePatient } from '../../analysis/PatientContext';
import { oneDecimal } from '../../format';
import { SegmentDiagram } from '../../diagram/SegmentDiagram';
import { sharesText } from '../../../src/report/diagram-drawing';
import { placeLesions } from '../../../src/report/diagram-placement';
import { PLANE_APPROXIMATION } from '../../../src/segments/build';

/** The segment diagram for one visit at a time, with that visit's lesions listed beside it. */
export function DiagramTab() {
  const { analysis } = usePatient();
  const [picked, setPicked] = useState<string | null>(null);
  if (!analysis) return null;
  const f = analysis.followup;
  const visits = analysis.visits;
  const visit = visits.find((v) => v.id === picked) ?? visits[visits.length - 1];
  if (!visit) return null;
  const lesions = placeLesions(f, visits.map((v) => ({ id: v.id, lesions: v.analysis.lesions })), visit.id);
  const response = f.visits.find((v) => v.id === visit.id);
  const segments = visit.analysis.segments.map((s) => s.segment);
  const viable = showsViable(f) ? (response?.viableAxialMm ?? {}) : null;
  const builtFromLandmarks = analysis.manifest.visits.find((v) => v.id === visit.id)?.segments === undefined;
  return (
    <section aria-labelledby="diagram-title">
      <div className="section-bar">
        <h3 id="diagram-title">Segment diagram</h3>
        <div className="segmented" role="radiogroup" aria-label="Visit" data-testid="diagram-visits">
          {visits.map((v) => (
            <label key={v.id} className={v.id === visit.id ? 'on' : undefined}>
              <input type="radio" name="diagram-visit" value={v.id} checked={v.id === visit.id} onChange={() => setPicked(v.id)} data-testid={`diagram-visit-${v.id}`} />
              {v.date} <span className="muted">({v.id})</span>
            </label>
          ))}
        </div>
      </div>
      <div className="diagram-layout">
        <div className="diagram-figure">
          <SegmentDiagram
            segments={segments}
            lesions={lesions}
            caption={`Segment diagram, visit ${visit.id} (${visit.date}): ${lesions.length} lesion(s)`}
          />
          <p className="chart-note">
            Schematic front view, the patient&apos;s right on the left, as on the board summary; the outline and the positions are
            schematic, the dot sizes are to scale. Each lesion sits in the segment holding its centroid, at the same place at every
            visit; a lesion with parts in two segments sits on their border, with its share in each. {segments.includes('I') ? '' : 'Segment I is not in this visit\'s segment map. '}
            Segments drawn unfilled are absent from the map.
          </p>
          {builtFromLandmarks && <p className="chart-note" data-testid="plane-approximation">{PLANE_APPROXIMATION}</p>}
        </div>
        <div className="diagram-side">
          <h4>Visit {visit.id}, {visit.date}{response?.overall ? <> · <span className={`category category-${response.overall.replace(/[^A-Za-z]/g, '')}`}>{response.overall}</span></> : visit === visits[0] ? ' · baseline' : ''}</h4>
          {lesions.length === 0 ? (
            <p className="empty">No lesion at this visit.</p>
          ) : (
            <table className="data-table compact fit" data-testid="diagram-table">
              <thead><tr><th scope="col">Track</th><th scope="col">Target</th><th scope="col">Lesion</th><th scope="col">Segment</th><th scope="col">Longest axial (mm)</th>{viable && <th scope="col" title="Longest diameter of the viable (enhancing) tumour, mRECIST">Viable (mm)</th>}<th scope="col">Margin (mm)</th></tr></thead>
              <tbody>
                {lesions.map((l) => (
                  <tr key={l.lesion} data-testid="diagram-row" data-lesion={l.lesion}>
                    <th scope="row">{l.track ?? '—'}{l.isNew ? ' (new)' : ''}</th>
                    <td data-testid="diagram-target">{l.target ? 'yes' : 'no'}</td>
                    <td>{l.lesion}</td>
                    <td data-testid="diagram-segment">{l.segment ?? 'outside'}{l.crossing ? <span className="muted"> (crosses: {sharesText(l)})</span> : null}</td>
                    <td className="num">{oneDecimal(l.longestAxialMm)}</td>
                    {viable && <td className="num" data-testid="diagram-viable">{oneDecimal(viable[l.lesion])}</td>}
                    <td className={`num${l.alert ? ' alert-cell' : ''}`}>{l.marginMm === null ? '—' : `${oneDecimal(l.marginMm)}${l.nearestOtherSegment ? ` to ${l.nearestOtherSegment}` : ''}`}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </div>
      </div>
    </section>
  );
}
