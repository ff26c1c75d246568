// Form pieces shared by the islands: a labelled field with its message, the message box at the top, and server-error mapping.
import type { ReactNode } from 'react';
import type { FieldValues, Path, UseFormRegisterReturn, UseFormSetError } from 'react-hook-form';
import { ApiError, messageOf } from './api';

/** "is required" under "E-mail" reads as "E-mail is required"; a full sentence stays as it is. */
export function fieldMessage(label: string, message: string | undefined): string | undefined {
  if (!message) return undefined;
  return /^[a-z]/.test(message) ? `${label} ${message}` : message;
}

interface TextFieldProps {
  label: string;
  registration: UseFormRegisterReturn;
  error?: string;
  type?: 'text' | 'email' | 'password';
  autoComplete?: string;
  hint?: ReactNode;
  autoFocus?: boolean;
  readOnly?: boolean;
  defaultValue?: string;
  /** Extra content beside the label (a link, say). */
  aside?: ReactNode;
}

/** A labelled input whose message is tied to it with aria-describedby. */
export function TextField({ label, registration, error, type = 'text', autoComplete, hint, autoFocus, readOnly, defaultValue, aside }: TextFieldProps) {
  const id = `field-${registration.name}`;
  const message = fieldMessage(label, error);
  const described = [message ? `${id}-error` : null, hint ? `${id}-hint` : null].filter(Boolean).join(' ') || undefined;
  return (
    <div>
      <div className="flex items-baseline justify-between gap-3">
        <label htmlFor={id} className="field-label">
          {label}
        </label>
        {aside}
      </div>
      <input
        id={id}
        type={type}
        autoComplete={autoComplete}
        autoFocus={autoFocus}
        readOnly={readOnly}
        defaultValue={defaultValue}
        aria-invalid={message ? true : undefined}
        aria-describedby={described}
        className="field-input read-only:bg-sand read-only:text-ink-soft"
        {...registration}
      />
      {hint && !message && (
        <p id={`${id}-hint`} className="mt-1.5 text-sm text-ink-muted">
          {hint}
        </p>
      )}
      {message && (
        <p id={`${id}-error`} className="field-error">
          {message}
        </p>
      )}
    </div>
  );
}

/** The message at the top of a form: an error (coral) or a confirmation (foam). Announced to screen readers. */
export function FormMessage({ tone = 'error', children }: { tone?: 'error' | 'success' | 'info'; children: ReactNode }) {
  if (!children) return null;
  const styles = {
    error: 'border-coral-100 bg-coral-50 text-coral-700',
    success: 'border-foam-600/20 bg-foam-50 text-foam-600',
    info: 'border-harbour-100 bg-harbour-50 text-harbour-700',
  }[tone];
  return (
    <div role={tone === 'error' ? 'alert' : 'status'} className={`rounded-lg border px-3.5 py-2.5 text-sm leading-relaxed ${styles}`}>
      {children}
    </div>
  );
}

/**
 * Puts an API error's field messages next to the form's own fields and returns the message for the top of the form.
 * Field messages for fields the form does not show are folded into the returned message.
 */
export function applyServerError<T extends FieldValues>(err: unknown, setError: UseFormSetError<T>, fieldNames: readonly Path<T>[]): string {
  if (!(err instanceof ApiError)) return messageOf(err);
  const unplaced: string[] = [];
  for (const [name, message] of Object.entries(err.fields)) {
    if ((fieldNames as readonly string[]).includes(name)) setError(name as Path<T>, { type: 'server', message });
    else if (name !== '(body)') unplaced.push(`${name} ${message}`);
  }
  return unplaced.length && !err.message.includes(unplaced[0]!) ? `${err.message} (${unplaced.join('; ')})` : err.message;
}

/** A submit button whose text stays the same while busy (a spinner shows instead), so it can be found by its text. */
export function SubmitButton({ busy, children, className = '', variant = 'primary' }: { busy: boolean; children: ReactNode; className?: string; variant?: 'primary' | 'danger' }) {
  return (
    <button type="submit" disabled={busy} aria-busy={busy || undefined} className={`${variant === 'danger' ? 'btn-danger' : 'btn-primary'} ${className}`}>
      {busy && <Spinner />}
      {children}
    </button>
  );
}

/** A small rotating ring for pending actions (decorative). */
export function Spinner() {
  return (
    <svg className="size-4 animate-spin motion-reduce:animate-none" viewBox="0 0 24 24" aria-hidden="true">
      <circle cx="12" cy="12" r="9" fill="none" stroke="currentColor" strokeOpacity="0.3" strokeWidth="3" />
      <path d="M21 12a9 9 0 0 0-9-9" fill="none" stroke="currentColor" strokeWidth="3" strokeLinecap="round" />
    </svg>
  );
}

/** A message about the last action (saved, refused…) that the reader can dismiss; nothing when `notice` is null. */
export function DismissableNotice({
  notice,
  onDismiss,
}: {
  notice: { tone: 'error' | 'success' | 'info'; text: ReactNode } | null;
  onDismiss: () => void;
}) {
  if (!notice) return null;
  return (
    <div className="flex items-start gap-3">
      <div className="flex-1">
        <FormMessage tone={notice.tone}>{notice.text}</FormMessage>
      </div>
      <button type="button" className="btn-quiet px-3 py-2" onClick={onDismiss}>
        Dismiss
      </button>
    </div>
  );
}
