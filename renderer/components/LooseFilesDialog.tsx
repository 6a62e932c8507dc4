import { useEffect, useMemo, useState } from 'react';
import type { OpenedFile } from '../../main/bridge-api';
import { errorText } from '../error-text';
import { guessLooseFiles } from '../store/loose-files';
import type { LooseVisitDetails } from '../store/import';
import { dicomFilesOf, proposeDicom, type DicomProposal } from '../store/dicom-import';
import { ConfirmDialog } from './ConfirmDialog';
import { IsoDateInput, ISO_DATE } from './IsoDateInput';

const NEW_PATIENT = '';

interface Props {
  files: OpenedFile[];
  /** Ids of the patients already stored, offered first so a typo cannot make a new patient silently. */
  patients: readonly string[];
  onImport: (details: LooseVisitDetails) => void;
  onCancel: () => void;
}

const ROLE_WORDS: Record<string, string> = {
  scan: 'Scan', segments: 'Segment map', liver: 'Liver mask', caudate: 'Caudate mask', lesions: 'Lesion mask',
  viable: 'Viable tumour mask', landmarks: 'Landmark set', marks: 'Manual marks', scheme: 'Segment scheme',
};

/** Files without a manifest form one visit; only the user can say whose visit and when. */
export function LooseFilesDialog({ files, patients, onImport, onCancel }: Props) {
  const [existing, setExisting] = useState(NEW_PATIENT);
  const [typed, setTyped] = useState('');
  const [create, setCreate] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);
  const [date, setDate] = useState('');
  const [visitId, setVisitId] = useState('');
  const hasDicom = useMemo(() => dicomFilesOf(files).length > 0, [files]);
  const [dicom, setDicom] = useState<{ proposal?: DicomProposal; problem?: string } | null>(null);
  const [series, setSeries] = useState<string | undefined>(undefined);
  useEffect(() => {
    if (!hasDicom) return;
    let live = true;
    proposeDicom(files).then(
      (proposal) => {
        if (!live) return;
        setDicom({ proposal });
        setSeries(proposal.defaultId);
        // The headers propose; the user confirms or changes. A stored patient with the header's id is chosen.
        const id = proposal.patientId;
        if (id !== undefined && patients.includes(id)) setExisting((e) => e || id);
        else if (id !== undefined) setTyped((t) => t || id);
        setDate((d) => d || proposal.studyDate || '');
      },
      (e: unknown) => live && setDicom({ problem: errorText(e) }),
    );
    return () => { live = false; };
  }, [files, hasDicom, patients]);
  const newId = typed.trim();
  // A typed id that names a stored patient is that patient; one that differs only in case or spacing is a likely typo.
  const exact = patients.find((p) => p === newId);
  const close = exact ? undefined : patients.find((p) => p.replace(/[\s_-]/g, '').toLowerCase() === newId.replace(/[\s_-]/g, '').toLowerCase());
  const patientId = existing !== NEW_PATIENT ? existing : newId;
  const confirm = () => {
    if (!patientId) return setProblem('Choose a patient, or type the id of a new one.');
    if (existing === NEW_PATIENT && !exact && !create) {
      return setProblem(`No patient ${patientId} is stored. Tick "Create new patient" to make one, or choose an existing patient.`);
    }
    if (!ISO_DATE.test(date)) return setProblem('Give the imaging date as YYYY-MM-DD.');
    onImport({ patientId, date, ...(visitId.trim() ? { visitId: visitId.trim() } : {}), ...(series ? { dicomSeries: series } : {}) });
  };
  const guess = useMemo(() => {
    try {
      return { ok: true as const, ...guessLooseFiles(files) };
    } catch (e) {
      return { ok: false as const, message: errorText(e) };
    }
  }, [files]);
  return (
    <ConfirmDialog
      title="Import these files as one visit"
      confirmLabel="Import visit"
      testId="loose-dialog"
      onCancel={onCancel}
      onConfirm={confirm}
    >
      {guess.ok ? (
        <dl className="roles">
          {hasDicom && guess.files.scan === undefined && (
            <div>
              <dt>{ROLE_WORDS.scan}</dt>
              <dd>DICOM series chosen below</dd>
            </div>
          )}
          {Object.entries(guess.files).map(([role, file]) => (
            <div key={role}>
              <dt>{ROLE_WORDS[role] ?? role}</dt>
              <dd>{file}</dd>
            </div>
          ))}
        </dl>
      ) : (
        <p className="problem" role="alert">{guess.message}</p>
      )}
      {hasDicom && <DicomSeriesChoice state={dicom} chosen={series} onChoose={setSeries} />}
      <p className="hint">These files have no manifest.json. Choose the patient and give the imaging date; an existing patient gains this visit.</p>
      <div className="form-grid">
        <label>
          Patient
          <select value={existing} onChange={(e) => { setExisting(e.target.value); setProblem(null); }} data-testid="loose-existing">
            <option value={NEW_PATIENT}>New patient…</option>
            {patients.map((p) => <option key={p} value={p}>{p}</option>)}
          </select>
        </label>
        {existing === NEW_PATIENT && (
          <label>
            New patient id
            <input value={typed} onChange={(e) => { setTyped(e.target.value); setCreate(false); setProblem(null); }} data-testid="loose-patient" required />
          </label>
        )}
        <label>
          Imaging date
          <IsoDateInput value={date} onChange={setDate} testId="loose-date" />
        </label>
        <label>
          Visit id (optional)
          <input value={visitId} onChange={(e) => setVisitId(e.target.value)} placeholder="the date" data-testid="loose-visit" />
        </label>
      </div>
      {existing === NEW_PATIENT && newId && (exact ? (
        <p className="hint" data-testid="loose-matches">{exact} is already stored: the visit is added to that patient.</p>
      ) : (
        <>
          {close && <p className="notice problem" data-testid="loose-close">A stored patient is {close}: did you mean that one? Choose it above.</p>}
          <label className="check">
            <input type="checkbox" checked={create} onChange={(e) => { setCreate(e.target.checked); setProblem(null); }} data-testid="loose-create" />
            Create new patient {newId}
          </label>
        </>
      ))}
      {problem && <p className="notice problem" role="alert" data-testid="loose-problem">{problem}</p>}
    </ConfirmDialog>
  );
}

/** The DICOM series found, the one to be taken chosen by radio button; the others say why they cannot be. */
function DicomSeriesChoice({ state, chosen, onChoose }: { state: { proposal?: DicomProposal; problem?: string } | null; chosen?: string; onChoose: (id: string) => void }) {
  if (!state) return <p className="hint" data-testid="dicom-reading">Reading the DICOM headers…</p>;
  if (state.problem) return <p className="problem" role="alert" data-testid="dicom-problem">{state.problem}</p>;
  const p = state.proposal as DicomProposal;
  const selectable = (why: string, taken: boolean) => taken || why === 'another series was taken';
  return (
    <fieldset className="dicom-series" data-testid="dicom-series">
      <legend>DICOM series: the scan</legend>
      {p.series.map((s) => (
        <label key={s.id} className={selectable(s.why, s.taken) ? '' : 'muted'}>
          <input type="radio" name="dicom-series" value={s.id} checked={chosen === s.id} disabled={!selectable(s.why, s.taken)} onChange={() => onChoose(s.id)} />
          {' '}{[s.number, s.modality, s.description].filter((x) => x !== undefined).join(' · ') || s.uid} — {s.slices} slice{s.slices === 1 ? '' : 's'}, {s.dims[0]}×{s.dims[1]}
          {!selectable(s.why, s.taken) && <span className="hint"> (not a scan: {s.why})</span>}
          {s.taken && <span className="hint"> ({s.why})</span>}
        </label>
      ))}
      {p.defaultId === undefined && <p className="problem" role="alert">None of these series can be a visit's scan.</p>}
      {(p.patientId || p.patientName) && (
        <p className="hint" data-testid="dicom-patient">
          In the DICOM headers: patient ID {p.patientId ?? 'none'}{p.patientName ? `, ${p.patientName}` : ''}{p.patientBirthDate ? `, born ${p.patientBirthDate}` : ''}
          {p.studyDate ? `; study date ${p.studyDate}` : ''}. Confirm the patient and date below, or pick a stored patient.
        </p>
      )}
      {p.warnings.map((w) => <p key={w} className="hint">{w}</p>)}
    </fieldset>
  );
}
