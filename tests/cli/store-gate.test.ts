// The store gate's policy check on its own: the form fields S3 would accept and those it would refuse. Rules: AWS S3
// API Reference, "POST Policy" (sigv4-HTTPPOSTConstructPolicy: expiration, exact / starts-with / content-length-range
// conditions, every field but policy, x-amz-signature, file and x-ignore-* named by a condition) and "Calculating a
// Signature" for browser-based uploads (sigv4-UsingHTTPPOST: the signature is HMAC-SHA256 of the base64 policy with
// the SigV4 signing key).
import { describe, it, expect } from 'vitest';
import { createHmac } from 'node:crypto';
import { checkPostPolicy } from '../../src/cli/store-gate';

const SECRET = 'unit-secret';
const secrets = { UNITKEY: SECRET };
const NOW = new Date('2026-12-04T12:00:00Z');

/** A form as a presigner makes it: the policy, its SigV4 signature and the fields it names (names lower-cased). */
function signedForm(conditions: unknown[], fields: Record<string, string>, expiration = '2026-12-04T12:15:00Z') {
  const credential = 'UNITKEY/20261204/us-east-1/s3/aws4_request';
  const all = [...conditions, { 'X-Amz-Algorithm': 'AWS4-HMAC-SHA256' }, { 'X-Amz-Credential': credential }, { 'X-Amz-Date': '20261204T120000Z' }];
  const policy = Buffer.from(JSON.stringify({ expiration, conditions: all })).toString('base64');
  const h = (key: string | Buffer, data: string) => createHmac('sha256', key).update(data).digest();
  const key = h(h(h(h(`AWS4${SECRET}`, '20261204'), 'us-east-1'), 's3'), 'aws4_request');
  const form = new Map<string, string>(Object.entries({ ...fields, 'x-amz-algorithm': 'AWS4-HMAC-SHA256', 'x-amz-credential': credential, 'x-amz-date': '20261204T120000Z', policy }));
  form.set('x-amz-signature', createHmac('sha256', key).update(policy).digest('hex'));
  return form;
}

const conditions = [['content-length-range', 1, 500], ['eq', '$Content-Type', 'image/png'], { bucket: 'b' }, { key: 'uploads/1/a.png' }, ['starts-with', '$x-amz-meta-tag', 'tide-']];
const fields = { 'content-type': 'image/png', bucket: 'b', key: 'uploads/1/a.png', 'x-amz-meta-tag': 'tide-1' };

describe('checkPostPolicy', () => {
  it('accepts the signed form and hands back the size range to enforce', () => {
    expect(checkPostPolicy(signedForm(conditions, fields), 'b', secrets, NOW)).toEqual({ ok: true, minBytes: 1, maxBytes: 500 });
  });

  it('refuses a changed field, a field no condition names, another bucket and a failed starts-with', () => {
    const code = (f: Map<string, string>, bucket = 'b') => {
      const v = checkPostPolicy(f, bucket, secrets, NOW);
      return v.ok ? 'accepted' : `${v.status} ${v.code}`;
    };
    const changed = (name: string, value: string) => {
      const f = signedForm(conditions, fields);
      f.set(name, value);
      return f;
    };
    expect(code(changed('key', 'studios/1/shots/2/plates/kept.png'))).toBe('403 AccessDenied');
    expect(code(changed('content-type', 'text/html'))).toBe('403 AccessDenied');
    expect(code(changed('x-amz-meta-tag', 'other'))).toBe('403 AccessDenied');
    expect(code(changed('acl', 'public-read'))).toBe('403 AccessDenied');
    expect(code(changed('x-ignore-note', 'anything'))).toBe('accepted');
    expect(code(signedForm(conditions, fields), 'another-bucket')).toBe('403 AccessDenied');
  });

  it('refuses a policy that was altered, signed with another key, expired, or missing', () => {
    const altered = signedForm(conditions, fields);
    const doc = JSON.parse(Buffer.from(altered.get('policy')!, 'base64').toString());
    doc.conditions[0] = ['content-length-range', 1, 1e9];
    altered.set('policy', Buffer.from(JSON.stringify(doc)).toString('base64'));
    expect(checkPostPolicy(altered, 'b', secrets, NOW)).toMatchObject({ ok: false, status: 403, code: 'SignatureDoesNotMatch' });
    expect(checkPostPolicy(signedForm(conditions, fields), 'b', { UNITKEY: 'another-secret' }, NOW)).toMatchObject({ ok: false, code: 'SignatureDoesNotMatch' });
    expect(checkPostPolicy(signedForm(conditions, fields), 'b', {}, NOW)).toMatchObject({ ok: false, code: 'InvalidAccessKeyId' });
    expect(checkPostPolicy(signedForm(conditions, fields, '2026-12-04T11:59:59Z'), 'b', secrets, NOW)).toMatchObject({ ok: false, status: 403, message: expect.stringMatching(/Policy expired/) });
    const bare = new Map(Object.entries(fields));
    expect(checkPostPolicy(bare, 'b', secrets, NOW)).toMatchObject({ ok: false, status: 403, code: 'AccessDenied' });
  });
});
