import { useCallback, useMemo, useState } from 'react';
import type { Criteria } from '../../../src/followup/response';
import type { TreatmentRecord } from '../../../src/model/records';
import { usePatient } from '../../analysis/PatientContext';
import { BurdenChart } from '../../charts/BurdenChart';
import type { CourseTime } from '../../charts/chart-parts';
import {
  availableCriteria, burdenSeries, lesionSeries, responseData, timeDomain, treatmentMarkers, visitTicks,
} from '../../charts/chart-data';
import { LesionChart } from '../../charts/LesionChart';
import { ResponseChart } from '../../charts/ResponseChart';
import { TreatmentEvents } from '../../charts/TreatmentEvents';
import { appDb } from '../../store/db';
import { patientTreatments } from '../../store/treatment-edits';
import { useStored } from '../../store/use-stored';

const NO_TREATMENTS: TreatmentRecord[] = [];

/** The course of disease over real dates: response, each lesion, each segment's burden, treatments. */
export function CourseTab() {
  const { patient, analysis, reload } = usePatient();
  const [revision, setRevision] = useState(0);
  const [chosen, setChosen] = useState<Criteria | null>(null);
  const treatments = useStored(() => patientTreatments(appDb(), patient.id), [patient.id, revision]) ?? NO_TREATMENTS;
  const changed = useCallback(() => { setRevision((r) => r + 1); reload(); }, [reload]);

  const f = analysis?.followup;
  const view = useMemo(() => {
    if (!f) return null;
    const markers = treatmentMarkers(treatments);
    const ticks = visitTicks(f);
    const time: CourseTime = { domain: timeDomain([...ticks, ...markers.map((m) => m.t)]), ticks, treatments: markers };
    return {
      time,
      lesions: lesionSeries(f),
      burden: burdenSeries(f),
      criteria: availableCriteria(f),
    };
  }, [f, treatments]);
  if (!f || !view) return null;
  const criteria = chosen && view.criteria.includes(chosen) ? chosen : f.criteria;
  const response = responseData(f, criteria);

  return (
    <section className="course" aria-labelledby="course-title">
      <div className="section-bar">
        <h3 id="course-title">Course of disease</h3>
        {view.criteria.length > 1 && (
          <div className="segmented" role="radiogroup" aria-label="Response criteria">
            {view.criteria.map((c) => (
              <label key={c} className={c === criteria ? 'on' : undefined}>
                <input type="radio" name="criteria" value={c} checked={c === criteria} onChange={() => setChosen(c)} />
                {c}{c === f.criteria ? ' (primary)' : ''}
              </label>
            ))}
          </div>
        )}
      </div>
      <ResponseChart data={response} time={view.time} />
      <LesionChart series={view.lesions} time={view.time} />
      <div className="chart-pair">
        <BurdenChart metric="sumMm" series={view.burden} time={view.time} />
        <BurdenChart metric="volumeMl" series={view.burden} time={view.time} />
      </div>
      <TreatmentEvents patientId={patient.id} treatments={treatments} onChange={changed} />
    </section>
  );
}
