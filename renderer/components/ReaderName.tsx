import { useEffect, useState, type FormEvent } from 'react';
import { errorText } from '../error-text';
import { appDb, setCurrentReader } from '../store/db';
import { getSetting, setSetting } from '../store/patients';

/**
 * The reader's name, set once on this computer: it signs every change in the edit trail and fills the
 * case form's reader column for visits whose manifest names no reader.
 */
export function ReaderName() {
  const [name, setName] = useState<string | null>(null);
  const [draft, setDraft] = useState('');
  const [editing, setEditing] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);
  useEffect(() => {
    void getSetting(appDb(), 'readerName').then((n) => { setCurrentReader(n); setName(n); });
  }, []);
  if (name === null) return null;
  const save = async (e: FormEvent) => {
    e.preventDefault();
    const next = draft.trim().slice(0, 120);
    try {
      await setSetting(appDb(), 'readerName', next);
      setCurrentReader(next);
      setName(next);
      setEditing(false);
      setProblem(null);
    } catch (err) {
      setProblem(errorText(err));
    }
  };
  if (!editing) {
    return (
      <span className="reader-name" data-testid="reader-name">
        Reader: {name || <em>not set</em>}{' '}
        <button type="button" className="link-button" onClick={() => { setDraft(name); setEditing(true); }} data-testid="reader-change">
          {name ? 'Change' : 'Set'}
        </button>
      </span>
    );
  }
  return (
    <form className="reader-name" onSubmit={(e) => void save(e)}>
      <label>
        Reader <input value={draft} onChange={(e) => setDraft(e.target.value)} maxLength={120} data-testid="reader-input" autoFocus />
      </label>
      <button type="submit" className="small" data-testid="reader-save">Save</button>
      <button type="button" className="small" onClick={() => setEditing(false)}>Cancel</button>
      {problem && <span className="problem" role="alert">{problem}</span>}
    </form>
  );
}
