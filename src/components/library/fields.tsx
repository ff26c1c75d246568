// Form fields for the library forms: labelled inputs, selects and text areas with their message tied by aria-describedby.
import { useEffect, useRef, type ReactNode } from 'react';
import type { UseFormRegisterReturn } from 'react-hook-form';
import { fieldMessage } from '../shared/form';

interface FieldProps {
  label: string;
  registration: UseFormRegisterReturn;
  error?: string;
  hint?: ReactNode;
  className?: string;
}

function describedBy(id: string, message?: string, hint?: ReactNode) {
  return [message ? `${id}-error` : null, hint && !message ? `${id}-hint` : null].filter(Boolean).join(' ') || undefined;
}

function Message({ id, message, hint }: { id: string; message?: string; hint?: ReactNode }) {
  if (message)
    return (
      <p id={`${id}-error`} className="field-error">
        {message}
      </p>
    );
  if (hint)
    return (
      <p id={`${id}-hint`} className="mt-1.5 text-xs text-ink-muted">
        {hint}
      </p>
    );
  return null;
}

/** A labelled input (text, number or date). */
export function InputField({
  label,
  registration,
  error,
  hint,
  className = '',
  type = 'text',
  ...rest
}: FieldProps & { type?: 'text' | 'number' | 'date'; step?: string; min?: number; placeholder?: string; autoFocus?: boolean; inputMode?: 'numeric' | 'decimal' }) {
  const id = `field-${registration.name}`;
  const message = fieldMessage(label, error);
  return (
    <div className={className}>
      <label htmlFor={id} className="field-label">
        {label}
      </label>
      <input
        id={id}
        type={type}
        aria-invalid={message ? true : undefined}
        aria-describedby={describedBy(id, message, hint)}
        className="field-input"
        {...rest}
        {...registration}
      />
      <Message id={id} message={message} hint={hint} />
    </div>
  );
}

/** A labelled select. */
export function SelectField({ label, registration, error, hint, className = '', children }: FieldProps & { children: ReactNode }) {
  const id = `field-${registration.name}`;
  const message = fieldMessage(label, error);
  return (
    <div className={className}>
      <label htmlFor={id} className="field-label">
        {label}
      </label>
      <select id={id} aria-invalid={message ? true : undefined} aria-describedby={describedBy(id, message, hint)} className="field-input" {...registration}>
        {children}
      </select>
      <Message id={id} message={message} hint={hint} />
    </div>
  );
}

/** A labelled text area. */
export function TextAreaField({ label, registration, error, hint, className = '', rows = 3 }: FieldProps & { rows?: number }) {
  const id = `field-${registration.name}`;
  const message = fieldMessage(label, error);
  return (
    <div className={className}>
      <label htmlFor={id} className="field-label">
        {label}
      </label>
      <textarea id={id} rows={rows} aria-invalid={message ? true : undefined} aria-describedby={describedBy(id, message, hint)} className="field-input" {...registration} />
      <Message id={id} message={message} hint={hint} />
    </div>
  );
}

/** A modal panel on the native <dialog> element (focus trap, Escape and the backdrop come with it). */
export function Dialog({ open, title, onClose, children, wide = false }: { open: boolean; title: string; onClose: () => void; children: ReactNode; wide?: boolean }) {
  const ref = useRef<HTMLDialogElement>(null);
  useEffect(() => {
    const dialog = ref.current;
    if (!dialog) return;
    if (open && !dialog.open) dialog.showModal();
    if (!open && dialog.open) dialog.close();
  }, [open]);
  return (
    <dialog
      ref={ref}
      aria-labelledby="dialog-title"
      onClose={onClose}
      onCancel={(e) => {
        e.preventDefault();
        onClose();
      }}
      className={`card m-auto w-[calc(100%-2rem)] p-0 backdrop:bg-ink/40 backdrop:backdrop-blur-[2px] ${wide ? 'max-w-3xl' : 'max-w-lg'}`}
    >
      {open && (
        <div className="p-5 sm:p-6">
          <div className="mb-5 flex items-start justify-between gap-4">
            <h2 id="dialog-title" className="text-lg font-semibold">
              {title}
            </h2>
            <button type="button" className="-mt-1 -mr-2 rounded-lg p-2 text-ink-muted hover:bg-sand-deep hover:text-ink" aria-label="Close" onClick={onClose}>
              <svg width="14" height="14" viewBox="0 0 14 14" aria-hidden="true">
                <path d="M2 2l10 10M12 2 2 12" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" />
              </svg>
            </button>
          </div>
          {children}
        </div>
      )}
    </dialog>
  );
}

/** Empty string → null, for optional fields whose API value is null when blank. */
export const blankToNull = (v: unknown) => (v === '' || v === undefined ? null : v);
/** Input text → number (NaN for blank, which the schema reports as "must be a number"). */
export const toNumber = (v: unknown) => (v === '' || v === null || v === undefined ? Number.NaN : Number(v));
