// Studio members, invitations and password resets.
import { and, eq, gt, inArray, isNull, sql, desc } from 'drizzle-orm';
import { db } from './db';
import { clientShows, invitations, memberships, passwordResets, shows, studios, users, type Role } from './db/schema';
import { HttpError } from './http';
import { hashToken, newToken, newUserId } from './tokens';
import { hashPassword } from './password';
import { sendMail } from './mail';
import { config } from './config';
import { audit } from './audit';
import { lucia } from './auth';
import { RULES, recordAttempt } from './throttle';

export const INVITATION_HOURS = 72;
export const RESET_HOURS = 1;

/** Lists a studio's members for the members table. */
export async function listMembers(studioId: number) {
  const [rows, scopes] = await Promise.all([memberRows(studioId), db().select({ userId: clientShows.userId, showId: clientShows.showId }).from(clientShows).where(eq(clientShows.studioId, studioId))]);
  // A client member carries the shows it may see; the studio's own people see every show.
  return rows.map((m) => ({ ...m, showIds: m.role === 'client' ? scopes.filter((c) => c.userId === m.userId).map((c) => c.showId).sort((a, b) => a - b) : null }));
}

function memberRows(studioId: number) {
  return db()
    .select({
      id: memberships.id,
      userId: users.id,
      name: users.name,
      email: users.email,
      role: memberships.role,
      lastActiveAt: users.lastActiveAt,
      joinedAt: memberships.createdAt,
    })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.studioId, studioId))
    .orderBy(users.name);
}

/**
 * Changes a member's role or removes the member. Refuses (409) to leave a studio without an owner;
 * the owners are locked for the check, so two owners demoting each other at once cannot both succeed.
 */
export async function changeMember(studioId: number, memberId: number, actorId: string, change: { role: Role } | 'remove') {
  return db().transaction(async (tx) => {
    const owners = await tx
      .select({ id: memberships.id })
      .from(memberships)
      .where(and(eq(memberships.studioId, studioId), eq(memberships.role, 'owner')))
      .for('update');
    const [target] = await tx
      .select({ id: memberships.id, role: memberships.role, userId: memberships.userId })
      .from(memberships)
      .where(and(eq(memberships.id, memberId), eq(memberships.studioId, studioId)))
      .for('update');
    if (!target) throw new HttpError('not_found', 'No such member');
    const losesOwner = target.role === 'owner' && (change === 'remove' || change.role !== 'owner');
    if (losesOwner && owners.length <= 1) {
      throw new HttpError('conflict', 'A studio needs at least one owner: make someone else owner first');
    }
    if (change === 'remove') {
      await tx.delete(memberships).where(eq(memberships.id, memberId));
    } else {
      await tx.update(memberships).set({ role: change.role }).where(eq(memberships.id, memberId));
    }
    await audit({
      studioId,
      actorId,
      action: change === 'remove' ? 'member.remove' : 'member.role',
      targetType: 'user',
      targetId: target.userId,
      detail: change === 'remove' ? { role: target.role } : { from: target.role, to: change.role },
    });
    return { id: target.id, role: change === 'remove' ? null : change.role };
  });
}

/** The given show ids, checked to be shows of the studio (400 naming showIds otherwise). */
async function studioShowIds(studioId: number, showIds: number[]): Promise<number[]> {
  const ids = [...new Set(showIds)];
  if (ids.length === 0) return [];
  const found = await db().select({ id: shows.id }).from(shows).where(and(eq(shows.studioId, studioId), inArray(shows.id, ids)));
  if (found.length !== ids.length) throw new HttpError('validation_failed', 'showIds: names a show that is not in this studio', { showIds: 'names a show that is not in this studio' });
  return ids.sort((a, b) => a - b);
}

/** The shows a client member may see. */
export async function clientShowsOf(studioId: number, userId: string): Promise<number[]> {
  const rows = await db().select({ id: clientShows.showId }).from(clientShows).where(and(eq(clientShows.studioId, studioId), eq(clientShows.userId, userId)));
  return rows.map((r) => r.id).sort((a, b) => a - b);
}

/** Replaces the shows a client member may see (owner or supervisor). 404 unless the member is a client here. */
export async function setClientShows(studioId: number, memberId: number, actorId: string, showIds: number[]) {
  const ids = await studioShowIds(studioId, showIds);
  return db().transaction(async (tx) => {
    const [m] = await tx.select({ userId: memberships.userId, role: memberships.role }).from(memberships).where(and(eq(memberships.id, memberId), eq(memberships.studioId, studioId))).for('update');
    if (!m || m.role !== 'client') throw new HttpError('not_found', 'No such client member');
    await tx.delete(clientShows).where(and(eq(clientShows.studioId, studioId), eq(clientShows.userId, m.userId)));
    if (ids.length) await tx.insert(clientShows).values(ids.map((showId) => ({ studioId, userId: m.userId, showId })));
    await audit({ studioId, actorId, action: 'member.shows', targetType: 'user', targetId: m.userId, detail: { showIds: ids } });
    return { id: memberId, showIds: ids };
  });
}

/** Creates an invitation and e-mails its single-use link. Returns the invitation row (never the token). */
export async function invite(studioId: number, actorId: string, email: string, role: Role, showIds: number[] = []) {
  const scoped = role === 'client' ? await studioShowIds(studioId, showIds) : null;
  const [studio] = await db().select().from(studios).where(eq(studios.id, studioId));
  const [already] = await db()
    .select({ id: memberships.id })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.studioId, studioId), eq(users.email, email)));
  if (already) throw new HttpError('conflict', `${email} is already a member of this studio`, { email: 'is already a member' });
  const [inviter] = await db().select({ name: users.name }).from(users).where(eq(users.id, actorId));
  const token = newToken();
  const expiresAt = new Date(Date.now() + INVITATION_HOURS * 3600_000);
  const [res] = await db().insert(invitations).values({ studioId, email, role, tokenHash: hashToken(token), invitedBy: actorId, expiresAt, showIds: scoped });
  const url = `${config.appUrl}/invite/${token}`;
  await sendMail({
    to: email,
    subject: `${inviter?.name ?? 'Someone'} invited you to ${studio.name} on Tidemark`,
    paragraphs: [
      `${inviter?.name ?? 'A studio owner'} invited you to join ${studio.name} on Tidemark as ${role === 'artist' || role === 'owner' ? 'an' : 'a'} ${role}.`,
      `Tidemark is where the studio blocks, bakes and reviews its liquid shots. The link below works once and expires in ${INVITATION_HOURS} hours.`,
    ],
    action: { label: 'Join the studio', url },
  });
  await audit({ studioId, actorId, action: 'invitation.create', targetType: 'invitation', targetId: res.insertId, detail: { email, role, showIds: scoped } });
  return { id: Number(res.insertId), email, role, showIds: scoped, expiresAt };
}

export async function listInvitations(studioId: number) {
  return db()
    .select({
      id: invitations.id,
      email: invitations.email,
      role: invitations.role,
      showIds: invitations.showIds,
      expiresAt: invitations.expiresAt,
      acceptedAt: invitations.acceptedAt,
      revokedAt: invitations.revokedAt,
      createdAt: invitations.createdAt,
    })
    .from(invitations)
    .where(eq(invitations.studioId, studioId))
    .orderBy(desc(invitations.createdAt))
    .limit(200);
}

export async function revokeInvitation(studioId: number, invitationId: number, actorId: string) {
  const [res] = await db()
    .update(invitations)
    .set({ revokedAt: new Date() })
    .where(and(eq(invitations.id, invitationId), eq(invitations.studioId, studioId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)));
  if (res.affectedRows === 0) throw new HttpError('not_found', 'No open invitation with that id');
  await audit({ studioId, actorId, action: 'invitation.revoke', targetType: 'invitation', targetId: invitationId });
}

/** Looks up an open invitation by its token; throws 410 when it was used, revoked or has expired. */
export async function openInvitation(token: string) {
  const [row] = await db()
    .select({
      id: invitations.id,
      studioId: invitations.studioId,
      studioName: studios.name,
      studioSlug: studios.slug,
      email: invitations.email,
      role: invitations.role,
      showIds: invitations.showIds,
      expiresAt: invitations.expiresAt,
      acceptedAt: invitations.acceptedAt,
      revokedAt: invitations.revokedAt,
    })
    .from(invitations)
    .innerJoin(studios, eq(studios.id, invitations.studioId))
    .where(eq(invitations.tokenHash, hashToken(token)));
  if (!row) throw new HttpError('not_found', 'This invitation link is not valid');
  if (row.acceptedAt) throw new HttpError('gone', 'This invitation was already used');
  if (row.revokedAt) throw new HttpError('gone', 'This invitation was withdrawn');
  if (row.expiresAt.getTime() < Date.now()) throw new HttpError('gone', 'This invitation has expired: ask the studio for a new one');
  const [existing] = await db().select({ id: users.id }).from(users).where(eq(users.email, row.email));
  return { ...row, accountExists: Boolean(existing) };
}

/**
 * Accepts an invitation: adds the membership to the signed-in account with the invited e-mail,
 * or creates the account. The invitation is claimed with a conditional update so it works once only.
 */
export async function acceptInvitation(token: string, signedInUserId: string | null, newAccount: { name?: string; password?: string }) {
  const inv = await openInvitation(token);
  const passwordHash = newAccount.password ? await hashPassword(newAccount.password) : null;
  const userId = await db().transaction(async (tx) => {
    const [claimed] = await tx
      .update(invitations)
      .set({ acceptedAt: new Date() })
      .where(and(eq(invitations.id, inv.id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, new Date())));
    if (claimed.affectedRows !== 1) throw new HttpError('gone', 'This invitation was already used');
    const [existing] = await tx.select({ id: users.id }).from(users).where(eq(users.email, inv.email));
    let uid: string;
    if (existing) {
      if (signedInUserId !== existing.id) {
        throw new HttpError('forbidden', `Sign in as ${inv.email} first, then open the link again`);
      }
      uid = existing.id;
    } else {
      if (signedInUserId) {
        throw new HttpError('conflict', `This invitation is for ${inv.email}: sign out first, then open the link again`);
      }
      const fields: Record<string, string> = {};
      if (!newAccount.name) fields.name = 'is required';
      if (!passwordHash) fields.password = 'is required';
      if (Object.keys(fields).length) throw new HttpError('validation_failed', 'Choose a name and a password', fields);
      uid = newUserId();
      await tx.insert(users).values({ id: uid, email: inv.email, name: newAccount.name!, passwordHash: passwordHash! });
    }
    await tx
      .insert(memberships)
      .values({ studioId: inv.studioId, userId: uid, role: inv.role })
      .onDuplicateKeyUpdate({ set: { role: sql`${memberships.role}` } });
    // A client membership sees the shows its invitation named, and no others.
    if (inv.role === 'client' && inv.showIds?.length) {
      const live = await tx.select({ id: shows.id }).from(shows).where(and(eq(shows.studioId, inv.studioId), inArray(shows.id, inv.showIds)));
      if (live.length) await tx.insert(clientShows).values(live.map((s) => ({ studioId: inv.studioId, userId: uid, showId: s.id }))).onDuplicateKeyUpdate({ set: { showId: sql`${clientShows.showId}` } });
    }
    return uid;
  });
  await audit({ studioId: inv.studioId, actorId: userId, action: 'invitation.accept', targetType: 'invitation', targetId: inv.id });
  return { userId, studioSlug: inv.studioSlug };
}

/**
 * Starts a password reset for the client at `address`. The caller answers the same whatever happens here, and in the
 * same time: after the throttle and the account lookup (done for every address) the rest — voiding older links,
 * the new link, the e-mail — runs after the answer, so neither a known account nor a slow or down SMTP server shows.
 * At most RULES.resetEmail.limit mails per e-mail address and RULES.resetAddress.limit requests per client an hour.
 */
export async function requestPasswordReset(email: string, address: string): Promise<void> {
  const attempt = await recordAttempt([
    { rule: RULES.resetEmail, key: email },
    { rule: RULES.resetAddress, key: address },
  ]);
  const [user] = await db().select({ id: users.id, name: users.name }).from(users).where(eq(users.email, email));
  if (!attempt.allowed || !user) return;
  void sendPasswordReset(user, email).catch((err) => console.error('[password reset] could not send the link:', err));
}

async function sendPasswordReset(user: { id: string; name: string }, email: string) {
  const token = newToken();
  await db().transaction(async (tx) => {
    // A new link voids every older one still unused.
    await tx.update(passwordResets).set({ usedAt: new Date() }).where(and(eq(passwordResets.userId, user.id), isNull(passwordResets.usedAt)));
    await tx.insert(passwordResets).values({ userId: user.id, tokenHash: hashToken(token), expiresAt: new Date(Date.now() + RESET_HOURS * 3600_000) });
  });
  await audit({ studioId: null, actorId: user.id, action: 'password.reset_requested' });
  await sendMail({
    to: email,
    subject: 'Choose a new Tidemark password',
    paragraphs: [
      `Hello ${user.name},`,
      `Someone (hopefully you) asked to choose a new password for ${email}. The link works once and expires in ${RESET_HOURS} hour.`,
      'If it was not you, ignore this message: your password stays as it is.',
    ],
    action: { label: 'Choose a new password', url: `${config.appUrl}/reset-password/${token}` },
  });
}

/** Completes a reset: sets the password, uses up the token and signs the account out everywhere. */
export async function completePasswordReset(token: string, password: string) {
  const [row] = await db().select().from(passwordResets).where(eq(passwordResets.tokenHash, hashToken(token)));
  if (!row || row.usedAt || row.expiresAt.getTime() < Date.now()) {
    throw new HttpError('gone', 'This reset link is used or has expired: ask for a new one', { token: 'is used or expired' });
  }
  const passwordHash = await hashPassword(password);
  await db().transaction(async (tx) => {
    const [claimed] = await tx
      .update(passwordResets)
      .set({ usedAt: new Date() })
      .where(and(eq(passwordResets.id, row.id), isNull(passwordResets.usedAt)));
    if (claimed.affectedRows !== 1) throw new HttpError('gone', 'This reset link was already used', { token: 'is used or expired' });
    await tx.update(users).set({ passwordHash }).where(eq(users.id, row.userId));
  });
  await lucia().invalidateUserSessions(row.userId);
  await audit({ studioId: null, actorId: row.userId, action: 'password.reset' });
}
