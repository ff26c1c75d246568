// Validates the session cookie once per request and puts the user and session into Astro.locals.
import { defineMiddleware } from 'astro:middleware';
import { eq, and, or, isNull, lt } from 'drizzle-orm';
import { lucia } from './lib/server/auth';
import { db } from './lib/server/db';
import { users } from './lib/server/db/schema';
import { errorResponse, HttpError } from './lib/server/http';
import { ensureServerBakePool } from './lib/bake/pool';
import { config } from './lib/server/config';

const ACTIVE_EVERY_MS = 5 * 60_000;

/** Headers on every answer: no framing by other sites, no content sniffing, HSTS when the app is served over HTTPS. */
function withSecurityHeaders(res: Response): Response {
  const set = (h: Headers) => {
    h.set('x-content-type-options', 'nosniff');
    h.set('content-security-policy', "frame-ancestors 'none'");
    h.set('x-frame-options', 'DENY');
    h.set('referrer-policy', 'same-origin');
    if (config.secureCookies) h.set('strict-transport-security', 'max-age=31536000; includeSubDomains');
  };
  try {
    set(res.headers);
    return res;
  } catch {
    // Some answers (redirects) have immutable headers: copy them into a new answer.
    const copy = new Response(res.body, { status: res.status, statusText: res.statusText, headers: new Headers(res.headers) });
    set(copy.headers);
    return copy;
  }
}

export const onRequest = defineMiddleware(async (ctx, next) => {
  ensureServerBakePool();
  ctx.locals.user = null;
  ctx.locals.session = null;
  const path = ctx.url.pathname;
  if (path.startsWith('/_astro/') || path.startsWith('/fonts/') || path === '/favicon.svg') return withSecurityHeaders(await next());

  const auth = lucia();
  const sessionId = ctx.cookies.get(auth.sessionCookieName)?.value ?? null;
  if (sessionId) {
    const { session, user } = await auth.validateSession(sessionId);
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
    if (user) {
      // "Last active" for the members table, written at most every few minutes per user.
      const stale = new Date(Date.now() - ACTIVE_EVERY_MS);
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
});
