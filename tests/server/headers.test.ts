// Security headers on pages and API answers: no framing by other sites, no content sniffing.
import { describe, it, expect } from 'vitest';
import { Client } from '../support/app';

describe('security headers', () => {
  const paths = ['/sign-in', '/forgot-password', '/share/not-a-token', '/api/me', '/api/studios/1/shows', '/no-such-page'];
  for (const p of paths) {
    it(`${p} carries nosniff and frame-ancestors 'none'`, async () => {
      const res = await new Client().get(p);
      expect(res.headers.get('x-content-type-options')).toBe('nosniff');
      expect(res.headers.get('content-security-policy')).toContain("frame-ancestors 'none'");
      expect(res.headers.get('x-frame-options')).toBe('DENY');
    });
  }
  it('the test app is served over http, so no HSTS header', async () => {
    const res = await new Client().get('/sign-in');
    expect(res.headers.get('strict-transport-security')).toBeNull();
  });
});
