// Security headers on every answer: a Content-Security-Policy (scripts only from this origin or with the hashes Astro
// computed for its own inline scripts), no framing anywhere, no content sniffing, HSTS when the app is on https.
import { createHash } from 'node:crypto';
import { config } from './config';
import { presignGet } from './storage';

/** Directives of a policy as a map name → sources (`script-src 'self' 'sha256-…'` → script-src: ["'self'", …]). */
function parsePolicy(policy: string | null): Map<string, string[]> {
  const out = new Map<string, string[]>();
  for (const part of (policy ?? '').split(';')) {
    const [name, ...sources] = part.trim().split(/\s+/).filter(Boolean);
    if (name) out.set(name.toLowerCase(), sources);
  }
  return out;
}

/**
 * Returns the page policy. `astroPolicy` is the header Astro set on a rendered page (its `script-src`/`style-src`
 * carry the hashes of the inline island loader and hydration scripts); `storeOrigin` is where presigned plate, clip
 * and export URLs point (the player fetches clips with Range requests, thumbnails and MP4s load from there).
 * The player's pixi.js and the MP4 export's ffmpeg.wasm need WebAssembly compilation ('wasm-unsafe-eval', which
 * allows no JavaScript eval) and workers from blob: URLs.
 */
export function pagePolicy(astroPolicy: string | null, storeOrigin: string): string {
  const astro = parsePolicy(astroPolicy);
  const hashes = (name: string) => (astro.get(name) ?? []).filter((s) => s.startsWith("'sha"));
  const store = storeOrigin ? [storeOrigin] : [];
  const directives: [string, string[]][] = [
    ['default-src', ["'self'"]],
    ['script-src', ["'self'", "'wasm-unsafe-eval'", ...hashes('script-src')]],
    ['style-src', ["'self'", ...hashes('style-src')]],
    // style="…" attributes rendered by React islands (widths, colours); they cannot run script.
    ['style-src-attr', ["'unsafe-inline'"]],
    ['img-src', ["'self'", 'data:', 'blob:', ...store]],
    ['media-src', ["'self'", 'blob:', ...store]],
    ['connect-src', ["'self'", 'blob:', 'data:', ...store]],
    ['worker-src', ["'self'", 'blob:']],
    ['font-src', ["'self'", 'data:']],
    ['object-src', ["'none'"]],
    ['base-uri', ["'self'"]],
    ['form-action', ["'self'"]],
    ['frame-ancestors', ["'none'"]],
  ];
  return directives.map(([name, sources]) => `${name} ${sources.join(' ')}`).join('; ');
}

/** The policy of anything that is not a page (JSON, files, redirects): nothing may load, nothing may frame it. */
export const NON_PAGE_POLICY = "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'";

let storeOrigin: Promise<string> | undefined;
/** The object store's origin as the browser sees it (from a presigned URL; signing makes no network call). */
function objectStoreOrigin(): Promise<string> {
  storeOrigin ??= presignGet('csp-origin-probe', 60)
    .then((u) => new URL(u).origin)
    .catch(() => '');
  return storeOrigin;
}

function setHeaders(h: Headers, policy: string) {
  h.set('content-security-policy', policy);
  h.set('x-content-type-options', 'nosniff');
  h.set('x-frame-options', 'DENY');
  if (!h.has('referrer-policy')) h.set('referrer-policy', 'same-origin');
  if (config.secureCookies) h.set('strict-transport-security', 'max-age=31536000; includeSubDomains');
}

const sha256 = (text: string) => `'sha256-${createHash('sha256').update(text).digest('base64')}'`;

/** `script-src`/`style-src` hashes of a page's inline scripts and style elements, in the form pagePolicy reads. */
export function inlineHashPolicy(html: string): string {
  const scripts = [...html.matchAll(/<script(?![^>]*\bsrc=)[^>]*>([\s\S]*?)<\/script>/g)].map((m) => m[1]).filter((c) => c.trim());
  const styles = [...html.matchAll(/<style[^>]*>([\s\S]*?)<\/style>/g)].map((m) => m[1]);
  return `script-src ${[...new Set(scripts.map(sha256))].join(' ')}; style-src ${[...new Set(styles.map(sha256))].join(' ')}`;
}

/** Sets the security headers on an answer (copying it first when its headers are immutable, as on redirects). */
export async function withSecurityHeaders(res: Response): Promise<Response> {
  const type = res.headers.get('content-type') ?? '';
  const isPage = type.startsWith('text/html');
  // A dedicated worker runs under the policy of its own script's answer, not the page's: the preview worker
  // fetches nothing itself today, but a worker script gets the page policy (without inline hashes: it has none).
  const isScript = /^(text|application)\/javascript/.test(type);
  if (isPage && res.body) {
    // The page's own inline scripts and styles (Astro's island loader and hydration scripts) are allowed by their
    // SHA-256 hashes, computed here from the page as sent: nothing else inline runs.
    const html = await res.text();
    const policy = pagePolicy(inlineHashPolicy(html), await objectStoreOrigin());
    const copy = new Response(html, { status: res.status, statusText: res.statusText, headers: new Headers(res.headers) });
    copy.headers.delete('content-length');
    setHeaders(copy.headers, policy);
    return copy;
  }
  const policy = isPage || isScript ? pagePolicy(null, await objectStoreOrigin()) : NON_PAGE_POLICY;
  const set = (h: Headers) => setHeaders(h, policy);
  try {
    set(res.headers);
    return res;
  } catch {
    const copy = new Response(res.body, { status: res.status, statusText: res.statusText, headers: new Headers(res.headers) });
    set(copy.headers);
    return copy;
  }
}
