// Client comments reach the studio by e-mail, batched: a comment left through a share link or from a client account
// waits in the outbox (notes.client_source set, notes.mailed_at null); the version's artist and the supervisors and
// owners get one mail per version per window (versions.client_notes_mailed_at) listing every comment waiting, each
// marked with where it came from. The outbox and the timestamp live in the database, so a restart loses nothing: the
// server sweeps the outbox on a timer from boot, and a new comment sends at once when its version's window is open.
import { and, asc, eq, inArray, isNotNull, isNull } from 'drizzle-orm';
import { db } from './db';
import { notes, users, versions } from './db/schema';
import { sendMail } from './mail';
import { membersWithRoles, versionContext, versionUrl } from './notify';
import { versionLabel } from '../vocab';
import { frameWithTimecode } from '../timecode';

/** At most one mail per version in this time (10 minutes: issue 15's rule). */
export const CLIENT_NOTE_MAIL_WINDOW_MS = 10 * 60_000;

/** How the mail says where a comment came from. */
const SOURCE_WORDS = { 'share link': 'via the share link', 'client account': 'from their client account' } as const;

/** Sends the mail of one version if its window is open; true when a mail went out. */
async function sendForVersion(versionId: number, now: Date, windowMs: number): Promise<boolean> {
  return db().transaction(async (tx) => {
    // the version row is the lock: two sweeps (or a sweep and a new comment) never mail the same batch twice
    const [v] = await tx.select({ id: versions.id, mailedAt: versions.clientNotesMailedAt }).from(versions).where(eq(versions.id, versionId)).for('update');
    if (!v) return false;
    if (v.mailedAt && now.getTime() - v.mailedAt.getTime() < windowMs) return false;
    const waiting = await tx
      .select({ id: notes.id, frame: notes.frame, body: notes.body, source: notes.clientSource, guestName: notes.guestName, authorName: users.name })
      .from(notes)
      .leftJoin(users, eq(users.id, notes.authorId))
      .where(and(eq(notes.versionId, versionId), isNotNull(notes.clientSource), isNull(notes.mailedAt)))
      .orderBy(asc(notes.createdAt), asc(notes.id))
      .for('update');
    if (!waiting.length) return false;
    const c = await versionContext(versionId);
    if (!c) return false;
    const people = await membersWithRoles(c.studioId, ['supervisor', 'owner']);
    if (c.authorId && c.authorEmail && !people.some((p) => p.id === c.authorId)) people.push({ id: c.authorId, email: c.authorEmail, name: c.authorName ?? '', role: 'artist' });
    await tx.update(notes).set({ mailedAt: now }).where(inArray(notes.id, waiting.map((n) => n.id)));
    await tx.update(versions).set({ clientNotesMailedAt: now }).where(eq(versions.id, versionId));
    const short = (s: string) => (s.length > 400 ? `${s.slice(0, 397)}…` : s);
    const what = `${versionLabel(c.number)} of shot ${c.shotCode} (${c.showCode})`;
    // sent inside the transaction: a mail that fails rolls the outbox back, and the next sweep tries again
    for (const p of people) {
      await sendMail({
        to: p.email,
        subject: `Client ${waiting.length === 1 ? 'comment' : `comments (${waiting.length})`}: ${c.showCode} / ${c.shotCode} ${versionLabel(c.number)}`,
        paragraphs: [
          `Hello ${p.name},`.replace(' ,', ','),
          waiting.length === 1 ? `The client left a comment on ${what}:` : `The client left ${waiting.length} comments on ${what}:`,
          ...waiting.map(
            (n) =>
              `Frame ${frameWithTimecode(c, n.frame)} — ${n.guestName ?? n.authorName ?? 'the client'}, ${SOURCE_WORDS[n.source ?? 'share link']}: ${short(n.body)}\n${versionUrl(c.studioSlug, versionId, n.frame)}`,
          ),
          `Comments on one version come in one mail at most every ${Math.round(windowMs / 60_000)} minutes.`,
        ],
        action: { label: `Open ${c.shotCode} ${versionLabel(c.number)}`, url: versionUrl(c.studioSlug, versionId, waiting[0].frame) },
      });
    }
    return true;
  });
}

/**
 * Sends every version's waiting client comments whose window is open (or only `versionId`'s). Returns the versions
 * mailed about. Safe to run from several processes at once.
 */
export async function sendClientNoteMails(opts: { versionId?: number; now?: Date; windowMs?: number } = {}): Promise<number[]> {
  const now = opts.now ?? new Date();
  const windowMs = opts.windowMs ?? CLIENT_NOTE_MAIL_WINDOW_MS;
  const pending = await db()
    .selectDistinct({ versionId: notes.versionId })
    .from(notes)
    .where(and(isNotNull(notes.clientSource), isNull(notes.mailedAt), opts.versionId !== undefined ? eq(notes.versionId, opts.versionId) : undefined));
  const sent: number[] = [];
  for (const { versionId } of pending) if (await sendForVersion(versionId, now, windowMs)) sent.push(versionId);
  return sent;
}

/** After a client comment: mail it now if the version's window is open (otherwise the sweep sends it later). */
export function tellStudioOfClientNotes(versionId: number) {
  void sendClientNoteMails({ versionId }).catch((err) => console.error(`[client comments] e-mail for version ${versionId} failed:`, err));
}

/** Sweeps the outbox every minute from the server's boot (comments held by the window, and any a restart left). */
export function scheduleClientNoteMails(everyMs = 60_000) {
  const run = () => sendClientNoteMails().catch((err) => console.error('[client comments] sweep failed:', err));
  setTimeout(run, 5_000).unref();
  setInterval(run, everyMs).unref();
}
