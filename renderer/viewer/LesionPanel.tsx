import { useEffect, useState } from 'react';
import { distance } from '../../src/geometry/vec3';
import type { Mark } from '../../src/lesions/marks';
import type { LesionResult } from '../../src/visit/analyze';
import { oneDecimal } from '../format';
import type { DraftCaliper } from './SliceViewer';


interface Props {
  lesions: LesionResult[] | null;
  marks: Mark[];
  selected: string | null;
  onSelect(id: string): void;
  draft: DraftCaliper | null;
  draftId: string;
  /** Viable (enhancing) diameter per lesion id when the visit is read under mRECIST or gives viable measures; null hides the column. */
  viable: Record<string, number | null> | null;
  onSaveDraft(shortAxisMm: number, viableAxialMm?: number): void;
  onCancelDraft(): void;
  onShortAxis(id: string, shortAxisMm: number): void;
  /** Sets (a length) or clears (null) a mark's viable diameter. */
  onViable(id: string, viableAxialMm: number | null): void;
  onDelete(id: string): void;
  busy: boolean;
}

/** The visit's lesions as analysed, and the editor for a new or chosen manual mark. */
export function LesionPanel({ lesions, marks, selected, onSelect, draft, draftId, viable, onSaveDraft, onCancelDraft, onShortAxis, onViable, onDelete, busy }: Props) {
  const chosenMark = marks.find((m) => m.id === selected) ?? null;
  return (
    <section className="side-section" aria-labelledby="lesions-title">
      <h3 id="lesions-title">Lesions</h3>
      {lesions && lesions.length === 0 && <p className="side-note">No lesions at this visit.</p>}
      {lesions && lesions.length > 0 && (
        <table className="data-table compact" data-testid="lesion-table">
          <caption>Diameters and margin in mm; margin is the gap from the lesion&apos;s edge to the border surface of the nearest other segment (0 when touching){lesions.some((l) => l.marginAlert) ? ', highlighted when at or within the set margin' : ''}.</caption>
          <thead>
            <tr>
              <th scope="col">Lesion</th><th scope="col">Segment</th><th scope="col" className="num" title="Longest axial diameter, mm">Longest</th>
              <th scope="col" className="num" title="Short axis, mm">Short</th>
              {viable && <th scope="col" className="num" title="Longest diameter of the viable (enhancing) tumour, not crossing necrosis (mRECIST), mm">Viable</th>}
              <th scope="col" className="num" title="Distance to the nearest other segment, mm">Margin</th>
            </tr>
          </thead>
          <tbody>
            {lesions.map((l) => (
              <tr
                key={l.id}
                data-testid="lesion-row"
                data-lesion={l.id}
                className={`clickable${l.id === selected ? ' selected' : ''}`}
                onClick={() => onSelect(l.id)}
                title={l.segmentWarning ?? undefined}
              >
                <th scope="row">
                  <button type="button" className="link-button" onClick={(e) => { e.stopPropagation(); onSelect(l.id); }}>{l.id}</button>
                  <span className="lesion-source">{l.source === 'mark' ? 'mark' : 'mask'}</span>
                </th>
                <td data-testid="lesion-segment">{l.segment ?? 'outside'}{l.segmentWarning ? ' *' : ''}</td>
                <td className="num">{oneDecimal(l.longestAxialMm)}</td>
                <td className="num">{oneDecimal(l.shortAxisMm)}</td>
                {viable && <td className="num" data-testid="lesion-viable">{oneDecimal(viable[l.id])}</td>}
                <td className={`num${l.marginAlert ? ' alert-cell' : ''}`} data-testid="lesion-margin">
                  {oneDecimal(l.marginMm)}{l.marginAlert ? ` → ${l.nearestOtherSegment}` : ''}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      {draft && <DraftEditor draft={draft} id={draftId} onSave={onSaveDraft} onCancel={onCancelDraft} busy={busy} />}
      {!draft && chosenMark && (
        <MarkEditor key={`${chosenMark.id} ${chosenMark.shortAxisMm} ${chosenMark.viableAxialMm}`} mark={chosenMark} onShortAxis={onShortAxis} onViable={onViable} onDelete={onDelete} busy={busy} />
      )}
    </section>
  );
}

/**
 * A typed viable diameter: empty is none; otherwise a length from 0 to the longest diameter, the rule
 * of the marks file (src/lesions/marks.ts), which the store applies again.
 */
function viableTyped(typed: string, longestMm: number): { value: number | null; valid: boolean } {
  if (typed.trim() === '') return { value: null, valid: true };
  const value = Number(typed);
  return { value, valid: Number.isFinite(value) && value >= 0 && value <= longestMm + 0.05 };
}

function ViableField({ typed, onTyped, longestMm, testId }: { typed: string; onTyped(s: string): void; longestMm: number; testId: string }) {
  const { valid } = viableTyped(typed, longestMm);
  return (
    <>
      <label className="inline" title="Longest diameter of the enhancing (viable) tumour, not crossing necrosis, for mRECIST; leave empty when not assessed">
        Viable (enhancing)
        <input type="number" min={0} step={0.1} max={longestMm.toFixed(1)} value={typed} onChange={(e) => onTyped(e.target.value)} data-testid={testId} /> mm
      </label>
      {!valid && <p className="field-problem">The viable diameter must be between 0 and {longestMm.toFixed(1)} mm (the longest diameter), or empty.</p>}
    </>
  );
}

function DraftEditor({ draft, id, onSave, onCancel, busy }: { draft: DraftCaliper; id: string; onSave(s: number, viable?: number): void; onCancel(): void; busy: boolean }) {
  const longest = distance(draft.a, draft.b);
  const [typed, setTyped] = useState('');
  const [viableText, setViableText] = useState('');
  const viable = viableTyped(viableText, longest);
  useEffect(() => setTyped(draft.shortMm === null ? '' : Math.min(draft.shortMm, longest).toFixed(1)), [draft.shortMm, longest]);
  const value = Number(typed);
  const valid = typed.trim() !== '' && Number.isFinite(value) && value >= 0 && value <= longest + 0.05;
  return (
    <div className="mark-editor" data-testid="draft-editor">
      <h4>New lesion {id}</h4>
      <p>Longest axial diameter <strong data-testid="draft-longest">{longest.toFixed(1)} mm</strong></p>
      <label className="inline">
        Short axis
        <input type="number" min={0} step={0.1} max={longest.toFixed(1)} value={typed} onChange={(e) => setTyped(e.target.value)} data-testid="draft-short" /> mm
      </label>
      <p className="side-note">{draft.shortMm === null ? 'Drag across the lesion at right angles to measure the short axis, or type it.' : 'Drag again to remeasure.'}</p>
      {typed.trim() !== '' && !valid && <p className="field-problem">The short axis must be between 0 and {longest.toFixed(1)} mm.</p>}
      <ViableField typed={viableText} onTyped={setViableText} longestMm={longest} testId="draft-viable" />
      <div className="editor-actions">
        <button type="button" onClick={onCancel}>Discard</button>
        <button type="button" className="primary" disabled={!valid || !viable.valid || busy} onClick={() => onSave(value, viable.value ?? undefined)} data-testid="save-mark">Save lesion</button>
      </div>
    </div>
  );
}

function MarkEditor({ mark, onShortAxis, onViable, onDelete, busy }: {
  mark: Mark; onShortAxis(id: string, s: number): void; onViable(id: string, v: number | null): void; onDelete(id: string): void; busy: boolean;
}) {
  const [typed, setTyped] = useState(mark.shortAxisMm.toFixed(1));
  const [viableText, setViableText] = useState(mark.viableAxialMm === undefined ? '' : mark.viableAxialMm.toFixed(1));
  const viable = viableTyped(viableText, mark.longestAxialMm);
  const viableChanged = viable.value === null ? mark.viableAxialMm !== undefined : mark.viableAxialMm === undefined || Math.abs(viable.value - mark.viableAxialMm) >= 0.05;
  const value = Number(typed);
  const changed = Number.isFinite(value) && Math.abs(value - mark.shortAxisMm) >= 0.05;
  const valid = typed.trim() !== '' && Number.isFinite(value) && value >= 0 && value <= mark.longestAxialMm + 0.05;
  return (
    <div className="mark-editor" data-testid="mark-editor">
      <h4>Manual mark {mark.id}</h4>
      <p>Longest axial diameter <strong>{mark.longestAxialMm.toFixed(1)} mm</strong>{mark.endpointsMm ? ' — drag the caliper ends on the axial image to adjust.' : ''}</p>
      <label className="inline">
        Short axis
        <input type="number" min={0} step={0.1} value={typed} onChange={(e) => setTyped(e.target.value)} data-testid="mark-short" /> mm
      </label>
      {!valid && <p className="field-problem">The short axis must be between 0 and {mark.longestAxialMm.toFixed(1)} mm.</p>}
      <div className="editor-actions">
        <button type="button" className="primary" disabled={!valid || !changed || busy} onClick={() => onShortAxis(mark.id, value)}>Save short axis</button>
      </div>
      <ViableField typed={viableText} onTyped={setViableText} longestMm={mark.longestAxialMm} testId="mark-viable" />
      <div className="editor-actions">
        <button type="button" className="quiet-danger" onClick={() => onDelete(mark.id)} disabled={busy} data-testid="delete-mark">Delete mark</button>
        <button type="button" className="primary" disabled={!viable.valid || !viableChanged || busy} onClick={() => onViable(mark.id, viable.value)} data-testid="save-viable">
          {viable.value === null && mark.viableAxialMm !== undefined ? 'Clear viable diameter' : 'Save viable diameter'}
        </button>
      </div>
    </div>
  );
}
