// The streaming clip upload against the S3 stand-in: chunks go out as multipart parts while the clip is made, the
// head is sent last as part 1, and the stored object is head + chunks byte for byte; an abort leaves no object.
import { describe, it, expect } from 'vitest';
import { createHash, randomBytes } from 'node:crypto';
import { readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { ClipUpload } from '../../src/lib/bake/clip-upload';
import { headObject, objectDigest, deleteObject } from '../../src/lib/server/storage';
import { unique } from '../support/app';

const MiB = 1024 * 1024;

describe('clip upload', () => {
  it('a 14 MiB clip in 1 MiB chunks: parts of the stream, head in front, same bytes and SHA-256 as the whole', async () => {
    const key = `tests/${unique('clip')}.tdmclip`;
    const upload = new ClipUpload(key, 'application/x-tidemark-clip', new AbortController().signal, 4 * MiB);
    const whole = createHash('sha256');
    const head = randomBytes(3000);
    whole.update(head);
    const chunks = Array.from({ length: 14 }, () => new Uint8Array(randomBytes(MiB)));
    for (const c of chunks) {
      whole.update(c);
      upload.add(c);
    }
    const { bytes: size, sha256 } = await upload.finish(head);
    expect(size).toBe(head.length + 14 * MiB);
    // The SHA-256 computed while streaming (head last on the wire, first in the object) is the stored object's.
    const expected = whole.digest('hex');
    expect(sha256).toBe(expected);
    expect(await objectDigest(key)).toEqual({ sha256: expected, size });
    // The local spool of the parts sent before the head is gone.
    expect(readdirSync(tmpdir()).filter((f) => f.startsWith(`tidemark-clip-${process.pid}-`))).toEqual([]);
    await deleteObject(key);
  });

  it('a small clip is one PUT; an aborted upload leaves nothing', async () => {
    const small = `tests/${unique('clip')}.tdmclip`;
    const one = new ClipUpload(small, 'application/x-tidemark-clip', new AbortController().signal);
    one.add(new Uint8Array([4, 5, 6]));
    expect(await one.finish(new Uint8Array([1, 2, 3]))).toEqual({ bytes: 6, sha256: createHash('sha256').update(new Uint8Array([1, 2, 3, 4, 5, 6])).digest('hex') });
    expect((await headObject(small))?.size).toBe(6);
    await deleteObject(small);

    const key = `tests/${unique('clip')}.tdmclip`;
    const stop = new AbortController();
    const upload = new ClipUpload(key, 'application/x-tidemark-clip', stop.signal, 4 * MiB);
    for (let i = 0; i < 10; i++) upload.add(new Uint8Array(randomBytes(MiB)));
    stop.abort();
    await upload.abort();
    await expect(upload.finish(new Uint8Array(10))).rejects.toThrow();
    expect(await headObject(key)).toBeNull();
    expect(readdirSync(tmpdir()).filter((f) => f.startsWith(`tidemark-clip-${process.pid}-`))).toEqual([]);
  });
});
