import { useCallback, useEffect, useMemo, useRef, useState, type ChangeEvent, type ReactNode } from 'react';
import type { OpenedFile } from '../../main/bridge-api';
import { isFalciformError } from '../../src/errors';
import { errorText } from '../error-text';
import { ConfirmDialog } from '../components/ConfirmDialog';
import { DropZone } from '../components/DropZone';
import { LooseFilesDialog } from '../components/LooseFilesDialog';
import { RouteLink } from '../components/RouteLink';
import { desktopBridge, filesFromInput, saveBytes } from '../platform/bridge';
import { BACKUP_EXTENSION, backupFileName, createBackup, readBackup, restoreBackup, restoreConflicts, type BackupScope } from '../store/backup';
import { appDb, askPersistentStorage } from '../store/db';
import { commitImport, findManifests, type LooseVisitDetails } from '../store/import';
import { readImportInWorker } from '../store/import-client';
import { deletePatient, listPatients, type PatientSummary } from '../store/patients';
import { offerDemoPatients, removeDemoPatients } from '../store/demo';

type Notice =
  | { kind: 'done'; text: string; warnings: string[] }
  | { kind: 'error'; action: string; file: string | null; problem: string };

/** A destructive store action waiting for the user to confirm it; `work` runs as `action`. */
interface Question {
  title: string;
  confirmLabel: string;
  testId: string;
  body: ReactNode;
  action: string;
  work: () => Promise<string>;
}

const IMAGE_FILTERS = [
  { name: 'NIfTI images and JSON inputs', extensions: ['nii.gz', 'nii', 'json'] },
];

/** The first screen: every patient stored on this computer, and the ways in and out of the store. */
export function PatientList() {
  const db = appDb();
  const [rows, setRows] = useState<PatientSummary[] | null>(null);
  const [query, setQuery] = useState('');
  const [busy, setBusy] = useState<string | null>(null);
  const [notice, setNotice] = useState<Notice | null>(null);
  const [question, setQuestion] = useState<Question | null>(null);
  const [loose, setLoose] = useState<OpenedFile[] | null>(null);
  const [persistent, setPersistent] = useState<boolean | null>(null);
  const folderInput = useRef<HTMLInputElement>(null);
  const filesInput = useRef<HTMLInputElement>(null);
  const restoreInput = useRef<HTMLInputElement>(null);

  const refresh = useCallback(async () => setRows(await listPatients(db)), [db]);
  useEffect(() => {
    void offerDemoPatients(db)
      .then((ids) => { if (ids.length) setNotice({ kind: 'done', text: `Demo patients added: ${ids.join(', ')} (invented, for trying the app; remove them any time).`, warnings: [] }); })
      .catch((e: unknown) => setNotice({ kind: 'error', action: 'Demo import', file: null, problem: errorText(e) }))
      .finally(() => void refresh());
    void askPersistentStorage().then(setPersistent);
    // React has no prop for folder picking; the attribute is standard in Chromium.
    folderInput.current?.setAttribute('webkitdirectory', '');
  }, [refresh]);

  /** Runs one store action with a busy line; any failure becomes a notice naming the file. */
  const run = async (action: string, work: () => Promise<string | { text: string; warnings: string[] } | null>) => {
    setNotice(null);
    setBusy(`${action}…`);
    try {
      const done = await work();
      if (done !== null) setNotice({ kind: 'done', ...(typeof done === 'string' ? { text: done, warnings: [] } : done) });
    } catch (e) {
      if (isFalciformError(e)) setNotice({ kind: 'error', action, file: e.file, problem: e.problem });
      else setNotice({ kind: 'error', action, file: null, problem: errorText(e) });
    } finally {
      setBusy(null);
      await refresh();
    }
  };

  const importFiles = (files: OpenedFile[], details?: LooseVisitDetails) => {
    if (files.length === 0) return;
    if (!details && findManifests(files).length === 0) {
      setLoose(files);
      return;
    }
    void run('Import', async () => {
      const plan = await readImportInWorker(files, {
        loose: details,
        onProgress: (done, total, file) => setBusy(done < total ? `Checking file ${done + 1} of ${total}: ${file}` : 'Saving…'),
      });
      const result = await commitImport(db, plan);
      const text = result.patients
        .map((p) => `${p.id}: ${p.visits.length} visit${p.visits.length === 1 ? '' : 's'} ${p.newPatient ? 'imported' : 'added'}`)
        .join('; ');
      return { text: `Imported ${text}.`, warnings: result.warnings };
    });
  };

  const fromInput = async (e: ChangeEvent<HTMLInputElement>) => {
    const input = e.currentTarget;
    const files = input.files ? await filesFromInput(input.files) : [];
    input.value = ''; // choosing the same folder again must fire again
    return files;
  };

  const chooseFolder = async () => {
    const bridge = desktopBridge();
    if (!bridge) return folderInput.current?.click();
    importFiles(await bridge.openFiles({ folder: true, title: 'Choose a patient folder (or a folder of patient folders)' }));
  };
  const chooseFiles = async () => {
    const bridge = desktopBridge();
    if (!bridge) return filesInput.current?.click();
    importFiles(await bridge.openFiles({ folder: false, multiple: true, title: 'Choose one visit\'s files', filters: IMAGE_FILTERS }));
  };

  const backUp = (scope: BackupScope) =>
    run('Backup', async () => {
      const bytes = await createBackup(db, scope);
      const name = backupFileName(scope);
      const saved = await saveBytes(name, bytes, 'application/octet-stream');
      return saved ? `Backup written: ${name} (${formatBytes(bytes.length)}).` : null;
    });

  const restoreFrom = (file: OpenedFile) =>
    run('Restore', async () => {
      const contents = await readBackup(file.bytes, file.relativePath);
      const conflicts = await restoreConflicts(db, contents);
      if (conflicts.length > 0) {
        setQuestion({
          title: 'Replace stored patients?',
          confirmLabel: 'Replace with the backup',
          testId: 'restore-dialog',
          body: (
            <p>
              {file.relativePath} holds {conflicts.join(', ')}, already stored here. Replacing removes the stored copy,
              edits made since the backup included, and puts the backup&apos;s copy in its place.
            </p>
          ),
          action: 'Restore',
          work: async () => restoredText(await restoreBackup(db, contents, { file: file.relativePath, replace: true })),
        });
        return null;
      }
      return restoredText(await restoreBackup(db, contents, { file: file.relativePath }));
    });
  const chooseBackup = async () => {
    const bridge = desktopBridge();
    if (!bridge) return restoreInput.current?.click();
    const [file] = await bridge.openFiles({ folder: false, multiple: false, title: 'Choose a Falciform backup', filters: [{ name: 'Falciform backup', extensions: [BACKUP_EXTENSION] }] });
    if (file) restoreFrom(file);
  };

  const confirmRemoveDemo = () => setQuestion({
    title: 'Remove the demo patients?',
    confirmLabel: 'Remove demo patients',
    testId: 'remove-demo-dialog',
    body: <p>The invented demo patients and everything stored for them are deleted from this computer. They are not offered again.</p>,
    action: 'Remove demo patients',
    work: async () => `Removed ${(await removeDemoPatients(db)).join(', ')}.`,
  });
  const confirmDelete = (r: PatientSummary) => setQuestion({
    title: `Delete patient ${r.patient.id}?`,
    confirmLabel: 'Delete patient',
    testId: 'delete-dialog',
    body: (
      <>
        <p>
          This removes {r.visitCount} visit{r.visitCount === 1 ? '' : 's'}, their scans, segment maps, lesions, lesion
          tracks and the patient&apos;s edit history ({formatBytes(r.storedBytes)}) from this computer. It cannot be undone.
        </p>
        <p>Back the patient up first if the data may be needed again.</p>
      </>
    ),
    action: 'Delete',
    work: async () => {
      await deletePatient(db, r.patient.id);
      return `Patient ${r.patient.id} and all its data were deleted from this computer.`;
    },
  });

  const shown = useMemo(() => {
    const q = query.trim().toLowerCase();
    if (!rows || !q) return rows;
    return rows.filter((r) => r.patient.id.toLowerCase().includes(q) || (r.patient.label ?? '').toLowerCase().includes(q));
  }, [rows, query]);

  return (
    <section className="patients" aria-labelledby="patients-title">
      <div className="patients-bar">
        <h2 id="patients-title">Patients</h2>
        <input
          type="search"
          className="search"
          placeholder="Find by patient id or label"
          aria-label="Find a patient"
          value={query}
          onChange={(e) => setQuery(e.target.value)}
          data-testid="patient-search"
        />
        <div className="bar-actions">
          <button type="button" className="primary" onClick={() => void chooseFolder()} disabled={busy !== null} data-testid="import-folder">
            Import folder…
          </button>
          <button type="button" onClick={() => void chooseFiles()} disabled={busy !== null} data-testid="import-files">
            Import files…
          </button>
          <button type="button" onClick={() => backUp('all')} disabled={busy !== null || !rows?.length} data-testid="backup-all">
            Back up all
          </button>
          <button type="button" onClick={() => void chooseBackup()} disabled={busy !== null} data-testid="restore">
            Restore…
          </button>
          {rows?.some((r) => r.patient.demo) && (
            <button type="button" className="quiet-danger" onClick={confirmRemoveDemo} disabled={busy !== null} data-testid="remove-demo">
              Remove demo patients…
            </button>
          )}
        </div>
        <input ref={folderInput} type="file" multiple hidden onChange={(e) => void fromInput(e).then((f) => importFiles(f))} data-testid="folder-input" />
        <input ref={filesInput} type="file" multiple hidden accept=".nii,.gz,.json" onChange={(e) => void fromInput(e).then((f) => importFiles(f))} data-testid="files-input" />
        <input ref={restoreInput} type="file" hidden accept={`.${BACKUP_EXTENSION}`} onChange={(e) => void fromInput(e).then(([f]) => f && restoreFrom(f))} data-testid="restore-input" />
      </div>

      {busy && <p className="busy" role="status" data-testid="busy">{busy}</p>}
      {notice?.kind === 'done' && (
        <div className="notice done" role="status" data-testid="import-done">
          <p>{notice.text}</p>
          {notice.warnings.length > 0 && (
            <ul className="warnings">{notice.warnings.map((w) => <li key={w}>{w}</li>)}</ul>
          )}
        </div>
      )}
      {notice?.kind === 'error' && (
        <div className="notice problem" role="alert" data-testid="import-error">
          <p className="notice-title">{notice.action} stopped; nothing was changed.</p>
          {notice.file && <p className="notice-file" data-testid="error-file">{notice.file}</p>}
          <p className="notice-problem" data-testid="error-problem">{notice.problem}</p>
        </div>
      )}

      <DropZone onFiles={(f) => importFiles(f)} disabled={busy !== null}>
        {rows === null ? (
          <p className="empty">Opening the store…</p>
        ) : rows.length === 0 ? (
          <p className="empty" data-testid="no-patients">
            No patients stored on this computer yet. Import a patient folder with its manifest, or drop it here.
          </p>
        ) : (
          <table className="patient-table" data-testid="patient-table">
            <thead>
              <tr>
                <th scope="col">Patient</th>
                <th scope="col">Visits</th>
                <th scope="col">First – latest visit</th>
                <th scope="col">Born</th>
                <th scope="col" className="num">Margin</th>
                <th scope="col" className="num">Stored</th>
                <th scope="col"><span className="sr-only">Actions</span></th>
              </tr>
            </thead>
            <tbody>
              {shown!.map((r) => (
                <tr key={r.patient.id} data-testid="patient-row" data-patient={r.patient.id}>
                  <th scope="row">
                    <RouteLink className="patient-id" to={{ screen: 'patient', patientId: r.patient.id }} data-testid="open-patient">
                      {r.patient.id}
                    </RouteLink>
                    {r.patient.label && <span className="patient-label">{r.patient.label}</span>}
                    {r.patient.demo && <span className="badge" data-testid="demo-badge">demo — invented</span>}
                  </th>
                  <td>{r.visitCount}</td>
                  <td>{r.firstVisit ? (r.firstVisit === r.lastVisit ? r.firstVisit : `${r.firstVisit} – ${r.lastVisit}`) : '—'}</td>
                  <td>{r.patient.birthYear ?? '—'}</td>
                  <td className="num">{r.patient.marginMm} mm</td>
                  <td className="num">{formatBytes(r.storedBytes)}</td>
                  <td className="row-actions">
                    <button type="button" onClick={() => backUp({ patientIds: [r.patient.id] })} disabled={busy !== null} data-testid="backup-one">
                      Back up
                    </button>
                    <button type="button" className="quiet-danger" onClick={() => confirmDelete(r)} disabled={busy !== null} data-testid="delete-patient">
                      Delete…
                    </button>
                  </td>
                </tr>
              ))}
              {shown!.length === 0 && (
                <tr><td colSpan={7} className="empty">No patient matches “{query}”.</td></tr>
              )}
            </tbody>
          </table>
        )}
        <p className="drop-hint">Drop a patient folder, or one visit&apos;s files, anywhere in this box.</p>
      </DropZone>

      <p className="storage-line" data-testid="storage-line">
        Everything is kept on this computer only, in this app&apos;s own storage.
        {persistent === false && ' The browser may clear it when the disk runs low: keep backups.'}
      </p>

      {question && (
        <ConfirmDialog
          key={question.testId}
          title={question.title}
          confirmLabel={question.confirmLabel}
          danger
          testId={question.testId}
          onCancel={() => setQuestion(null)}
          onConfirm={() => {
            setQuestion(null);
            void run(question.action, question.work);
          }}
        >
          {question.body}
        </ConfirmDialog>
      )}

      {loose && (
        <LooseFilesDialog
          files={loose}
          patients={(rows ?? []).map((r) => r.patient.id)}
          onCancel={() => setLoose(null)}
          onImport={(details) => {
            const files = loose;
            setLoose(null);
            importFiles(files, details);
          }}
        />
      )}
    </section>
  );
}

function restoredText(r: { patients: string[]; replaced: string[] }): string {
  const replaced = r.replaced.length > 0 ? ` (${r.replaced.join(', ')} replaced)` : '';
  return `Restored ${r.patients.length} patient${r.patients.length === 1 ? '' : 's'}${replaced}.`;
}

function formatBytes(n: number): string {
  if (n < 1024) return `${n} B`;
  if (n < 1024 ** 2) return `${(n / 1024).toFixed(0)} KB`;
  if (n < 1024 ** 3) return `${(n / 1024 ** 2).toFixed(1)} MB`;
  return `${(n / 1024 ** 3).toFixed(2)} GB`;
}
