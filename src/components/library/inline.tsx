// Inline editors for a shot row: status (mark + word over a native select) and assignee.
import { SHOT_STATUSES, type ShotStatus } from '~/lib/vocab';
import { StatusIcon, STATUS_TONE } from './status';
import type { Person } from './types';

/** The status as mark and word, with a transparent native select on top so keyboard and screen readers get a real control. */
export function StatusSelect({ value, onChange, label, disabled }: { value: ShotStatus; onChange: (s: ShotStatus) => void; label: string; disabled?: boolean }) {
  return (
    <span
      className={`relative inline-flex items-center gap-1.5 rounded-md border border-transparent py-1 pr-6 pl-1.5 text-sm font-medium hover:border-sand-line hover:bg-paper focus-within:border-harbour-500 ${STATUS_TONE[value]}`}
      data-status={value}
    >
      <StatusIcon status={value} />
      <span className={value === 'omitted' ? 'line-through decoration-1' : ''}>{value}</span>
      <svg width="10" height="10" viewBox="0 0 10 10" aria-hidden="true" className="absolute right-1.5 text-ink-muted">
        <path d="m2 4 3 3 3-3" fill="none" stroke="currentColor" strokeWidth="1.4" />
      </svg>
      <select
        aria-label={label}
        value={value}
        disabled={disabled}
        onChange={(e) => onChange(e.target.value as ShotStatus)}
        className="absolute inset-0 cursor-pointer opacity-0 disabled:cursor-wait"
      >
        {SHOT_STATUSES.map((s) => (
          <option key={s} value={s}>
            {s}
          </option>
        ))}
      </select>
    </span>
  );
}

/** The assignee picker; "Unassigned" clears it. */
export function AssigneeSelect({
  value,
  name,
  people,
  onChange,
  label,
  disabled,
}: {
  value: string | null;
  name: string | null;
  people: Person[];
  onChange: (userId: string | null) => void;
  label: string;
  disabled?: boolean;
}) {
  const known = value === null || people.some((p) => p.userId === value);
  return (
    <select
      aria-label={label}
      value={value ?? ''}
      disabled={disabled}
      onChange={(e) => onChange(e.target.value || null)}
      className={`max-w-[11rem] cursor-pointer truncate rounded-md border border-transparent bg-transparent py-1 pr-6 pl-1.5 text-sm hover:border-sand-line hover:bg-paper focus:border-harbour-500 focus:outline-none ${
        value ? 'text-ink' : 'text-ink-muted italic'
      }`}
    >
      <option value="">Unassigned</option>
      {!known && value && <option value={value}>{name ?? 'Someone'}</option>}
      {people.map((p) => (
        <option key={p.userId} value={p.userId}>
          {p.name}
        </option>
      ))}
    </select>
  );
}
