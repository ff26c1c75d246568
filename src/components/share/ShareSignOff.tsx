// The share page's sign-off card: when the studio asked for the client's sign-off, the viewer (a guest holding the
// link) signs off or asks for changes under their name; afterwards the card shows the decision in our words.
import { useState } from 'react';
import { ClientDecisionForm, ClientDecisionLine, ClientSignOffHeading, type ClientSide, type DecisionInput } from '../review/ClientSignOff';
import type { ClientStep } from '~/lib/review/states';

interface Props {
  token: string;
  initial: ClientSide & { clientSteps: ClientStep[] };
}

export default function ShareSignOff({ token, initial }: Props) {
  const [side, setSide] = useState<ClientSide>(initial);
  const [open, setOpen] = useState(initial.clientSteps.includes('sign-off'));
  const [done, setDone] = useState<string | null>(null);

  async function decide(input: DecisionInput) {
    const res = await fetch(`/api/shared/${token}/decision`, {
      method: 'POST',
      credentials: 'same-origin',
      headers: { accept: 'application/json', 'content-type': 'application/json' },
      body: JSON.stringify({ name: input.name, decision: input.decision, ...(input.comment ? { comment: input.comment } : {}), ...(input.email ? { email: input.email } : {}) }),
    }).catch(() => null);
    const body = await res?.json().catch(() => null);
    if (!res || !res.ok) {
      return { message: body?.error?.message ?? 'Could not reach the studio. Check your connection and try again.', fields: body?.error?.fields ?? {} };
    }
    setSide(body.version);
    setOpen(false);
    const confirmed = body.confirmationTo ? ` A confirmation is on its way to ${body.confirmationTo}.` : '';
    setDone((input.decision === 'sign-off' ? 'Thank you: you signed off this version. The studio has been told.' : 'Sent: the studio has your request for changes.') + confirmed);
    return null;
  }

  if (side.clientState === 'not sent') return null;
  return (
    <section className="card p-5 text-sm" data-testid="share-sign-off">
      <ClientSignOffHeading title="Your sign-off" state={side.clientState} testId="share-client-state" titleClass="text-base font-semibold" />
      {open ? (
        <>
          <p className="mt-2 text-ink-soft">The studio approved this version and asks whether it works for you. Sign off, or say what should change.</p>
          <ClientDecisionForm idPrefix="share" askName onDecide={decide} />
        </>
      ) : (
        <ClientDecisionLine side={side} />
      )}
      {done && (
        <p className="mt-3 text-foam-600" role="status" data-testid="share-sign-off-done">
          {done}
        </p>
      )}
    </section>
  );
}
