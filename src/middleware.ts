// Validates the session cookie once per request and puts the user and session into Astro.locals.
import { defineMiddleware } from 'astro:middleware';
import type { APIContext, MiddlewareNext } from 'astro';
import { eq, and, or, isNull, lt } from 'drizzle-orm';
import { lucia, validateSessionCookie } from './lib/server/auth';
import { countQueries, db } from './lib/server/db';
import { users } from './lib/server/db/schema';
import { errorResponse, HttpError } from './lib/server/http';
import { ensureServerBakePool } from './lib/bake/pool';
import { withSecurityHeaders } from './lib/server/headers';

const ACTIVE_EVERY_MS = 5 * 60_000;

/** Under npm test an API answer says how many queries it took (X-Query-Count; tests/server/query-counts.test.ts). */
const COUNT_QUERIES = process.env.TIDEMARK_TEST === '1';

export const onRequest = defineMiddleware(async (ctx, next): Promise<Response> => {
  if (!COUNT_QUERIES || !ctx.url.pathname.startsWith('/api/')) return handle(ctx, next);
  const { result, counter } = countQueries(() => handle(ctx, next));
  const res = await result;
  try {
    res.headers.set('x-query-count', String(counter.queries));
  } catch {
    /* a response with immutable headers goes out without the count */
  }
  return res;
});

async function handle(ctx: APIContext, next: MiddlewareNext): Promise<Response> {
  ensureServerBakePool();
  ctx.locals.user = null;
  ctx.locals.session = null;
  const path = ctx.url.pathname;
  if (path.startsWith('/_astro/') || path.startsWith('/fonts/') || path === '/favicon.svg') return withSecurityHeaders(await next());

  const auth = lucia();
  const sessionId = ctx.cookies.get(auth.sessionCookieName)?.value ?? null;
  if (sessionId) {
    const { session, user } = await validateSessionCookie(sessionId);
    if (session?.fresh) {
      const c = auth.createSessionCookie(session.id);
      ctx.cookies.set(c.name, c.value, c.attributes);
    }
    if (!session) {
      const c = auth.createBlankSessionCookie();
      ctx.cookies.set(c.name, c.value, c.attributes);
    }
    ctx.locals.user = user;
    ctx.locals.session = session;
    // "Last active" for the members table, written at most every few minutes per user (the session's query read it,
    // so a recent one costs no query; the WHERE keeps concurrent requests from writing twice).
    const stale = new Date(Date.now() - ACTIVE_EVERY_MS);
    if (user && !(user.lastActiveAt && user.lastActiveAt >= stale)) {
      await db()
        .update(users)
        .set({ lastActiveAt: new Date() })
        .where(and(eq(users.id, user.id), or(isNull(users.lastActiveAt), lt(users.lastActiveAt, stale))));
    }
  }

  try {
    return withSecurityHeaders(await next());
  } catch (err) {
    if (!path.startsWith('/api/')) throw err;
    console.error(`[api] ${ctx.request.method} ${path}:`, err);
    return withSecurityHeaders(errorResponse(new HttpError('internal', 'Something went wrong on our side. Please try again.')));
  }
}
