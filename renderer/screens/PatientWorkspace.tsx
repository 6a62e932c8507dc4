import { useCallback, useMemo, useState } from 'react';
import { PatientContext } from '../analysis/PatientContext';
import { usePatientAnalysis } from '../analysis/usePatientAnalysis';
import { RouteLink } from '../components/RouteLink';
import type { Route } from '../navigation';
import { appDb } from '../store/db';
import { getPatient } from '../store/patients';
import { useStored } from '../store/use-stored';
import { PatientPage } from './PatientPage';
import { VisitView } from './VisitView';

/**
 * One patient open: the stored record and its analysis (run once in a worker, kept while the user
 * moves between the patient page and its visits) shared with the screens below.
 */
export function PatientWorkspace({ route }: { route: Extract<Route, { patientId: string }> }) {
  const patientId = route.patientId;
  const [revision, setRevision] = useState(0);
  const [reloads, setReloads] = useState(0);
  const { state, last } = usePatientAnalysis(patientId, revision);
  // undefined while opening, null when no such patient is stored.
  const patient = useStored(async () => (await getPatient(appDb(), patientId)) ?? null, [patientId, reloads, revision]);

  const reanalyse = useCallback(() => setRevision((r) => r + 1), []);
  const reload = useCallback(() => setReloads((r) => r + 1), []);
  const value = useMemo(
    () => (patient ? { patient, state, analysis: last, reanalyse, reload } : null),
    [patient, state, last, reanalyse, reload],
  );

  if (patient === undefined) return <p className="empty">Opening {patientId}…</p>;
  if (patient === null || !value) {
    return (
      <p className="notice error" role="alert">
        Patient {patientId} is not stored on this computer. <RouteLink to={{ screen: 'patients' }}>Back to the patient list</RouteLink>
      </p>
    );
  }
  return (
    <PatientContext.Provider value={value}>
      {route.screen === 'patient' ? <PatientPage tab={route.tab} /> : <VisitView visitId={route.visitId} lesionId={route.lesionId} />}
    </PatientContext.Provider>
  );
}
