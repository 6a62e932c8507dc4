import { IsoDateInput } from '../components/IsoDateInput';
import { useState, type FormEvent } from 'react';
import type { TreatmentRecord } from '../../src/model/records';
import { errorText } from '../error-text';
import { appDb } from '../store/db';
import { addTreatment, deleteTreatment, TREATMENT_KINDS } from '../store/treatment-edits';
import { treatmentWord } from './chart-parts';

/** The patient's treatment events: listed, added and deleted here, drawn on every course chart. */
export function TreatmentEvents(props: { patientId: string; treatments: TreatmentRecord[]; onChange(): void }) {
  const [date, setDate] = useState('');
  const [kind, setKind] = useState<TreatmentRecord['kind']>('therapy-start');
  const [label, setLabel] = useState('');
  const [problem, setProblem] = useState<string | null>(null);

  const run = async (edit: () => Promise<unknown>) => {
    setProblem(null);
    try {
      await edit();
      props.onChange();
      return true;
    } catch (e) {
      setProblem(errorText(e));
      return false;
    }
  };
  const add = async (e: FormEvent) => {
    e.preventDefault();
    if (await run(() => addTreatment(appDb(), props.patientId, { date, kind, label }))) setLabel('');
  };

  return (
    <section className="treatments" aria-labelledby="treatments-title" data-testid="treatments">
      <h4 id="treatments-title">Treatment events</h4>
      <p className="chart-note">Shown on every chart above as a dotted vertical line. Every change is kept in the patient&apos;s edit trail.</p>
      {props.treatments.length === 0 ? (
        <p className="empty">No treatment events entered.</p>
      ) : (
        <table className="data-table compact fit" data-testid="treatment-table">
          <thead><tr><th scope="col">Date</th><th scope="col">Kind</th><th scope="col">Description</th><th scope="col"><span className="sr-only">Actions</span></th></tr></thead>
          <tbody>
            {props.treatments.map((t) => (
              <tr key={t.id} data-testid="treatment-row" data-treatment={t.id}>
                <td>{t.date}</td>
                <td>{treatmentWord(t.kind)}</td>
                <td>{t.label}</td>
                <td className="row-actions">
                  <button type="button" className="quiet-danger small" onClick={() => void run(() => deleteTreatment(appDb(), props.patientId, t.id))} aria-label={`Delete ${t.label} (${t.date})`}>
                    Delete
                  </button>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      <form className="treatment-form" onSubmit={(e) => void add(e)} data-testid="treatment-form">
        <label>Date<IsoDateInput value={date} onChange={setDate} testId="treatment-date" /></label>
        <label>
          Kind
          <select value={kind} onChange={(e) => setKind(e.target.value as TreatmentRecord['kind'])} data-testid="treatment-kind">
            {TREATMENT_KINDS.map((k) => <option key={k} value={k}>{treatmentWord(k)}</option>)}
          </select>
        </label>
        <label className="grow">Description<input type="text" required maxLength={200} value={label} onChange={(e) => setLabel(e.target.value)} placeholder="e.g. Second-line chemotherapy" data-testid="treatment-label" /></label>
        <button type="submit" className="primary" data-testid="treatment-add">Add event</button>
      </form>
      {problem && <p className="notice problem" role="alert">{problem}</p>}
    </section>
  );
}
