// Security headers on every answer: a Content-Security-Policy (scripts only from this origin or with the hashes Astro
// computed for its own inline scripts), no framing anywhere, no content sniffing, HSTS when the app is on https.
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

/** Sets the security headers on an answer (copying it first when its headers are immutable, as on redirects). */
export async function withSecurityHeaders(res: Response): Promise<Response> {
  const isPage = (res.headers.get('content-type') ?? '').startsWith('text/html');
  const policy = isPage ? pagePolicy(res.headers.get('content-security-policy'), await objectStoreOrigin()) : NON_PAGE_POLICY;
  const set = (h: Headers) => {
    h.set('content-security-policy', policy);
    h.set('x-content-type-options', 'nosniff');
    h.set('x-frame-options', 'DENY');
    if (!h.has('referrer-policy')) h.set('referrer-policy', 'same-origin');
    if (config.secureCookies) h.set('strict-transport-security', 'max-age=31536000; includeSubDomains');
  };
  try {
    set(res.headers);
    return res;
  } catch {
    const copy = new Response(res.body, { status: res.status, statusText: res.statusText, headers: new Headers(res.headers) });
    set(copy.headers);
    return copy;
  }
}
