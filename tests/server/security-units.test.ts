// Unit tests (no services): the page policy, the trusted-proxy address rule and the production start check.
import { describe, it, expect } from 'vitest';
import { pagePolicy, NON_PAGE_POLICY } from '../../src/lib/server/headers';
import { resolveClientAddress, trustedProxyList } from '../../src/lib/server/client-address';
import { productionProblem } from '../../src/lib/server/config';
import { pastAbsoluteLifetime } from '../../src/lib/server/auth';

const directive = (policy: string, name: string) =>
  policy
    .split(';')
    .map((p) => p.trim())
    .find((p) => p.split(/\s+/)[0] === name)
    ?.split(/\s+/)
    .slice(1);

describe('page policy', () => {
  const astro = "script-src 'self' 'sha256-AAA=' 'sha256-BBB='; style-src 'self' 'sha256-CCC='";
  const p = pagePolicy(astro, 'http://127.0.0.1:9000');
  it("keeps Astro's script and style hashes and nothing inline beyond them", () => {
    expect(directive(p, 'script-src')).toEqual(["'self'", "'wasm-unsafe-eval'", "'sha256-AAA='", "'sha256-BBB='"]);
    expect(directive(p, 'style-src')).toEqual(["'self'", "'sha256-CCC='"]);
    expect(p).not.toContain("'unsafe-eval'");
    expect(directive(p, 'script-src')).not.toContain("'unsafe-inline'");
  });
  it('lets the player reach the object store and workers start from blob: URLs', () => {
    expect(directive(p, 'connect-src')).toContain('http://127.0.0.1:9000');
    expect(directive(p, 'img-src')).toContain('http://127.0.0.1:9000');
    expect(directive(p, 'worker-src')).toEqual(["'self'", 'blob:']);
  });
  it('forbids framing and plugins', () => {
    expect(directive(p, 'frame-ancestors')).toEqual(["'none'"]);
    expect(directive(p, 'object-src')).toEqual(["'none'"]);
    expect(directive(NON_PAGE_POLICY, 'frame-ancestors')).toEqual(["'none'"]);
    expect(directive(NON_PAGE_POLICY, 'default-src')).toEqual(["'none'"]);
  });
});

describe('client address', () => {
  const proxies = trustedProxyList('10.0.0.0/8, loopback');
  it('a direct client is its socket peer, whatever X-Forwarded-For says', () => {
    expect(resolveClientAddress('203.0.113.7', '198.51.100.1', proxies)).toBe('203.0.113.7');
  });
  it('behind a trusted proxy, the entry the proxy appended (the rightmost) is the client', () => {
    expect(resolveClientAddress('10.1.1.1', 'forged-by-client, 198.51.100.9', proxies)).toBe('198.51.100.9');
  });
  it('walks through several trusted hops, stopping at the first untrusted one', () => {
    expect(resolveClientAddress('::ffff:127.0.0.1', '1.2.3.4, 198.51.100.9, 10.2.2.2', proxies)).toBe('198.51.100.9');
  });
  it('with no trusted proxies, the header is ignored', () => {
    expect(resolveClientAddress('127.0.0.1', '198.51.100.9', trustedProxyList(''))).toBe('127.0.0.1');
  });
  it('no peer known → "unknown", never the header', () => {
    expect(resolveClientAddress(undefined, '198.51.100.9', proxies)).toBe('unknown');
  });
  it('refuses a malformed TRUSTED_PROXIES entry', () => {
    expect(() => trustedProxyList('10.0.0.0/8, proxy.internal')).toThrow(/TRUSTED_PROXIES/);
  });
});

describe('production start check', () => {
  it('accepts https and loopback trials, refuses plain http elsewhere unless behind a proxy', () => {
    expect(productionProblem({ APP_URL: 'https://previs.example.com' })).toBeNull();
    expect(productionProblem({ APP_URL: 'http://127.0.0.1:4321' })).toBeNull();
    expect(productionProblem({ APP_URL: 'http://previs.example.com' })).toMatch(/https/);
    expect(productionProblem({ APP_URL: 'http://previs.example.com', BEHIND_PROXY: 'true' })).toBeNull();
  });
});

describe('session absolute lifetime', () => {
  it('ends 30 days after sign-in', () => {
    const now = Date.UTC(2026, 0, 31);
    expect(pastAbsoluteLifetime(new Date(now - 29 * 86_400_000), now)).toBe(false);
    expect(pastAbsoluteLifetime(new Date(now - 31 * 86_400_000), now)).toBe(true);
  });
});

describe('e-mail text', () => {
  it('a URL a person typed stays text; links into the app become anchors', async () => {
    const { render } = await import('../../src/lib/server/mail');
    const { config } = await import('../../src/lib/server/config');
    const { html } = render({ to: 'a@b.example', subject: 's', paragraphs: ['Look at https://evil.example/login now', `Frame: ${config.appUrl}/studios/x/versions/1?frame=1004`] });
    expect(html).not.toContain('href="https://evil.example');
    expect(html).toContain('https://evil.example/login');
    expect(html).toContain(`href="${config.appUrl}/studios/x/versions/1?frame=1004"`);
  });
});
