// Review e-mails: supervisors and owners hear when a version is submitted, its author hears when it is approved or
// returned (with the comment and a link to each note's frame), the show's clients hear when their sign-off is asked
// for, supervisors, owners and the author hear the client's decision, and people who opted in get a daily digest.
// Every link points at a page of the app, which sends a signed-out reader through sign-in first.
import { and, asc, desc, eq, gte, inArray, isNull, ne } from 'drizzle-orm';
import { db } from './db';
import { clientShows, memberships, notes, reviewEvents, shots, shows, studios, users, versions } from './db/schema';
import { sendMail } from './mail';
import { config } from './config';
import { clientVersionIds } from './access';
import type { StudioAccess } from './authz';
import type { Role } from '../vocab';
import { clientStateWord, reviewStateWord, versionLabel } from '../vocab';
import { frameWithTimecode } from '../timecode';

/** The version page, optionally opened at a frame. */
export function versionUrl(studioSlug: string, versionId: number, frame?: number): string {
  return `${config.appUrl}/studios/${studioSlug}/versions/${versionId}${frame !== undefined ? `?frame=${frame}` : ''}`;
}

/** The studio members with one of the roles, with their e-mail. */
export async function membersWithRoles(studioId: number, roles: Role[]) {
  return db()
    .select({ id: users.id, email: users.email, name: users.name, role: memberships.role })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.studioId, studioId), inArray(memberships.role, roles)));
}

/** A version with its shot, show, studio and author, for e-mails. */
export async function versionContext(versionId: number) {
  const [row] = await db()
    .select({
      versionId: versions.id,
      number: versions.number,
      studioId: versions.studioId,
      authorId: versions.authorId,
      shotCode: shots.code,
      // The shot's cut in, rate and source timecode at the cut in: a note's frame is written with its source timecode.
      firstFrame: shots.firstFrame,
      frameRate: shots.frameRate,
      sourceTimecodeIn: shots.sourceTimecodeIn,
      showId: shows.id,
      showCode: shows.code,
      studioSlug: studios.slug,
      studioName: studios.name,
      authorEmail: users.email,
      authorName: users.name,
    })
    .from(versions)
    .innerJoin(shots, eq(shots.id, versions.shotId))
    .innerJoin(shows, eq(shows.id, shots.showId))
    .innerJoin(studios, eq(studios.id, versions.studioId))
    .leftJoin(users, eq(users.id, versions.authorId))
    .where(eq(versions.id, versionId));
  return row ?? null;
}

async function nameOf(userId: string | null): Promise<string> {
  if (!userId) return 'Someone';
  const [u] = await db().select({ name: users.name }).from(users).where(eq(users.id, userId));
  return u?.name ?? 'Someone';
}

const label = (c: { showCode: string; shotCode: string; number: number }) => `${c.showCode} / ${c.shotCode} ${versionLabel(c.number)}`;

/** Tells the studio's supervisors and owners (not the person who submitted) that a version waits for review. */
export async function notifySubmitted(versionId: number, actorId: string): Promise<number> {
  const c = await versionContext(versionId);
  if (!c) return 0;
  const [actor, people] = await Promise.all([nameOf(actorId), membersWithRoles(c.studioId, ['supervisor', 'owner'])]);
  const [event] = await db()
    .select({ comment: reviewEvents.comment })
    .from(reviewEvents)
    .where(and(eq(reviewEvents.versionId, versionId), eq(reviewEvents.toState, 'submitted')))
    .orderBy(desc(reviewEvents.id))
    .limit(1);
  const to = people.filter((p) => p.id !== actorId);
  for (const p of to) {
    await sendMail({
      to: p.email,
      subject: `Ready for your eyes: ${label(c)}`,
      paragraphs: [
        `Hello ${p.name},`,
        `${actor} submitted ${versionLabel(c.number)} of shot ${c.shotCode} (${c.showCode}) in ${c.studioName}. It is baked and waits for your decision.`,
        ...(event?.comment ? [`Their words: “${event.comment}”`] : []),
        'Open it to play the bake over the plate, pin notes to frames, compare it with the last version, and approve it or send it back.',
      ],
      action: { label: `Open ${c.shotCode} ${versionLabel(c.number)}`, url: versionUrl(c.studioSlug, versionId) },
    });
  }
  return to.length;
}

/**
 * Tells a version's author that it was approved or returned: the decision's comment, and every open note on the
 * version with a link to its frame. Nothing is sent when the author made the decision themselves.
 */
export async function notifyDecision(versionId: number, actorId: string, comment: string | null): Promise<boolean> {
  const c = await versionContext(versionId);
  if (!c || !c.authorEmail || c.authorId === actorId) return false;
  const [state] = await db().select({ reviewState: versions.reviewState }).from(versions).where(eq(versions.id, versionId));
  const approved = state?.reviewState === 'approved';
  const actor = await nameOf(actorId);
  const open = await db()
    .select({ frame: notes.frame, body: notes.body, authorName: users.name })
    .from(notes)
    .leftJoin(users, eq(users.id, notes.authorId))
    .where(and(eq(notes.versionId, versionId), isNull(notes.parentId), isNull(notes.resolvedAt)))
    .orderBy(asc(notes.frame), asc(notes.id))
    .limit(50);
  const short = (s: string) => (s.length > 240 ? `${s.slice(0, 237)}…` : s);
  const paragraphs = [
    `Hello ${c.authorName ?? ''},`.replace(' ,', ','),
    approved
      ? `${actor} approved ${versionLabel(c.number)} of shot ${c.shotCode} (${c.showCode}). Nice work.`
      : `${actor} sent ${versionLabel(c.number)} of shot ${c.shotCode} (${c.showCode}) back for changes.`,
    ...(comment ? [`${approved ? 'Comment' : 'What to change'}: “${comment}”`] : []),
    ...(open.length
      ? [
          `${open.length === 1 ? 'One note is' : `${open.length} notes are`} pinned to frames of this version. Each link opens the version at that frame:`,
          ...open.map((n) => `Frame ${frameWithTimecode(c, n.frame)} — ${n.authorName ?? 'a reviewer'}: ${short(n.body)}\n${versionUrl(c.studioSlug, versionId, n.frame)}`),
        ]
      : []),
    approved ? 'The shot is marked approved.' : 'Save a new version of the shot when you have made the changes, bake it and submit it again.',
  ];
  await sendMail({
    to: c.authorEmail,
    subject: approved ? `Approved: ${label(c)}` : `Back for changes: ${label(c)}`,
    paragraphs,
    action: { label: open.length ? `Open frame ${frameWithTimecode(c, open[0].frame)}` : `Open ${c.shotCode} ${versionLabel(c.number)}`, url: versionUrl(c.studioSlug, versionId, open[0]?.frame) },
  });
  return true;
}

// ── Client sign-off ──────────────────────────────────────────────────────────────────────────────────────────────

/** Asks the client accounts of the version's show (client_shows) to sign it off. Returns how many were written to. */
export async function notifyClientsAsked(versionId: number, actorId: string, message: string | null): Promise<number> {
  const c = await versionContext(versionId);
  if (!c) return 0;
  const [actor, people] = await Promise.all([
    nameOf(actorId),
    db()
      .select({ id: users.id, email: users.email, name: users.name })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .innerJoin(clientShows, and(eq(clientShows.userId, memberships.userId), eq(clientShows.studioId, memberships.studioId)))
      .where(and(eq(memberships.studioId, c.studioId), eq(memberships.role, 'client'), eq(clientShows.showId, c.showId))),
  ]);
  for (const p of people) {
    await sendMail({
      to: p.email,
      subject: `Your sign-off, please: ${label(c)}`,
      paragraphs: [
        `Hello ${p.name},`,
        `${actor} at ${c.studioName} approved ${versionLabel(c.number)} of shot ${c.shotCode} (${c.showCode}) and asks for your sign-off.`,
        ...(message ? [`Their words: “${message}”`] : []),
        'Open it to play the previs, then choose Sign off, or Ask for changes and say what should change.',
      ],
      action: { label: `Open ${c.shotCode} ${versionLabel(c.number)}`, url: versionUrl(c.studioSlug, versionId) },
    });
  }
  return people.length;
}

/** Tells the studio's supervisors and owners, and the version's author, that the client signed off or asked for changes. */
export async function notifyClientDecision(versionId: number): Promise<number> {
  const c = await versionContext(versionId);
  if (!c) return 0;
  const [v] = await db()
    .select({ clientState: versions.clientState, by: versions.clientDecidedBy, name: versions.clientDeciderName, comment: versions.clientComment })
    .from(versions)
    .where(eq(versions.id, versionId));
  if (!v || (v.clientState !== 'signed off' && v.clientState !== 'changes asked')) return 0;
  const people = await membersWithRoles(c.studioId, ['supervisor', 'owner']);
  if (c.authorId && c.authorEmail && !people.some((p) => p.id === c.authorId)) people.push({ id: c.authorId, email: c.authorEmail, name: c.authorName ?? '', role: 'artist' });
  const signedOff = v.clientState === 'signed off';
  const who = v.name ?? 'The client';
  for (const p of people) {
    await sendMail({
      to: p.email,
      subject: `${clientStateWord(v.clientState)}: ${label(c)}`,
      paragraphs: [
        `Hello ${p.name},`.replace(' ,', ','),
        signedOff
          ? `${who} signed off ${versionLabel(c.number)} of shot ${c.shotCode} (${c.showCode}).`
          : `${who} asked for changes to ${versionLabel(c.number)} of shot ${c.shotCode} (${c.showCode}).`,
        ...(v.comment ? [`What to change: “${v.comment}”`] : []),
        signedOff ? 'The version now counts as signed off by the client, for the turnover to editorial too.' : 'Save a new version of the shot with the changes, get it approved and ask the client again.',
      ],
      action: { label: `Open ${c.shotCode} ${versionLabel(c.number)}`, url: versionUrl(c.studioSlug, versionId) },
    });
  }
  return people.length;
}

/**
 * Confirms a client's decision to the person who took it: a client account's own address, or the address a guest
 * gave on the share page. `shareUrl` (a guest's link) is where they can see the version again.
 */
export async function notifyDeciderConfirmation(versionId: number, to: { email: string; name: string }, shareUrl?: string): Promise<boolean> {
  const c = await versionContext(versionId);
  if (!c) return false;
  const [v] = await db().select({ clientState: versions.clientState, comment: versions.clientComment }).from(versions).where(eq(versions.id, versionId));
  if (!v || (v.clientState !== 'signed off' && v.clientState !== 'changes asked')) return false;
  const signedOff = v.clientState === 'signed off';
  await sendMail({
    to: to.email,
    subject: `${signedOff ? 'You signed off' : 'You asked for changes to'} ${c.shotCode} ${versionLabel(c.number)}`,
    paragraphs: [
      `Hello ${to.name},`.replace(' ,', ','),
      signedOff
        ? `This confirms that you signed off ${versionLabel(c.number)} of shot ${c.shotCode} (${c.showCode}) for ${c.studioName}.`
        : `This confirms that you asked ${c.studioName} for changes to ${versionLabel(c.number)} of shot ${c.shotCode} (${c.showCode}).`,
      ...(v.comment ? [`What you asked for: “${v.comment}”`] : []),
      signedOff ? 'The studio has been told. Nothing more is needed from you for this version.' : 'The studio has been told and will send a new version for your sign-off.',
    ],
    action: shareUrl ? { label: `Open ${c.shotCode} ${versionLabel(c.number)}`, url: shareUrl } : { label: `Open ${c.shotCode} ${versionLabel(c.number)}`, url: versionUrl(c.studioSlug, versionId) },
  });
  return true;
}

// ── Daily digest ─────────────────────────────────────────────────────────────────────────────────────────────────


/**
 * Sends each person who opted in (users.daily_digest) one e-mail summing up the review activity of the window in
 * every studio they belong to: decisions on versions they may see, versions waiting for them, notes on their
 * versions. People with nothing to read get nothing. Returns who was written to.
 */
export async function sendDigests(opts: { now?: Date; hours?: number; dryRun?: boolean } = {}) {
  const now = opts.now ?? new Date();
  const since = new Date(now.getTime() - (opts.hours ?? 24) * 3600_000);
  const readers = await db()
    .select({ userId: users.id, email: users.email, name: users.name, studioId: memberships.studioId, role: memberships.role, slug: studios.slug, studioName: studios.name })
    .from(users)
    .innerJoin(memberships, eq(memberships.userId, users.id))
    .innerJoin(studios, eq(studios.id, memberships.studioId))
    .where(eq(users.dailyDigest, true))
    .orderBy(users.id, studios.name);
  const byUser = new Map<string, typeof readers>();
  for (const r of readers) byUser.set(r.userId, [...(byUser.get(r.userId) ?? []), r]);

  const sent: { email: string; lines: number }[] = [];
  for (const rows of byUser.values()) {
    const paragraphs: string[] = [];
    for (const m of rows) {
      const client = m.role === 'client';
      const events = await db()
        .select({ versionId: versions.id, number: versions.number, shotCode: shots.code, showCode: shows.code, toState: reviewEvents.toState, actorName: users.name })
        .from(reviewEvents)
        .innerJoin(versions, eq(versions.id, reviewEvents.versionId))
        .innerJoin(shots, eq(shots.id, versions.shotId))
        .innerJoin(shows, eq(shows.id, shots.showId))
        .leftJoin(users, eq(users.id, reviewEvents.actorId))
        .where(
          and(
            eq(reviewEvents.studioId, m.studioId),
            gte(reviewEvents.createdAt, since),
            ne(reviewEvents.toState, 'superseded'),
            ...(client ? [inArray(versions.id, clientVersionIds({ studioId: m.studioId, userId: m.userId, role: m.role } as StudioAccess))] : []),
          ),
        )
        .orderBy(asc(reviewEvents.id))
        .limit(100);
      const waiting =
        m.role === 'supervisor' || m.role === 'owner'
          ? await db()
              .select({ versionId: versions.id })
              .from(versions)
              .where(and(eq(versions.studioId, m.studioId), eq(versions.reviewState, 'submitted')))
          : [];
      const newNotes = client
        ? []
        : await db()
            .select({ versionId: versions.id, frame: notes.frame })
            .from(notes)
            .innerJoin(versions, eq(versions.id, notes.versionId))
            .where(and(eq(notes.studioId, m.studioId), eq(versions.authorId, m.userId), ne(notes.authorId, m.userId), gte(notes.createdAt, since)));
      // the client's sign-off: a client reads what was sent to them; the studio reads the client's decisions
      const signOff = await db()
        .select({ versionId: versions.id, number: versions.number, shotCode: shots.code, showCode: shows.code, clientState: versions.clientState, by: versions.clientDeciderName })
        .from(versions)
        .innerJoin(shots, eq(shots.id, versions.shotId))
        .innerJoin(shows, eq(shows.id, shots.showId))
        .where(
          client
            ? and(eq(versions.clientState, 'waiting'), gte(versions.clientSentAt, since), inArray(versions.id, clientVersionIds({ studioId: m.studioId, userId: m.userId, role: m.role } as StudioAccess)))
            : and(eq(versions.studioId, m.studioId), inArray(versions.clientState, ['signed off', 'changes asked']), gte(versions.clientDecidedAt, since)),
        )
        .orderBy(asc(versions.id))
        .limit(100);
      if (!events.length && !waiting.length && !newNotes.length && !signOff.length) continue;
      paragraphs.push(`In ${m.studioName}:`);
      for (const e of events) {
        paragraphs.push(`• ${e.showCode} / ${e.shotCode} ${versionLabel(e.number)} — ${reviewStateWord(e.toState)}${e.actorName ? ` (${e.actorName})` : ''} — ${versionUrl(m.slug, e.versionId)}`);
      }
      for (const v of signOff) {
        paragraphs.push(`• ${v.showCode} / ${v.shotCode} ${versionLabel(v.number)} — ${clientStateWord(v.clientState)}${v.by ? ` (${v.by})` : ''} — ${versionUrl(m.slug, v.versionId)}`);
      }
      if (waiting.length) paragraphs.push(`• ${waiting.length === 1 ? 'One version waits' : `${waiting.length} versions wait`} for your decision.`);
      if (newNotes.length) {
        const versionsWithNotes = new Set(newNotes.map((n) => n.versionId)).size;
        paragraphs.push(`• ${newNotes.length === 1 ? 'One new note' : `${newNotes.length} new notes`} on ${versionsWithNotes === 1 ? 'one of your versions' : `${versionsWithNotes} of your versions`}.`);
      }
    }
    if (!paragraphs.length) continue;
    const who = rows[0];
    const inbox = `${config.appUrl}/studios/${rows[0].slug}/inbox`;
    if (!opts.dryRun) {
      await sendMail({
        to: who.email,
        subject: 'Your Tidemark review day',
        paragraphs: [`Hello ${who.name},`, 'Here is what moved in review since yesterday.', ...paragraphs, 'You get this once a day because you asked for it; switch it off on your inbox page.'],
        action: { label: 'Open your inbox', url: inbox },
      });
    }
    sent.push({ email: who.email, lines: paragraphs.length });
  }
  return { since, sent };
}

/** The person's e-mail preferences. */
export async function preferencesOf(userId: string) {
  const [u] = await db().select({ dailyDigest: users.dailyDigest }).from(users).where(eq(users.id, userId));
  return { dailyDigest: Boolean(u?.dailyDigest) };
}

/** Switches the daily digest on or off for the person. */
export async function setDailyDigest(userId: string, on: boolean) {
  await db().update(users).set({ dailyDigest: on }).where(eq(users.id, userId));
  return preferencesOf(userId);
}
