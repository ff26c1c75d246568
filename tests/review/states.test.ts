// The review state machine: every action from every state by every actor, allowed or refused for the right reason.
import { describe, it, expect } from 'vitest';
import { decideTransition, shotStatusAfter, availableActions, RULES, type ReviewActor, type ReviewAction } from '../../src/lib/review/states';
import { REVIEW_STATES, ROLES, SHOT_STATUSES } from '../../src/lib/vocab';

const ACTORS: ReviewActor[] = [...ROLES, 'system'];
const ACTIONS: ReviewAction[] = ['submit', 'approve', 'return', 'supersede'];

/** The table the product asks for, written out by hand (not derived from RULES). */
const EXPECTED: Record<ReviewAction, { from: string[]; to: string; actors: string[] }> = {
  submit: { from: ['draft'], to: 'submitted', actors: ['artist', 'supervisor', 'owner'] },
  approve: { from: ['submitted'], to: 'approved', actors: ['supervisor', 'owner'] },
  return: { from: ['submitted'], to: 'returned', actors: ['supervisor', 'owner'] },
  supersede: { from: ['draft', 'submitted', 'approved', 'returned'], to: 'superseded', actors: ['system'] },
};

describe('review transitions', () => {
  for (const action of ACTIONS) {
    for (const from of REVIEW_STATES) {
      for (const actor of ACTORS) {
        const e = EXPECTED[action];
        const allowed = e.actors.includes(actor) && e.from.includes(from);
        it(`${actor} ${action} from ${from} → ${allowed ? e.to : 'refused'}`, () => {
          const r = decideTransition({ actor, action, from, bakeState: 'baked', comment: 'fix the crown at 1012' });
          if (allowed) {
            expect(r).toEqual({ ok: true, to: e.to });
          } else {
            expect(r.ok).toBe(false);
            if (!r.ok) expect(r.code).toBe(e.actors.includes(actor) ? 'conflict' : 'forbidden');
          }
        });
      }
    }
  }

  it('the rules table matches the expected table', () => {
    for (const a of ACTIONS) expect({ from: [...RULES[a].from], to: RULES[a].to, actors: [...RULES[a].actors] }).toEqual(EXPECTED[a]);
  });

  it('only a baked version can be submitted', () => {
    for (const bakeState of ['none', 'queued', 'baking', 'failed', 'cancelled']) {
      const r = decideTransition({ actor: 'artist', action: 'submit', from: 'draft', bakeState });
      expect(r.ok).toBe(false);
      if (!r.ok) {
        expect(r.code).toBe('conflict');
        expect(r.message).toMatch(/Bake/);
      }
    }
  });

  it('a return needs a comment; an approval does not', () => {
    for (const comment of [undefined, null, '', '   ']) {
      const r = decideTransition({ actor: 'supervisor', action: 'return', from: 'submitted', bakeState: 'baked', comment });
      expect(r).toMatchObject({ ok: false, code: 'validation_failed', field: 'comment' });
    }
    expect(decideTransition({ actor: 'owner', action: 'approve', from: 'submitted', bakeState: 'baked' })).toEqual({ ok: true, to: 'approved' });
  });

  it('a role check comes before the state check (a client learns nothing about the state)', () => {
    const r = decideTransition({ actor: 'client', action: 'approve', from: 'approved', bakeState: 'baked' });
    expect(r).toMatchObject({ ok: false, code: 'forbidden' });
  });

  it('offers buttons by role and state', () => {
    expect(availableActions('artist', 'draft', 'baked')).toEqual(['submit']);
    expect(availableActions('artist', 'draft', 'none')).toEqual([]);
    expect(availableActions('artist', 'submitted', 'baked')).toEqual([]);
    expect(availableActions('supervisor', 'submitted', 'baked')).toEqual(['approve', 'return']);
    expect(availableActions('client', 'submitted', 'baked')).toEqual([]);
    expect(availableActions('owner', 'superseded', 'baked')).toEqual([]);
  });
});

describe('an unhealthy bake at the submit gate', () => {
  const submit = { actor: 'artist' as const, action: 'submit' as const, from: 'draft' as const, bakeState: 'baked' };
  it('refuses a bake whose verdict has findings unless the artist gives a reason, naming the field', () => {
    const r = decideTransition({ ...submit, bakeHealthy: false });
    expect(r).toMatchObject({ ok: false, code: 'validation_failed', field: 'overrideReason' });
    expect(decideTransition({ ...submit, bakeHealthy: false, overrideReason: '  ' }).ok).toBe(false);
    expect(decideTransition({ ...submit, bakeHealthy: false, overrideReason: 'spray is wanted' })).toEqual({ ok: true, to: 'submitted' });
  });
  it('lets healthy bakes and bakes stored before verdicts existed through without a reason', () => {
    expect(decideTransition({ ...submit, bakeHealthy: true }).ok).toBe(true);
    expect(decideTransition({ ...submit, bakeHealthy: null }).ok).toBe(true);
    expect(decideTransition(submit).ok).toBe(true);
  });
});

describe('the shot status follows its versions', () => {
  it('submitted → in review, approved → approved, returned → blocking, superseded → blocking', () => {
    expect(shotStatusAfter('submitted', 'blocking')).toBe('in review');
    expect(shotStatusAfter('approved', 'in review')).toBe('approved');
    expect(shotStatusAfter('returned', 'in review')).toBe('blocking');
    expect(shotStatusAfter('superseded', 'approved')).toBe('blocking');
    expect(shotStatusAfter('superseded', 'in review')).toBe('blocking');
  });
  it('leaves a status that is already right, and never overrides on hold or omitted', () => {
    expect(shotStatusAfter('returned', 'blocking')).toBeNull();
    for (const to of REVIEW_STATES) {
      expect(shotStatusAfter(to, 'on hold')).toBeNull();
      expect(shotStatusAfter(to, 'omitted')).toBeNull();
    }
    expect(shotStatusAfter('draft', 'blocking')).toBeNull();
    expect(SHOT_STATUSES).toContain('in review');
  });
});
