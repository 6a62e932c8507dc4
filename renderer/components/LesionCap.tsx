import { useEffect, useState, type FormEvent } from 'react';
import { forgetKeptAnalyses } from '../analysis/analysis-cache';
import { errorText } from '../error-text';
import { appDb } from '../store/db';
import { getSetting, setSetting } from '../store/patients';
import { SETTING_SCHEMAS } from '../store/backup-records';

/**
 * The lesions-per-visit cap, as the command line's --max-lesions: a lesion mask holding more is
 * refused by name and count instead of being analysed. Set on this computer; analyses made after a
 * change use the new cap.
 */
export function LesionCap() {
  const [cap, setCap] = useState<number | null>(null);
  const [draft, setDraft] = useState('');
  const [editing, setEditing] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);
  useEffect(() => {
    void getSetting(appDb(), 'maxLesions').then(setCap);
  }, []);
  if (cap === null) return null;
  const save = async (e: FormEvent) => {
    e.preventDefault();
    const next = Number(draft.trim());
    if (!draft.trim() || !SETTING_SCHEMAS.maxLesions.safeParse(next).success) {
      setProblem(`the cap must be a whole number from 1 to 1000000, not "${draft.trim().slice(0, 40)}"`);
      return;
    }
    try {
      await setSetting(appDb(), 'maxLesions', next);
      forgetKeptAnalyses();
      setCap(next);
      setEditing(false);
      setProblem(null);
    } catch (err) {
      setProblem(errorText(err));
    }
  };
  if (!editing) {
    return (
      <span className="reader-name" data-testid="lesion-cap">
        Lesion cap: {cap} per visit{' '}
        <button type="button" className="link-button" onClick={() => { setDraft(String(cap)); setEditing(true); }} data-testid="lesion-cap-change">
          Change
        </button>
      </span>
    );
  }
  return (
    <form className="reader-name" onSubmit={(e) => void save(e)}>
      <label>
        Lesions per visit at most{' '}
        <input value={draft} onChange={(e) => setDraft(e.target.value)} inputMode="numeric" size={8} data-testid="lesion-cap-input" autoFocus />
      </label>
      <button type="submit" className="small" data-testid="lesion-cap-save">Save</button>
      <button type="button" className="small" onClick={() => { setEditing(false); setProblem(null); }}>Cancel</button>
      {problem && <span className="problem" role="alert">{problem}</span>}
    </form>
  );
}
