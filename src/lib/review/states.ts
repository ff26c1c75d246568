// The review state machine of a version, as pure functions shared by the server and the browser:
// who may move a version from which state to which, and what the shot's status becomes.
import type { ClientState, ReviewState, Role, ShotStatus } from '../vocab';

/** What a person (or the system, for `supersede`) asks to do to a version's review state. */
export type ReviewAction = 'submit' | 'approve' | 'return' | 'supersede';

export const REVIEW_ACTIONS: readonly ReviewAction[] = ['submit', 'approve', 'return', 'supersede'];

/** The actor: a studio role, or 'system' for changes that follow from another change (a newer version). */
export type ReviewActor = Role | 'system';

export interface TransitionRequest {
  actor: ReviewActor;
  action: ReviewAction;
  from: ReviewState;
  /** The version's bake state (only a baked version can be submitted). */
  bakeState: string;
  comment?: string | null;
  /** The bake's health verdict (src/lib/sim/health.ts): false when it has findings; null/undefined when unknown. */
  bakeHealthy?: boolean | null;
  /** Why the artist submits a bake whose verdict has findings (needed then, 3–500 characters). */
  overrideReason?: string | null;
}

export type TransitionRefusal = {
  ok: false;
  /** forbidden → 403, conflict → 409 (the version is not in a state that allows it), validation_failed → 400. */
  code: 'forbidden' | 'conflict' | 'validation_failed';
  message: string;
  field?: string;
};
export type TransitionResult = { ok: true; to: ReviewState } | TransitionRefusal;

interface Rule {
  from: readonly ReviewState[];
  to: ReviewState;
  actors: readonly ReviewActor[];
}

/** The whole machine: from which states each action leads where, and who may take it. */
export const RULES: Record<ReviewAction, Rule> = {
  submit: { from: ['draft'], to: 'submitted', actors: ['artist', 'supervisor', 'owner'] },
  approve: { from: ['submitted'], to: 'approved', actors: ['supervisor', 'owner'] },
  return: { from: ['submitted'], to: 'returned', actors: ['supervisor', 'owner'] },
  supersede: { from: ['draft', 'submitted', 'approved', 'returned'], to: 'superseded', actors: ['system'] },
};

const FORBIDDEN: Record<ReviewAction, string> = {
  submit: 'Only artists, supervisors and owners can submit a version',
  approve: 'Only a supervisor or an owner can approve a version',
  return: 'Only a supervisor or an owner can return a version',
  supersede: 'A version is superseded only when a newer version of its shot is saved',
};

const STATE_WORDS: Record<ReviewState, string> = {
  draft: 'a draft',
  submitted: 'submitted for review',
  approved: 'approved',
  returned: 'returned',
  superseded: 'superseded by a newer version',
};

/** Decides one transition: the new state, or why it is refused (and which HTTP answer fits). */
export function decideTransition(req: TransitionRequest): TransitionResult {
  const rule = RULES[req.action];
  if (!rule) return { ok: false, code: 'validation_failed', message: `Unknown review action ${String(req.action)}`, field: 'action' };
  if (!rule.actors.includes(req.actor)) {
    return { ok: false, code: 'forbidden', message: FORBIDDEN[req.action] };
  }
  if (!rule.from.includes(req.from)) {
    return { ok: false, code: 'conflict', message: `This version is ${STATE_WORDS[req.from]}, so it cannot be ${actionPast(req.action)} now` };
  }
  if (req.action === 'submit' && req.bakeState !== 'baked') {
    return { ok: false, code: 'conflict', message: 'Bake this version before submitting it: reviewers watch the baked frames' };
  }
  if (req.action === 'submit' && req.bakeHealthy === false && (req.overrideReason ?? '').trim().length < 3) {
    return {
      ok: false, code: 'validation_failed', field: 'overrideReason',
      message: 'overrideReason: this bake went wrong (see the findings above the player); re-bake it, or say why it should be reviewed as it is',
    };
  }
  if (req.action === 'return' && !(req.comment ?? '').trim()) {
    return { ok: false, code: 'validation_failed', message: 'comment: say what should change when returning a version', field: 'comment' };
  }
  return { ok: true, to: rule.to };
}

function actionPast(a: ReviewAction): string {
  return { submit: 'submitted', approve: 'approved', return: 'returned', supersede: 'superseded' }[a];
}

/**
 * The shot status after a version of it moves to `to`, or null to leave it as it is.
 * A submitted version puts the shot in review, an approved one approves it, a returned one sends it back to blocking.
 * A newer version (the older ones superseded) reopens a shot that was in review or approved; a shot a supervisor put
 * on hold or omitted keeps that status until someone changes it by hand.
 */
export function shotStatusAfter(to: ReviewState, current: ShotStatus): ShotStatus | null {
  if (current === 'omitted' || current === 'on hold') return null;
  const next: ShotStatus | null =
    to === 'submitted' ? 'in review' : to === 'approved' ? 'approved' : to === 'returned' ? 'blocking' : to === 'superseded' ? 'blocking' : null;
  return next === current ? null : next;
}

/** Which review actions the role may offer for a version in this state (for buttons; the server decides again). */
export function availableActions(role: Role, from: ReviewState, bakeState: string): ReviewAction[] {
  return (['submit', 'approve', 'return'] as const).filter((action) => {
    const r = decideTransition({ actor: role, action, from, bakeState, comment: 'x' });
    return r.ok;
  });
}

// ── The client's sign-off ────────────────────────────────────────────────────────────────────────────────────────
// Kept apart from the review state above: the studio's review decides "approved by us"; only then may a supervisor
// ask the client to sign off, and the client (an account of the studio, or a guest holding the share link) signs off
// or asks for changes. The review state machine is not touched by any of it.

/** What a person asks to do to a version's client state. */
export type ClientStep = 'send' | 'sign-off' | 'ask-changes';
export const CLIENT_STEPS: readonly ClientStep[] = ['send', 'sign-off', 'ask-changes'];
/** The client's two decisions (the API's `decision` values). */
export type ClientDecision = Exclude<ClientStep, 'send'>;
export const CLIENT_DECISIONS = ['sign-off', 'ask-changes'] as const satisfies readonly ClientDecision[];

/** Who asks: a studio role, or 'guest' for someone holding a share link. */
export type ClientActor = Role | 'guest';

export interface ClientStepRequest {
  actor: ClientActor;
  step: ClientStep;
  reviewState: ReviewState;
  clientState: ClientState;
  /** What to change (needed to ask for changes). */
  comment?: string | null;
}

/** `unchanged`: the version was already in `to` (a repeated request answers with the state already reached). */
export type ClientStepResult = { ok: true; to: ClientState; unchanged: boolean } | TransitionRefusal;

const CLIENT_STEP_TO: Record<ClientStep, ClientState> = { send: 'waiting', 'sign-off': 'signed off', 'ask-changes': 'changes asked' };
const CLIENT_STEP_ACTORS: Record<ClientStep, readonly ClientActor[]> = {
  send: ['supervisor', 'owner'],
  'sign-off': ['client', 'guest'],
  'ask-changes': ['client', 'guest'],
};

/** Decides one step of the client's sign-off: the new client state, or why it is refused (and which HTTP answer fits). */
export function decideClientStep(req: ClientStepRequest): ClientStepResult {
  const to = CLIENT_STEP_TO[req.step];
  if (!to) return { ok: false, code: 'validation_failed', message: `decision: unknown step ${String(req.step)}`, field: 'decision' };
  if (!CLIENT_STEP_ACTORS[req.step].includes(req.actor)) {
    return {
      ok: false,
      code: 'forbidden',
      message: req.step === 'send' ? 'Only a supervisor or an owner can ask the client to sign off' : 'Only the client can sign off or ask for changes',
    };
  }
  if (req.reviewState !== 'approved') {
    const why =
      req.reviewState === 'superseded'
        ? 'This version was replaced by a newer version'
        : `This version is not approved by us yet (it is ${STATE_WORDS[req.reviewState]})`;
    return {
      ok: false,
      code: 'conflict',
      message: req.step === 'send' ? `${why}: approve it in the studio before asking the client to sign off` : `${why}, so it cannot be signed off by the client now`,
    };
  }
  if (req.clientState === to) return { ok: true, to, unchanged: true };
  if (req.step === 'send') return { ok: true, to, unchanged: false };
  if (req.clientState === 'not sent') {
    return { ok: false, code: 'conflict', message: 'The studio has not asked for your sign-off on this version yet' };
  }
  if (req.clientState !== 'waiting') {
    return {
      ok: false,
      code: 'conflict',
      message: `This version is already decided (${req.clientState === 'signed off' ? 'signed off' : 'changes asked for'}): ask the studio to send it to you again to change the decision`,
    };
  }
  if (req.step === 'ask-changes' && !(req.comment ?? '').trim()) {
    return { ok: false, code: 'validation_failed', message: 'comment: say what should change', field: 'comment' };
  }
  return { ok: true, to, unchanged: false };
}

/** The client steps the actor may offer now (for buttons; the server decides again). */
export function availableClientSteps(actor: ClientActor, reviewState: ReviewState, clientState: ClientState): ClientStep[] {
  return CLIENT_STEPS.filter((step) => {
    const r = decideClientStep({ actor, step, reviewState, clientState, comment: 'x' });
    return r.ok && !r.unchanged;
  });
}
