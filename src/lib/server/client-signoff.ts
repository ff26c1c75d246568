// The client's sign-off of a version, apart from the studio's review: a supervisor asks for it once the version is
// approved by us (it is then shown to the show's client accounts and they are e-mailed), and the client signs off or
// asks for changes, signed in or as a guest holding the version's share link. Each step is decided by
// decideClientStep (src/lib/review/states.ts) on the locked row, audited, and told by e-mail after the commit.
import { and, eq } from 'drizzle-orm';
import { db } from './db';
import { auditLog, shots, users, versions } from './db/schema';
import { HttpError } from './http';
import type { StudioAccess } from './authz';
import { loadVersion } from './access';
import type { OpenedShare } from './share';
import { notifyClientDecision, notifyClientsAsked, notifyDeciderConfirmation } from './notify';
import { decideClientStep, type ClientActor, type ClientDecision, type ClientStep } from '../review/states';
import type { ClientState } from '../vocab';

type VersionRow = typeof versions.$inferSelect;

/** The client side of a version as every screen shows it (no studio-internal fields: the client may see all of it). */
export function clientSignOffView(v: Pick<VersionRow, 'clientState' | 'clientSentAt' | 'clientDecidedAt' | 'clientDeciderName' | 'clientComment'>) {
  return {
    clientState: v.clientState,
    clientSentAt: v.clientSentAt?.toISOString() ?? null,
    clientDecidedAt: v.clientDecidedAt?.toISOString() ?? null,
    clientDecidedByName: v.clientDeciderName ?? null,
    clientComment: v.clientComment ?? null,
  };
}
export type ClientSignOffView = ReturnType<typeof clientSignOffView>;

/** Who takes a step: a signed-in member (access), or a guest with a share link (the name they typed). */
type Decider = { access: StudioAccess } | { guest: { name: string; studioId: number; shareLinkId: number } };

/**
 * Takes one client step on a version in one transaction: locks the row, decides on its locked state, writes the new
 * client state and the audit entry. A repeated identical step changes nothing and answers with the state reached.
 */
async function takeStep(decider: Decider, versionId: number, step: ClientStep, comment: string | null) {
  const studioId = 'access' in decider ? decider.access.studioId : decider.guest.studioId;
  const actor: ClientActor = 'access' in decider ? decider.access.role : 'guest';
  const actorId = 'access' in decider ? decider.access.userId : null;
  return db().transaction(async (tx) => {
    const [v] = await tx.select().from(versions).where(and(eq(versions.id, versionId), eq(versions.studioId, studioId))).for('update');
    if (!v) throw new HttpError('not_found', 'No such version');
    const decision = decideClientStep({ actor, step, reviewState: v.reviewState, clientState: v.clientState, comment });
    if (!decision.ok) {
      const extra = { reviewState: v.reviewState, clientState: v.clientState };
      if (decision.code === 'conflict') throw new HttpError('conflict', decision.message, undefined, extra);
      throw new HttpError(decision.code, decision.message, decision.field ? { [decision.field]: decision.message.replace(/^\w+: /, '') } : undefined);
    }
    if (!decision.unchanged) {
      let deciderName: string | null = null;
      if (step !== 'send') {
        if ('guest' in decider) deciderName = decider.guest.name;
        else {
          const [u] = await tx.select({ name: users.name }).from(users).where(eq(users.id, decider.access.userId));
          deciderName = u?.name ?? null;
        }
      }
      const now = new Date();
      const set =
        step === 'send'
          ? // asking (again) clears the last decision: the audit log keeps it; the client accounts of the show see the version
            { clientState: decision.to, clientSentAt: now, clientDecidedAt: null, clientDecidedBy: null, clientDeciderName: null, clientComment: null, sharedWithClient: true }
          : { clientState: decision.to, clientDecidedAt: now, clientDecidedBy: actorId, clientDeciderName: deciderName, clientComment: step === 'ask-changes' ? comment?.trim() ?? null : null };
      await tx.update(versions).set(set).where(and(eq(versions.id, versionId), eq(versions.clientState, v.clientState)));
      await tx.insert(auditLog).values({
        studioId,
        actorId,
        action: `version.client.${step}`,
        targetType: 'version',
        targetId: String(versionId),
        detail: {
          from: v.clientState,
          to: decision.to,
          ...(comment ? { comment } : {}),
          ...('guest' in decider ? { guestName: decider.guest.name, shareLinkId: decider.guest.shareLinkId } : {}),
        },
      });
    }
    const [fresh] = await tx.select().from(versions).where(eq(versions.id, versionId));
    return { version: fresh, from: v.clientState as ClientState, unchanged: decision.unchanged };
  });
}

function tell(p: Promise<unknown>, versionId: number) {
  void p.catch((err) => console.error(`[client sign-off] e-mail for version ${versionId} failed:`, err));
}

/** A supervisor asks the client to sign off an approved version (409 before internal approval). */
export async function askClientSignOff(access: StudioAccess, versionId: number, message: string | null) {
  const r = await takeStep({ access }, versionId, 'send', null);
  if (!r.unchanged) tell(notifyClientsAsked(versionId, access.userId, message), versionId);
  return { version: clientSignOffView(r.version), unchanged: r.unchanged };
}

/** A signed-in client's decision on a version shared with them (404 for anything the access policy hides). */
export async function clientDecides(access: StudioAccess, versionId: number, decision: ClientDecision, comment: string | null) {
  // the one access policy: a client reaches only versions shared with it, past draft, of live shots in its shows
  await loadVersion(access, versionId);
  const r = await takeStep({ access }, versionId, decision, comment);
  if (!r.unchanged) {
    tell(notifyClientDecision(versionId), versionId);
    const [me] = await db().select({ email: users.email, name: users.name }).from(users).where(eq(users.id, access.userId));
    if (me) tell(notifyDeciderConfirmation(versionId, me), versionId);
  }
  return { version: clientSignOffView(r.version), unchanged: r.unchanged };
}

/** A guest's decision through a share link (the link is what is shared with them; an archived shot opens nothing). */
export async function guestDecides(opened: OpenedShare, body: { name: string; decision: ClientDecision; comment?: string; email?: string }, shareUrl?: string) {
  const [shot] = await db().select({ archivedAt: shots.archivedAt }).from(shots).where(eq(shots.id, opened.version.shotId));
  if (!shot || shot.archivedAt) throw new HttpError('not_found', 'This link does not open anything. Check that it was copied whole, or ask the studio for a new one.');
  const r = await takeStep(
    { guest: { name: body.name, studioId: opened.link.studioId, shareLinkId: opened.link.id } },
    opened.version.id,
    body.decision,
    body.comment ?? null,
  );
  let confirmationTo: string | null = null;
  if (!r.unchanged) {
    tell(notifyClientDecision(opened.version.id), opened.version.id);
    // the guest's confirmation goes to the address they typed, the only one we have for them
    if (body.email) {
      confirmationTo = body.email;
      tell(notifyDeciderConfirmation(opened.version.id, { email: body.email, name: body.name }, shareUrl), opened.version.id);
    }
  }
  return { version: clientSignOffView(r.version), unchanged: r.unchanged, confirmationTo };
}
