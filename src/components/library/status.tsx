// Shot statuses in Tidemark's own visual language: a small drawn mark plus the word, never colour alone.
import { reviewStateWord, type ShotStatus } from '~/lib/vocab';

/** Text colour for each status (the mark and the word share it; the shape carries the meaning). */
export const STATUS_TONE: Record<ShotStatus, string> = {
  blocking: 'text-harbour-700',
  'in review': 'text-amber-700',
  approved: 'text-foam-600',
  'on hold': 'text-ink-soft',
  omitted: 'text-ink-muted',
};

/** A 16 px mark per status: a tide line being drawn, a sighting glass, a sealed mark, a hold bar, a struck ring. */
export function StatusIcon({ status, className = '' }: { status: ShotStatus; className?: string }) {
  const common = { width: 16, height: 16, viewBox: '0 0 16 16', 'aria-hidden': true as const, className: `shrink-0 ${className}` };
  switch (status) {
    case 'blocking':
      // An open ring with a wave inside: work in progress on the liquid.
      return (
        <svg {...common}>
          <path d="M8 1.75a6.25 6.25 0 1 1-6.25 6.25" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" />
          <path d="M4.2 9c1.2-1.6 2.4-1.6 3.6 0s2.4 1.6 3.6 0" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" />
        </svg>
      );
    case 'in review':
      // A sighting lens: a ring with a centred point and a short handle.
      return (
        <svg {...common}>
          <circle cx="7" cy="7" r="4.75" fill="none" stroke="currentColor" strokeWidth="1.5" />
          <circle cx="7" cy="7" r="1.6" fill="currentColor" />
          <path d="M10.6 10.6 14 14" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />
        </svg>
      );
    case 'approved':
      // A filled seal with a tick cut out.
      return (
        <svg {...common}>
          <path d="M8 1 9.8 2.6l2.4-.3.6 2.3 2 1.4-1 2.2.6 2.3-2.1 1.1-.6 2.3-2.4-.1L8 15l-1.8-1.6-2.4.3-.6-2.3-2-1.4 1-2.2-.6-2.3 2.1-1.1.6-2.3 2.4.1z" fill="currentColor" />
          <path d="m5.3 8.2 1.8 1.8 3.6-3.8" fill="none" stroke="white" strokeWidth="1.6" strokeLinecap="round" strokeLinejoin="round" />
        </svg>
      );
    case 'on hold':
      // Two bars in a rounded square: paused.
      return (
        <svg {...common}>
          <rect x="1.75" y="1.75" width="12.5" height="12.5" rx="3" fill="none" stroke="currentColor" strokeWidth="1.5" />
          <path d="M6.2 5.2v5.6M9.8 5.2v5.6" stroke="currentColor" strokeWidth="1.7" strokeLinecap="round" />
        </svg>
      );
    case 'omitted':
      // A dashed ring struck through: out of the cut.
      return (
        <svg {...common}>
          <circle cx="8" cy="8" r="6.25" fill="none" stroke="currentColor" strokeWidth="1.4" strokeDasharray="2.2 1.8" />
          <path d="M3.5 12.5 12.5 3.5" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" />
        </svg>
      );
  }
}

/** A read-only status: mark and word. */
export function StatusBadge({ status }: { status: ShotStatus | null }) {
  // A client is not shown the studio's shot status (null).
  if (!status) return null;
  return (
    <span className={`inline-flex items-center gap-1.5 text-sm font-medium ${STATUS_TONE[status]}`} data-status={status}>
      <StatusIcon status={status} />
      <span className={status === 'omitted' ? 'line-through decoration-1' : ''}>{status}</span>
    </span>
  );
}

/** "Submitted", "Baked"… for version states (words, with a quiet dot shape per family). */
export function StateWord({ state, kind }: { state: string; kind: 'bake' | 'review' }) {
  const tone =
    kind === 'bake'
      ? { baked: 'text-foam-600', failed: 'text-coral-700', baking: 'text-harbour-700', queued: 'text-harbour-700' }[state] ?? 'text-ink-muted'
      : { approved: 'text-foam-600', returned: 'text-coral-700', submitted: 'text-amber-700' }[state] ?? 'text-ink-muted';
  const mark =
    kind === 'bake'
      ? { baked: '●', failed: '✕', baking: '◐', queued: '○', cancelled: '–', none: '·' }[state] ?? '·'
      : { approved: '✓', returned: '↩', submitted: '→', draft: '✎', superseded: '⤳' }[state] ?? '·';
  return (
    <span className={`inline-flex items-center gap-1.5 text-sm ${tone}`}>
      <span aria-hidden="true" className="w-3 text-center">
        {mark}
      </span>
      {kind === 'bake' ? (state === 'none' ? 'not baked' : state) : reviewStateWord(state)}
    </span>
  );
}
