// The S3 client factory against the S3 stand-in: upload, ranged read, presigned POST form and GET from outside the
// SDK; and the stand-in's store gate (src/cli/store-gate.ts), which refuses a form upload its signed policy does not allow.
import { describe, it, expect } from 'vitest';
import { randomBytes } from 'node:crypto';
import { setTimeout as sleep } from 'node:timers/promises';
import { putObject, getObject, headObject, presignGet, presignPost, deleteObject } from '../../src/lib/server/storage';
import { postUploadForm } from '../support/plates';
import { unique } from '../support/app';

/** The store's XML error code (`<Code>…</Code>`), or '' when the answer has none. */
const errorCode = async (res: Response) => /<Code>([^<]+)<\/Code>/.exec(await res.text())?.[1] ?? '';

describe('object store', () => {
  it('stores bytes unchanged (no chunked framing) and reads a byte range', async () => {
    const key = `test/${unique('obj')}.bin`;
    const bytes = new Uint8Array(randomBytes(9 * 1024 * 1024 + 17)); // above the 8 MiB part size: multipart
    await putObject(key, bytes, 'application/octet-stream');
    expect((await headObject(key))?.size).toBe(bytes.length);
    const back = await getObject(key);
    expect(Buffer.compare(Buffer.from(back), Buffer.from(bytes))).toBe(0);
    const part = await getObject(key, [1000, 1999]);
    expect(Buffer.from(part).equals(Buffer.from(bytes.subarray(1000, 2000)))).toBe(true);
    await deleteObject(key);
    expect(await headObject(key)).toBeNull();
  });

  it('presigned POST form and GET work with plain fetch, including Range', async () => {
    const key = `test/${unique('signed')}.txt`;
    const body = new TextEncoder().encode('hello tide');
    const sent = await postUploadForm(await presignPost(key, 'text/plain', body.length), body, 'text/plain');
    // S3 API Reference, PostObject: 204 No Content unless success_action_status asks for 200 or 201.
    expect(sent.status, await sent.clone().text()).toBe(204);
    expect(await headObject(key)).toMatchObject({ size: body.length, contentType: 'text/plain' });
    const get = await fetch(await presignGet(key), { headers: { range: 'bytes=6-9' } });
    expect(get.status).toBe(206);
    expect(await get.text()).toBe('tide');
  });
});

// What each refusal answers follows S3: the POST policy's conditions and expiration (AWS S3 API Reference, "POST
// Policy", sigv4-HTTPPOSTConstructPolicy); size outside content-length-range → 400 EntityTooLarge / EntityTooSmall
// and a condition or signature that fails → 403 (AWS S3 API Reference, "Error responses": from memory).
describe('store gate: a form upload is held to its signed policy', () => {
  const form = async (size: number, seconds?: number) => {
    const key = `test/${unique('gate')}.bin`;
    return { key, upload: await presignPost(key, 'application/octet-stream', size, seconds) };
  };
  const bytes = (n: number) => new Uint8Array(randomBytes(n));

  it('takes a file of the declared size (and one smaller, within 1…size)', async () => {
    const { key, upload } = await form(4096);
    expect((await postUploadForm(upload, bytes(4096), 'application/octet-stream')).status).toBe(204);
    expect((await headObject(key))?.size).toBe(4096);
    const smaller = await form(4096);
    expect((await postUploadForm(smaller.upload, bytes(100), 'application/octet-stream')).status).toBe(204);
    expect((await headObject(smaller.key))?.size).toBe(100);
  });

  it('refuses a file one byte over the declared size, a much larger one and an empty one; nothing is stored', async () => {
    for (const n of [4097, 3 * 1024 * 1024]) {
      const { key, upload } = await form(4096);
      const res = await postUploadForm(upload, bytes(n), 'application/octet-stream');
      expect(res.status).toBe(400);
      expect(await errorCode(res)).toBe('EntityTooLarge');
      expect(await headObject(key)).toBeNull();
    }
    const { key, upload } = await form(4096);
    const empty = await postUploadForm(upload, new Uint8Array(0), 'application/octet-stream');
    expect(empty.status).toBe(400);
    expect(await errorCode(empty)).toBe('EntityTooSmall');
    expect(await headObject(key)).toBeNull();
  });

  it('refuses the form sent to another key, with another type, with a widened policy, or with a field the policy does not name', async () => {
    const other = `test/${unique('elsewhere')}.bin`;
    const cases: [string, (f: Record<string, string>) => Record<string, string>, string][] = [
      ['another key', (f) => ({ ...f, key: other }), 'AccessDenied'],
      ['another type', (f) => ({ ...f, 'Content-Type': 'text/html' }), 'AccessDenied'],
      [
        'a policy rewritten to allow 1 GB (signature no longer matches)',
        (f) => {
          const doc = JSON.parse(Buffer.from(f.Policy!, 'base64').toString('utf8'));
          doc.conditions = doc.conditions.map((c: unknown) => (Array.isArray(c) && c[0] === 'content-length-range' ? ['content-length-range', 1, 1024 ** 3] : c));
          return { ...f, Policy: Buffer.from(JSON.stringify(doc)).toString('base64') };
        },
        'SignatureDoesNotMatch',
      ],
      ['an extra field', (f) => ({ ...f, 'x-amz-meta-note': 'hello' }), 'AccessDenied'],
      ['no policy at all', ({ Policy: _p, 'X-Amz-Signature': _s, ...f }) => f, 'AccessDenied'],
    ];
    for (const [what, change, code] of cases) {
      const { key, upload } = await form(4096);
      const res = await postUploadForm({ url: upload.url, fields: change(upload.fields) }, bytes(100), 'application/octet-stream');
      expect(res.status, what).toBe(403);
      expect(await errorCode(res), what).toBe(code);
      expect(await headObject(key), what).toBeNull();
      expect(await headObject(other), what).toBeNull();
    }
  });

  it('refuses a form used after its policy expired', async () => {
    const { key, upload } = await form(4096, 1);
    await sleep(2100);
    const res = await postUploadForm(upload, bytes(100), 'application/octet-stream');
    expect(res.status).toBe(403);
    expect(await res.text()).toMatch(/Policy expired/);
    expect(await headObject(key)).toBeNull();
  });
});
