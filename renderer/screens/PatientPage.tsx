import { usePatient } from '../analysis/PatientContext';
import { AnalysisStatus } from '../components/AnalysisStatus';
import { RouteLink } from '../components/RouteLink';
import { go } from '../navigation';
import { PATIENT_TABS } from './patient/tabs';

/** A patient: who, the analysis state, and the tabs that read the course of disease. */
export function PatientPage({ tab }: { tab?: string }) {
  const { patient, state, analysis } = usePatient();
  const current = PATIENT_TABS.find((t) => t.id === tab) ?? PATIENT_TABS[0];
  return (
    <div className="patient-page" data-testid="patient-page">
      <nav className="crumbs">
        <RouteLink to={{ screen: 'patients' }}>All patients</RouteLink>
      </nav>
      <header className="patient-header">
        <h2 data-testid="patient-title">{patient.id}</h2>
        {patient.demo && <span className="badge">demo — invented patient</span>}
        <dl className="facts">
          {patient.birthYear !== undefined && (<><dt>Born</dt><dd>{patient.birthYear}</dd></>)}
          {patient.heightCm !== undefined && (<><dt>Height</dt><dd>{patient.heightCm} cm</dd></>)}
          {patient.weightKg !== undefined && (<><dt>Weight</dt><dd>{patient.weightKg} kg</dd></>)}
          <dt>Criteria</dt><dd>{analysis?.followup.criteria ?? patient.criteria ?? 'RECIST 1.1'}</dd>
          <dt>Margin</dt><dd>{patient.marginMm} mm</dd>
        </dl>
      </header>
      <AnalysisStatus state={state} />
      <div className="tabs" role="tablist">
        {PATIENT_TABS.map((t) => (
          <button
            key={t.id}
            type="button"
            role="tab"
            aria-selected={t.id === current.id}
            data-testid={`tab-${t.id}`}
            onClick={() => go({ screen: 'patient', patientId: patient.id, tab: t.id })}
          >
            {t.label}
          </button>
        ))}
      </div>
      <div role="tabpanel" className="tab-panel">
        {analysis ? <current.Component /> : null}
      </div>
    </div>
  );
}
