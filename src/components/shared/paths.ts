// Safe redirect targets: only paths on this site, never another origin (`//evil.example`, `/\evil`, `https://…`).

/** Returns `next` when it is a same-site path (keeping its query and hash), else `fallback`. */
export function sameSitePath(next: string | null | undefined, fallback = '/'): string {
  if (!next || next.length > 2000) return fallback;
  if (!next.startsWith('/') || next.startsWith('//') || next.startsWith('/\\')) return fallback;
  if (/[\u0000-\u001f\u007f]/.test(next)) return fallback;
  try {
    const base = 'http://same-site.invalid';
    const url = new URL(next, base);
    if (url.origin !== base) return fallback;
    return url.pathname + url.search + url.hash;
  } catch {
    return fallback;
  }
}

/** The sign-in URL that comes back to `path` afterwards. */
export function signInUrl(path: string): string {
  return `/sign-in?next=${encodeURIComponent(path)}`;
}
