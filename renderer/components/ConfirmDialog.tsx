import { useEffect, useRef, type ReactNode } from 'react';

interface Props {
  title: string;
  children: ReactNode;
  confirmLabel: string;
  /** A destructive action: the confirm button is drawn as a warning. */
  danger?: boolean;
  onConfirm: () => void;
  onCancel: () => void;
  testId?: string;
}

/**
 * A modal question in the page itself. The native <dialog> keeps focus inside and closes on Escape;
 * the safe choice (Cancel) has the focus first, so Enter never deletes anything by accident.
 */
export function ConfirmDialog({ title, children, confirmLabel, danger, onConfirm, onCancel, testId }: Props) {
  const ref = useRef<HTMLDialogElement>(null);
  const cancel = useRef<HTMLButtonElement>(null);
  useEffect(() => {
    const d = ref.current;
    if (d && !d.open) d.showModal();
    cancel.current?.focus();
    return () => d?.close();
  }, []);
  return (
    <dialog
      ref={ref}
      className="dialog"
      aria-labelledby="dialog-title"
      data-testid={testId}
      onCancel={(e) => {
        e.preventDefault();
        onCancel();
      }}
    >
      <h3 id="dialog-title">{title}</h3>
      <div className="dialog-body">{children}</div>
      <div className="dialog-actions">
        <button type="button" ref={cancel} onClick={onCancel} data-testid="dialog-cancel">
          Cancel
        </button>
        <button type="button" className={danger ? 'danger' : 'primary'} onClick={onConfirm} data-testid="dialog-confirm">
          {confirmLabel}
        </button>
      </div>
    </dialog>
  );
}
