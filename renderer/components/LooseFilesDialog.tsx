import { useMemo, useState } from 'react';
import type { OpenedFile } from '../../main/bridge-api';
import { errorText } from '../error-text';
import { guessLooseFiles } from '../store/loose-files';
import type { LooseVisitDetails } from '../store/import';
import { ConfirmDialog } from './ConfirmDialog';

interface Props {
  files: OpenedFile[];
  onImport: (details: LooseVisitDetails) => void;
  onCancel: () => void;
}

const ROLE_WORDS: Record<string, string> = {
  scan: 'Scan', segments: 'Segment map', liver: 'Liver mask', caudate: 'Caudate mask', lesions: 'Lesion mask',
  viable: 'Viable tumour mask', landmarks: 'Landmark set', marks: 'Manual marks', scheme: 'Segment scheme',
};

/** Files without a manifest form one visit; only the user can say whose visit and when. */
export function LooseFilesDialog({ files, onImport, onCancel }: Props) {
  const [patientId, setPatientId] = useState('');
  const [date, setDate] = useState('');
  const [visitId, setVisitId] = useState('');
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
      onConfirm={() => onImport({ patientId, date, ...(visitId.trim() ? { visitId: visitId.trim() } : {}) })}
    >
      {guess.ok ? (
        <dl className="roles">
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
      <p className="hint">These files have no manifest.json. Give the patient and the imaging date; an existing patient gains this visit.</p>
      <div className="form-grid">
        <label>
          Patient id
          <input value={patientId} onChange={(e) => setPatientId(e.target.value)} data-testid="loose-patient" required />
        </label>
        <label>
          Imaging date
          <input type="date" value={date} onChange={(e) => setDate(e.target.value)} data-testid="loose-date" required />
        </label>
        <label>
          Visit id (optional)
          <input value={visitId} onChange={(e) => setVisitId(e.target.value)} placeholder="the date" data-testid="loose-visit" />
        </label>
      </div>
    </ConfirmDialog>
  );
}
