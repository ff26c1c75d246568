// The S3 client factory against the S3 stand-in: upload, ranged read, presigned PUT and GET from outside the SDK.
import { describe, it, expect } from 'vitest';
import { randomBytes } from 'node:crypto';
import { putObject, getObject, headObject, presignGet, presignPut, deleteObject } from '../../src/lib/server/storage';
import { unique } from '../support/app';

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

  it('presigned PUT and GET work with plain fetch, including Range', async () => {
    const key = `test/${unique('signed')}.txt`;
    const put = await fetch(await presignPut(key, 'text/plain'), { method: 'PUT', body: 'hello tide', headers: { 'content-type': 'text/plain' } });
    expect(put.status).toBe(200);
    const get = await fetch(await presignGet(key), { headers: { range: 'bytes=6-9' } });
    expect(get.status).toBe(206);
    expect(await get.text()).toBe('tide');
  });
});
