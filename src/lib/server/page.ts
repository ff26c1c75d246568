// Studio pages (Astro): the signed-in viewer's access, or the answer to give instead (sign-in, or the 404 page).
import type { AstroGlobal } from 'astro';
import { requireRole, type StudioAccess } from './authz';
import { HttpError } from './http';
import type { Role } from '../vocab';

/**
 * Returns the viewer's access to the studio named in the address, or a Response to return at once:
 * a redirect to sign-in (coming back here afterwards) or the 404 page (not a member, so nothing is confirmed).
 * Other refusals (a role too low) are thrown as HttpError for the page to word.
 */
export async function studioPageAccess(Astro: AstroGlobal, role: Role): Promise<StudioAccess | Response> {
  if (!Astro.locals.user) return Astro.redirect(`/sign-in?next=${encodeURIComponent(Astro.url.pathname + Astro.url.search)}`);
  try {
    return await requireRole(Astro.locals, Astro.params.slug ?? '', role);
  } catch (err) {
    if (err instanceof HttpError && err.status === 404) return Astro.rewrite('/404');
    throw err;
  }
}
