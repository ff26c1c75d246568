// Throttles kept in the database, so every app server and every restart sees the same counts. An attempt is recorded
// before it is judged (before the slow password hash runs), under a named lock per key, so parallel guesses are
// counted one after another; past a rule's limit each further attempt waits a doubling delay instead of meeting a
// lock that would also refuse the right password once the delay is over.
import { createHash } from 'node:crypto';
import { and, eq, gt, inArray, lt, sql } from 'drizzle-orm';
import { db, withConnection } from './db';
import { throttleHits } from './db/schema';
import { HttpError } from './http';

export interface ThrottleRule {
  /** Bucket name stored with each hit (≤ 32 characters). */
  bucket: string;
  /** Attempts allowed in the window before delays begin. */
  limit: number;
  /** How far back hits count, ms. */
  windowMs: number;
  /** Delay after the limit is reached, doubled with each further attempt, ms. */
  firstDelayMs: number;
  /** Longest delay, ms. */
  maxDelayMs: number;
}

const MIN = 60_000;
export const RULES = {
  signInAccount: { bucket: 'sign-in:account', limit: 5, windowMs: 60 * MIN, firstDelayMs: 30_000, maxDelayMs: 15 * MIN },
  signInAddress: { bucket: 'sign-in:address', limit: 30, windowMs: 60 * MIN, firstDelayMs: 30_000, maxDelayMs: 15 * MIN },
  sharePasswordLink: { bucket: 'share-password:link', limit: 10, windowMs: 60 * MIN, firstDelayMs: 30_000, maxDelayMs: 15 * MIN },
  sharePasswordAddress: { bucket: 'share-password:address', limit: 30, windowMs: 60 * MIN, firstDelayMs: 30_000, maxDelayMs: 15 * MIN },
  resetEmail: { bucket: 'reset:email', limit: 3, windowMs: 60 * MIN, firstDelayMs: 20 * MIN, maxDelayMs: 60 * MIN },
  resetAddress: { bucket: 'reset:address', limit: 10, windowMs: 60 * MIN, firstDelayMs: 10 * MIN, maxDelayMs: 60 * MIN },
  guestNoteLink: { bucket: 'guest-note:link', limit: 60, windowMs: 60 * MIN, firstDelayMs: 60_000, maxDelayMs: 15 * MIN },
  guestNoteAddress: { bucket: 'guest-note:address', limit: 20, windowMs: 60 * MIN, firstDelayMs: 60_000, maxDelayMs: 15 * MIN },
} satisfies Record<string, ThrottleRule>;

/** The SHA-256 of a throttle key (any length fits the column; no address or e-mail is stored in clear). */
export const keyHash = (key: string) => createHash('sha256').update(key.trim().toLowerCase()).digest('hex');

/**
 * Returns how long (ms) an attempt must still wait when `count` attempts were recorded in the window, the last one
 * `sinceLastMs` ago: 0 below the limit, then firstDelay × 2^(count − limit), capped.
 */
export function waitMs(rule: ThrottleRule, count: number, sinceLastMs: number): number {
  if (count < rule.limit) return 0;
  const delay = Math.min(rule.maxDelayMs, rule.firstDelayMs * 2 ** Math.min(30, count - rule.limit));
  return Math.max(0, delay - sinceLastMs);
}

export interface Attempt {
  allowed: boolean;
  /** Seconds until the next attempt may be judged (0 when allowed). */
  retryAfterSeconds: number;
  /** Ids of the hits recorded for this attempt (to forgive a successful one). */
  hitIds: number[];
}

/**
 * Records one attempt against each (rule, key), or none when any of them must still wait. Keys are locked in a fixed
 * order with GET_LOCK on one connection; the hit is inserted first and the count taken after it, inside one
 * transaction that is committed before the lock is released (a refused attempt is rolled back, so waiting out a
 * delay is possible and hammering during it does not extend it).
 */
export async function recordAttempt(checks: { rule: ThrottleRule; key: string }[]): Promise<Attempt> {
  const items = checks
    .map((c) => ({ ...c, hash: keyHash(c.key), lock: `tdm:${c.rule.bucket}:${keyHash(c.key).slice(0, 40)}` }))
    .sort((a, b) => (a.lock < b.lock ? -1 : 1));
  return withConnection(async (conn) => {
    const held: string[] = [];
    try {
      for (const it of items) {
        const [rows] = (await conn.execute(sql`SELECT GET_LOCK(${it.lock}, 10) AS ok`)) as unknown as [{ ok: number | null }[]];
        if (Number(rows[0]?.ok) !== 1) throw new HttpError('too_many_requests', 'Too many attempts at once. Try again in a moment.', undefined, { retryAfterSeconds: 5 }, { 'retry-after': '5' });
        held.push(it.lock);
      }
      await conn.execute(sql`START TRANSACTION`);
      let wait = 0;
      const hitIds: number[] = [];
      try {
        for (const it of items) {
          const [res] = await conn.insert(throttleHits).values({ bucket: it.rule.bucket, keyHash: it.hash });
          const id = Number(res.insertId);
          hitIds.push(id);
          const [row] = await conn
            .select({
              n: sql<number>`count(*)`,
              sinceLastMs: sql<number | null>`TIMESTAMPDIFF(MICROSECOND, max(${throttleHits.createdAt}), NOW(3)) / 1000`,
            })
            .from(throttleHits)
            .where(
              and(
                eq(throttleHits.bucket, it.rule.bucket),
                eq(throttleHits.keyHash, it.hash),
                lt(throttleHits.id, id),
                gt(throttleHits.createdAt, sql`NOW(3) - INTERVAL ${Math.round(it.rule.windowMs / 1000)} SECOND`),
              ),
            );
          wait = Math.max(wait, waitMs(it.rule, Number(row?.n ?? 0), Number(row?.sinceLastMs ?? Infinity)));
        }
      } catch (err) {
        await conn.execute(sql`ROLLBACK`);
        throw err;
      }
      if (wait > 0) {
        await conn.execute(sql`ROLLBACK`);
        return { allowed: false, retryAfterSeconds: Math.max(1, Math.ceil(wait / 1000)), hitIds: [] };
      }
      await conn.execute(sql`COMMIT`);
      return { allowed: true, retryAfterSeconds: 0, hitIds };
    } finally {
      for (const lock of held.reverse()) await conn.execute(sql`SELECT RELEASE_LOCK(${lock})`).catch(() => {});
    }
  });
}

/** The 429 for a refused attempt, with Retry-After. */
export function throttled(a: Attempt, what = 'Too many attempts'): HttpError {
  const s = a.retryAfterSeconds;
  const when = s >= 120 ? `${Math.ceil(s / 60)} minutes` : `${s} seconds`;
  return new HttpError('too_many_requests', `${what}. Try again in ${when}.`, undefined, { retryAfterSeconds: s }, { 'retry-after': String(s) });
}

/** Forgets a successful attempt's hits, and every hit of the given (rule, key)s (a right password clears its account). */
export async function forgive(a: Attempt, clear: { rule: ThrottleRule; key: string }[] = []): Promise<void> {
  if (a.hitIds.length) await db().delete(throttleHits).where(inArray(throttleHits.id, a.hitIds));
  for (const c of clear) await db().delete(throttleHits).where(and(eq(throttleHits.bucket, c.rule.bucket), eq(throttleHits.keyHash, keyHash(c.key))));
}
