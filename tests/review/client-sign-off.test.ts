// The client's sign-off, beside the review state machine: who may take each step from which states, and what a
// repeated or late request answers. The expected table is written out by hand, not derived from the code.
import { describe, it, expect } from 'vitest';
import { availableClientSteps, decideClientStep, decideTransition, type ClientActor, type ClientStep } from '../../src/lib/review/states';
import { askSignOffBody, clientDecisionBody, guestDecisionBody } from '../../src/lib/review/client-signoff';
import { CLIENT_STATES, REVIEW_STATES, ROLES, type ClientState } from '../../src/lib/vocab';

const ACTORS: ClientActor[] = [...ROLES, 'guest'];
const STEPS: ClientStep[] = ['send', 'sign-off', 'ask-changes'];

/** For an approved version: the client state each step leads to from each client state, or 'conflict'. */
const FROM_APPROVED: Record<ClientStep, Record<ClientState, ClientState | 'conflict'>> = {
  send: { 'not sent': 'waiting', waiting: 'waiting', 'signed off': 'waiting', 'changes asked': 'waiting' },
  'sign-off': { 'not sent': 'conflict', waiting: 'signed off', 'signed off': 'signed off', 'changes asked': 'conflict' },
  'ask-changes': { 'not sent': 'conflict', waiting: 'changes asked', 'signed off': 'conflict', 'changes asked': 'changes asked' },
};
const WHO: Record<ClientStep, ClientActor[]> = { send: ['supervisor', 'owner'], 'sign-off': ['client', 'guest'], 'ask-changes': ['client', 'guest'] };

describe('client sign-off steps', () => {
  for (const step of STEPS) {
    for (const actor of ACTORS) {
      for (const reviewState of REVIEW_STATES) {
        for (const clientState of CLIENT_STATES) {
          const allowedActor = WHO[step].includes(actor);
          const expected = !allowedActor ? 'forbidden' : reviewState !== 'approved' ? 'conflict' : FROM_APPROVED[step][clientState];
          it(`${actor} ${step} (review ${reviewState}, client ${clientState}) → ${expected}`, () => {
            const r = decideClientStep({ actor, step, reviewState, clientState, comment: 'the crown is too tall at 1012' });
            if (expected === 'forbidden' || expected === 'conflict') {
              expect(r.ok).toBe(false);
              if (!r.ok) expect(r.code).toBe(expected);
            } else {
              expect(r).toEqual({ ok: true, to: expected, unchanged: expected === clientState });
            }
          });
        }
      }
    }
  }

  it('a client cannot sign off before the studio approved the version, and is told so', () => {
    const r = decideClientStep({ actor: 'client', step: 'sign-off', reviewState: 'submitted', clientState: 'not sent' });
    expect(r).toMatchObject({ ok: false, code: 'conflict' });
    if (!r.ok) expect(r.message).toMatch(/not approved by us yet/);
  });

  it('asking for changes needs a comment naming what to change', () => {
    for (const comment of [undefined, null, '', '   ']) {
      const r = decideClientStep({ actor: 'guest', step: 'ask-changes', reviewState: 'approved', clientState: 'waiting', comment });
      expect(r).toMatchObject({ ok: false, code: 'validation_failed', field: 'comment' });
    }
  });

  it('signing off needs no comment', () => {
    expect(decideClientStep({ actor: 'client', step: 'sign-off', reviewState: 'approved', clientState: 'waiting' })).toEqual({ ok: true, to: 'signed off', unchanged: false });
  });

  it('offers the client both decisions only while the version waits for them', () => {
    expect(availableClientSteps('client', 'approved', 'waiting')).toEqual(['sign-off', 'ask-changes']);
    expect(availableClientSteps('guest', 'approved', 'signed off')).toEqual([]);
    expect(availableClientSteps('client', 'submitted', 'waiting')).toEqual([]);
    expect(availableClientSteps('supervisor', 'approved', 'not sent')).toEqual(['send']);
    expect(availableClientSteps('supervisor', 'approved', 'waiting')).toEqual([]);
    expect(availableClientSteps('artist', 'approved', 'not sent')).toEqual([]);
  });

  it('leaves the review state machine as it was: no client may approve internally', () => {
    expect(decideTransition({ actor: 'client', action: 'approve', from: 'submitted', bakeState: 'baked' })).toMatchObject({ ok: false, code: 'forbidden' });
  });
});

describe('client sign-off bodies', () => {
  const fieldsOf = (r: { success: boolean; error?: { issues: { path: (string | number)[]; message: string }[] } }) =>
    Object.fromEntries((r.error?.issues ?? []).map((i) => [i.path.join('.'), i.message]));

  it('takes the two decisions, with an optional comment', () => {
    expect(clientDecisionBody.parse({ decision: 'sign-off' })).toEqual({ decision: 'sign-off' });
    expect(clientDecisionBody.parse({ decision: 'ask-changes', comment: '  lower the crown ' })).toEqual({ decision: 'ask-changes', comment: 'lower the crown' });
  });

  it('names the field it refuses', () => {
    expect(fieldsOf(clientDecisionBody.safeParse({}))).toEqual({ decision: 'is required' });
    expect(fieldsOf(clientDecisionBody.safeParse({ decision: 'approve' }))).toEqual({ decision: "must be 'sign-off' or 'ask-changes'" });
    expect(fieldsOf(clientDecisionBody.safeParse({ decision: 'sign-off', comment: 'x'.repeat(2001) }))).toHaveProperty('comment');
    expect(fieldsOf(guestDecisionBody.safeParse({ decision: 'sign-off', name: '  ' }))).toEqual({ name: 'is required' });
    expect(fieldsOf(askSignOffBody.safeParse({ message: 3 }))).toEqual({ message: 'must be text' });
    expect(clientDecisionBody.safeParse({ decision: 'sign-off', extra: 1 }).success).toBe(false);
  });
});
