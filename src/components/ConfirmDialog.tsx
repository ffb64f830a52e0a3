/**
 * An accessible "are you sure" for actions that cannot be undone: a modal <dialog> named by its
 * title and described by its text, focus on the safe choice first, Escape or "Keep …" cancels.
 */
import { useEffect, useId, useRef, type ReactNode } from 'react';

interface Props {
  open: boolean;
  title: string;
  children: ReactNode;
  /** The button that goes ahead, e.g. "Submit and score". */
  confirmLabel: string;
  /** The button that backs out, e.g. "Keep editing". */
  cancelLabel: string;
  tone?: 'danger' | 'normal';
  busy?: boolean;
  onConfirm(): void;
  onCancel(): void;
}

export default function ConfirmDialog({
  open,
  title,
  children,
  confirmLabel,
  cancelLabel,
  tone = 'normal',
  busy = false,
  onConfirm,
  onCancel,
}: Props) {
  const dialog = useRef<HTMLDialogElement>(null);
  const cancel = useRef<HTMLButtonElement>(null);
  const id = useId();
  useEffect(() => {
    const d = dialog.current;
    if (!d) return;
    if (open && !d.open) {
      d.showModal();
      cancel.current?.focus();
    } else if (!open && d.open) d.close();
  }, [open]);
  return (
    <dialog
      ref={dialog}
      aria-labelledby={`${id}-title`}
      aria-describedby={`${id}-text`}
      className="m-auto w-[min(100vw-1rem,32rem)] rounded-xl p-0 backdrop:bg-iron-900/60"
      onCancel={(e) => {
        e.preventDefault();
        if (!busy) onCancel();
      }}
    >
      <div className="p-4">
        <h2 id={`${id}-title`} className="text-xl font-bold text-iron-900">
          {title}
        </h2>
        <div id={`${id}-text`} className="mt-2 grid gap-2 text-iron-800">
          {children}
        </div>
        <div className="mt-4 flex flex-col-reverse gap-2 sm:flex-row sm:justify-end">
          <button ref={cancel} type="button" className="btn-secondary" onClick={onCancel} disabled={busy}>
            {cancelLabel}
          </button>
          <button
            type="button"
            className={tone === 'danger' ? 'btn bg-withdraw hover:bg-withdraw/90' : 'btn'}
            onClick={onConfirm}
            disabled={busy}
          >
            {busy ? 'Working…' : confirmLabel}
          </button>
        </div>
      </div>
    </dialog>
  );
}
