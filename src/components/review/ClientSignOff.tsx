// The client's sign-off on screen: the state badge in our words, who decided and what they asked, and the decision
// form ("Sign off" / "Ask for changes" with a comment, and a name for a guest). Used by the version page's review panel
// (signed-in clients and the studio) and by the public share page; the caller sends the decision.
import { useState } from 'react';
import { Spinner } from '../shared/form';
import { clientStateWord, type ClientState } from '~/lib/vocab';
import type { ClientDecision } from '~/lib/review/states';

export const CLIENT_TONE: Record<ClientState, string> = {
  'not sent': 'bg-sand-deep text-ink-soft',
  waiting: 'bg-amber-50 text-amber-700',
  'signed off': 'bg-foam-50 text-foam-600',
  'changes asked': 'bg-coral-50 text-coral-700',
};

export function ClientStateBadge({ state, testId = 'client-state' }: { state: ClientState; testId?: string }) {
  return (
    <span className={`rounded-full px-2.5 py-0.5 text-xs font-medium ${CLIENT_TONE[state] ?? ''}`} data-testid={testId} data-state={state}>
      {clientStateWord(state)}
    </span>
  );
}

/** A card's heading with the client state badge at its right. */
export function ClientSignOffHeading({ title, state, testId, titleClass }: { title: string; state: ClientState; testId: string; titleClass: string }) {
  return (
    <div className="flex items-center justify-between gap-3">
      <h2 className={titleClass}>{title}</h2>
      <ClientStateBadge state={state} testId={testId} />
    </div>
  );
}

export interface ClientSide {
  clientState: ClientState;
  clientDecidedAt: string | null;
  clientDecidedByName: string | null;
  clientComment: string | null;
}

const when = (iso: string) => new Date(iso).toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'short' });

/** "Signed off by Ines Varga · 3 Dec 2026, 14:02" and the comment, when the client has decided. */
export function ClientDecisionLine({ side }: { side: ClientSide }) {
  if (!side.clientDecidedAt) return null;
  const verb = side.clientState === 'signed off' ? 'Signed off' : 'Changes asked';
  return (
    <p className="mt-2 text-sm text-ink-soft" data-testid="client-decision">
      {verb} by {side.clientDecidedByName ?? 'the client'} · <span suppressHydrationWarning>{when(side.clientDecidedAt)}</span>
      {side.clientComment && <span className="mt-1 block whitespace-pre-wrap text-ink">“{side.clientComment}”</span>}
    </p>
  );
}

export interface DecisionInput {
  decision: ClientDecision;
  comment: string;
  name: string;
  /** A guest's address for the confirmation (empty: none asked for). */
  email: string;
}

/**
 * The two decisions with a comment (needed to ask for changes) and, for a guest, their name. `onDecide` sends it and
 * returns an error message with the fields it names, or null when it went through.
 */
export function ClientDecisionForm(props: {
  idPrefix: string;
  askName: boolean;
  onDecide: (input: DecisionInput) => Promise<{ message: string; fields: Record<string, string> } | null>;
}) {
  const [comment, setComment] = useState('');
  const [name, setName] = useState('');
  const [email, setEmail] = useState('');
  const [busy, setBusy] = useState<ClientDecision | null>(null);
  const [error, setError] = useState<{ message: string; fields: Record<string, string> } | null>(null);
  const send = async (decision: ClientDecision) => {
    if (decision === 'ask-changes' && !comment.trim()) return setError({ message: 'Say what should change first.', fields: { comment: 'say what should change first' } });
    if (busy !== null) return; // a second click before the re-render sends nothing
    setBusy(decision);
    setError(null);
    const failed = await props.onDecide({ decision, comment: comment.trim(), name: name.trim(), email: email.trim() });
    setBusy(null);
    setError(failed);
  };
  return (
    <form className="mt-3 grid gap-2 text-sm" onSubmit={(e) => e.preventDefault()} noValidate data-testid="client-decision-form">
      {props.askName && (
        <label>
          <span className="field-label">Your name</span>
          <input className="field-input" value={name} maxLength={80} onChange={(e) => setName(e.target.value)} aria-invalid={!!error?.fields.name || undefined} data-testid="client-decision-name" />
          {error?.fields.name && <span className="field-error">Name {error.fields.name}</span>}
        </label>
      )}
      {props.askName && (
        <label>
          <span className="field-label">Your e-mail, for a confirmation (optional)</span>
          <input
            className="field-input"
            type="email"
            value={email}
            maxLength={254}
            onChange={(e) => setEmail(e.target.value)}
            aria-invalid={!!error?.fields.email || undefined}
            data-testid="client-decision-email"
          />
          {error?.fields.email && <span className="field-error">E-mail {error.fields.email}</span>}
        </label>
      )}
      <label htmlFor={`${props.idPrefix}-client-comment`} className="field-label">
        What should change (needed to ask for changes)
      </label>
      <textarea
        id={`${props.idPrefix}-client-comment`}
        className="field-input min-h-16"
        value={comment}
        maxLength={2000}
        onChange={(e) => setComment(e.target.value)}
        aria-invalid={!!error?.fields.comment || undefined}
        data-testid="client-decision-comment"
      />
      {error?.fields.comment && <span className="field-error">Comment: {error.fields.comment}</span>}
      {error && !error.fields.name && !error.fields.comment && !error.fields.email && (
        <p className="field-error" role="alert">
          {error.message}
        </p>
      )}
      <div className="flex flex-wrap gap-2">
        <button type="button" className="btn-primary" disabled={busy !== null} onClick={() => send('sign-off')} data-testid="client-sign-off">
          {busy === 'sign-off' && <Spinner />}Sign off
        </button>
        <button type="button" className="btn-danger" disabled={busy !== null} onClick={() => send('ask-changes')} data-testid="client-ask-changes">
          {busy === 'ask-changes' && <Spinner />}Ask for changes
        </button>
      </div>
    </form>
  );
}
