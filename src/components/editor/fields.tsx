// Small inputs for the editor's panels: numbers that commit once (on Enter or leaving the field) so each edit is one
// undoable command, with units, a range and a one-line explanation.
import { useEffect, useId, useState, type ReactNode } from 'react';

interface NumberFieldProps {
  label: string;
  value: number;
  unit?: string;
  min?: number;
  max?: number;
  step?: number;
  integer?: boolean;
  help?: ReactNode;
  /** Called with a valid new value (within range); never with the same value. */
  onCommit(value: number): void;
  testId?: string;
  compact?: boolean;
}

export function NumberField({ label, value, unit, min, max, step, integer, help, onCommit, testId, compact }: NumberFieldProps) {
  const id = useId();
  const [text, setText] = useState(format(value));
  const [error, setError] = useState<string | null>(null);
  useEffect(() => { setText(format(value)); setError(null); }, [value]);
  const commit = () => {
    const v = Number(text.trim().replace(',', '.'));
    if (text.trim() === '' || !Number.isFinite(v)) { setError('Enter a number'); return; }
    if (integer && !Number.isInteger(v)) { setError('Enter a whole number'); return; }
    if (min !== undefined && v < min) { setError(`At least ${min}`); return; }
    if (max !== undefined && v > max) { setError(`At most ${max}`); return; }
    setError(null);
    if (v !== value) onCommit(v);
  };
  const range = min !== undefined && max !== undefined ? `${min} – ${max}` : null;
  return (
    <div className={compact ? '' : 'py-1'}>
      <div className="flex items-center justify-between gap-2">
        <label htmlFor={id} className="text-[0.8rem] font-medium text-ink">{label}</label>
        <div className="flex items-center gap-1">
          <input
            id={id}
            data-testid={testId}
            inputMode="decimal"
            value={text}
            step={step}
            aria-invalid={error ? true : undefined}
            onChange={(e) => setText(e.target.value)}
            onBlur={commit}
            onKeyDown={(e) => { if (e.key === 'Enter') { e.preventDefault(); commit(); } if (e.key === 'Escape') { setText(format(value)); setError(null); } }}
            className="w-24 rounded-md border border-sand-line bg-white px-2 py-1 text-right text-[0.8rem] tabular-nums focus:border-harbour-500 focus:ring-2 focus:ring-harbour-100 focus:outline-none aria-[invalid=true]:border-coral-500"
          />
          {unit !== undefined && <span className="w-12 text-[0.7rem] text-ink-muted">{unit}</span>}
        </div>
      </div>
      {error ? <p className="mt-0.5 text-[0.7rem] text-coral-700">{error}</p> : help ? <p className="mt-0.5 text-[0.7rem] leading-snug text-ink-muted">{help}{range ? ` Range ${range}.` : ''}</p> : null}
    </div>
  );
}

function format(v: number): string {
  if (!Number.isFinite(v)) return '';
  return String(Math.abs(v) >= 1e-4 || v === 0 ? +v.toPrecision(8) : v);
}

export function Section({ title, children, aside }: { title: string; children: ReactNode; aside?: ReactNode }) {
  return (
    <section className="border-b border-sand-line px-3 py-3 last:border-b-0">
      <div className="mb-1.5 flex items-center justify-between gap-2">
        <h3 className="text-xs font-semibold tracking-wide text-harbour-700 uppercase">{title}</h3>
        {aside}
      </div>
      {children}
    </section>
  );
}
