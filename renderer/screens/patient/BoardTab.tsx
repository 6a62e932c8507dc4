import { useEffect, useMemo, useState } from 'react';
import { createPortal, flushSync } from 'react-dom';
import type { PatientRemnant } from '../../../src/remnant/for-patient';
import { boardSheetsHtml } from '../../../src/report/board-html';
import { PAGE_SIZES, type PageSize } from '../../../src/report/board-style';
import { caseFormCsv } from '../../../src/report/case-form';
import { utf8 } from '../../../src/report/csv';
import { dateShiftDays, prepareReportExport } from '../../../src/report/deidentify';
import type { ReportInput } from '../../../src/report/input';
import { keyedPseudonym, randomPseudonym, type Pseudonym } from '../../../src/report/pseudonym';
import { segmentMapFileName } from '../../../src/report/segment-map-export';
import { usePatient } from '../../analysis/PatientContext';
import { visitRemnant } from '../../analysis/remnant';
import { errorText } from '../../error-text';
import { desktopBridge, savedWhere, saveBytes } from '../../platform/bridge';
import { appDb } from '../../store/db';
import { getSetting, setSetting } from '../../store/patients';
import { useBoardStylesheet } from '../../report/board-stylesheet';
import { exportSegmentMap } from '../../report/export-segment-map';

type Status = { kind: 'done' | 'problem' | 'busy'; text: string } | null;

/**
 * The board summary as it will print, with its outputs: the page (printed or saved as PDF), the
 * case-form CSV and each visit's segment map as NIfTI. The page is the core's own HTML, the same
 * the command line writes; its values are escaped there, so it is shown as it is.
 */
export function BoardTab() {
  const { patient, analysis } = usePatient();
  const [page, setPage] = useState<PageSize>('A4');
  const [pseudonymise, setPseudonymise] = useState(false);
  const [key, setKey] = useState('');
  const [pseudonym, setPseudonym] = useState<{ p: Pseudonym; shiftDays: number } | null>(null);
  const [reader, setReader] = useState('');
  const [madeAt, setMadeAt] = useState(() => new Date());
  const [status, setStatus] = useState<Status>(null);
  useBoardStylesheet(page);

  // The key is a setting kept on this computer (never in a backup or an export); the reader's name goes on the case form.
  useEffect(() => {
    void getSetting(appDb(), 'pseudonymKey').then(setKey);
    void getSetting(appDb(), 'readerName').then(setReader);
  }, []);
  const saveKey = () => void getSetting(appDb(), 'pseudonymKey').then((old) => (old === key ? undefined : setSetting(appDb(), 'pseudonymKey', key)));

  // A random pseudonym is drawn each time pseudonymising is switched on; a keyed one follows the key.
  // Its date shift is derived from it, as on the command line.
  useEffect(() => {
    let live = true;
    if (!pseudonymise) setPseudonym(null);
    else {
      void (key ? keyedPseudonym(patient.id, key) : Promise.resolve(randomPseudonym()))
        .then(async (p) => ({ p, shiftDays: await dateShiftDays(p.id) }))
        .then((x) => live && setPseudonym(x));
    }
    return () => { live = false; };
  }, [pseudonymise, key, patient.id]);

  const input = useMemo<ReportInput | null>(() => {
    if (!analysis) return null;
    const latest = analysis.visits[analysis.visits.length - 1];
    let remnant: PatientRemnant | null;
    try {
      // The stored record's resection, which may be newer than the analysed manifest.
      remnant = latest ? visitRemnant(analysis, latest, patient, patient.resection) : null;
    } catch {
      remnant = null; // the Remnant tab shows why; the page goes without the line
    }
    return { manifest: analysis.manifest, visits: analysis.visits, followup: analysis.followup, remnant };
  }, [analysis, patient]);

  const pending = pseudonymise && !pseudonym;
  // The same preparation as the command line's report: pseudonymised, dates shifted and paths cut to file names.
  const prepared = useMemo(
    () => (input && !pending
      ? prepareReportExport(input, { pseudonym: pseudonym?.p ?? null, shiftDays: pseudonym?.shiftDays ?? 0, studyFolder: '', madeAt, caseForm: { reader } })
      : null),
    [input, madeAt, pseudonym, pending, reader],
  );
  const sheets = useMemo(() => (prepared ? boardSheetsHtml(prepared.summary) : []), [prepared]);
  if (!analysis || !input || !prepared) return <p className="empty">Preparing the board summary…</p>;
  const label = prepared.summary.patient.label;

  const print = async () => {
    // The page says when it was made: the moment of printing.
    flushSync(() => setMadeAt(new Date()));
    const bridge = desktopBridge();
    if (!bridge) {
      window.print();
      return;
    }
    try {
      setStatus({ kind: 'busy', text: 'Making the PDF…' });
      const r = await bridge.printToPdf({ suggestedName: `${label}-board-summary.pdf`, pageSize: page });
      setStatus(r.saved ? { kind: 'done', text: 'Board summary saved as PDF.' } : null);
    } catch (e) {
      setStatus({ kind: 'problem', text: `The PDF was not made: ${errorText(e)}` });
    }
  };

  const exportCsv = async () => {
    try {
      const csv = caseFormCsv(prepared.caseForm);
      const name = `${label}-case-form.csv`;
      const saved = await saveBytes(name, utf8(csv), 'text/csv');
      const shifted = prepared.note ? ' Pseudonymised: its dates are shifted (column dates_shifted).' : '';
      setStatus(saved ? { kind: 'done', text: `Case form exported (${prepared.caseForm.length} rows).${shifted}${savedWhere(name)}` } : null);
    } catch (e) {
      setStatus({ kind: 'problem', text: `The case form was not exported: ${errorText(e)}` });
    }
  };

  const exportMap = async (visitId: string) => {
    try {
      setStatus({ kind: 'busy', text: `Encoding the segment map of ${visitId}…` });
      const bytes = await exportSegmentMap(patient.id, visitId);
      const name = `${label}-${segmentMapFileName(visitId)}`;
      const saved = await saveBytes(name, bytes, 'application/gzip');
      setStatus(saved ? { kind: 'done', text: `Segment map of ${visitId} exported as NIfTI-1 (.nii.gz).${savedWhere(name)}` } : null);
    } catch (e) {
      setStatus({ kind: 'problem', text: `The segment map of ${visitId} was not exported: ${errorText(e)}` });
    }
  };

  return (
    <section className="board-tab" aria-labelledby="board-title" data-testid="board-tab">
      <h3 id="board-title" className="sr-only">Board summary</h3>
      <div className="board-controls">
        <label>
          Paper
          <select data-testid="board-page" value={page} onChange={(e) => setPage(e.target.value as PageSize)}>
            {PAGE_SIZES.map((p) => <option key={p} value={p}>{p}</option>)}
          </select>
        </label>
        <label>
          <input type="checkbox" data-testid="board-pseudonymise" checked={pseudonymise} onChange={(e) => setPseudonymise(e.target.checked)} />
          Pseudonymise
        </label>
        {pseudonymise && (
          <label>
            Key (optional, for a stable pseudonym; kept on this computer only)
            <input type="password" data-testid="board-key" value={key} autoComplete="off" onChange={(e) => setKey(e.target.value)} onBlur={saveKey} />
          </label>
        )}
        <div className="board-actions">
          <button type="button" className="primary" data-testid="board-print" onClick={() => void print()}>Print / save as PDF</button>
          <button type="button" data-testid="board-csv" onClick={() => void exportCsv()}>Export case form (CSV)</button>
        </div>
      </div>
      <div className="board-maps">
        <span className="board-maps-title">Export segment map (NIfTI):</span>
        {analysis.visits.map((v) => (
          <button key={v.id} type="button" data-testid="board-map" data-visit={v.id} onClick={() => void exportMap(v.id)}>
            {v.id}{prepared.note ? '' : ` (${v.date})`}
          </button>
        ))}
      </div>
      {status && (
        <p className={`notice board-status ${status.kind === 'problem' ? 'problem' : 'done'}`} role={status.kind === 'problem' ? 'alert' : 'status'} data-testid="board-status">
          {status.text}
        </p>
      )}
      <div className="board-preview" data-testid="board-preview">
        {/* The core's HTML, every value escaped there (src/report/html-escape.ts); one paper per sheet. */}
        {sheets.map((sheet, k) => <div key={k} className={`board-paper page-${page}`} dangerouslySetInnerHTML={{ __html: sheet }} />)}
      </div>
      {createPortal(<div className="board-print-root" dangerouslySetInnerHTML={{ __html: sheets.join('\n') }} />, document.body)}
    </section>
  );
}
