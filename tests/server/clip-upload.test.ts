// The streaming clip upload against the S3 stand-in: chunks go out as multipart parts while the clip is made, the
// head is sent last as part 1, and the stored object is head + chunks byte for byte; an abort leaves no object.
// Backpressure: with a slow store the uploader holds at most its stated bound, and the bake thread waits for
// acknowledgements instead of running ahead of the upload.
import { describe, it, expect } from 'vitest';
import { createHash, randomBytes } from 'node:crypto';
import { readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { setTimeout as sleep } from 'node:timers/promises';
import { ClipUpload } from '../../src/lib/bake/clip-upload';
import { BakeThread } from '../../src/lib/bake/host';
import { bakeScene, sceneFromDocument } from '../../src/lib/bake/bake';
import { headObject, objectDigest, deleteObject } from '../../src/lib/server/storage';
import { unique } from '../support/app';
import { tinyScene } from '../support/scenes';

const sha = (...pieces: Uint8Array[]) => {
  const h = createHash('sha256');
  for (const p of pieces) h.update(p);
  return h.digest('hex');
};

const MiB = 1024 * 1024;

describe('clip upload', () => {
  it('a 14 MiB clip in 1 MiB chunks: parts of the stream, head in front, same bytes and SHA-256 as the whole', async () => {
    const key = `tests/${unique('clip')}.tdmclip`;
    const upload = new ClipUpload(key, 'application/x-tidemark-clip', new AbortController().signal, { partBytes: 4 * MiB });
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
    const upload = new ClipUpload(key, 'application/x-tidemark-clip', stop.signal, { partBytes: 4 * MiB });
    for (let i = 0; i < 10; i++) upload.add(new Uint8Array(randomBytes(MiB)));
    stop.abort();
    await upload.abort();
    await expect(upload.finish(new Uint8Array(10))).rejects.toThrow();
    expect(await headObject(key)).toBeNull();
    expect(readdirSync(tmpdir()).filter((f) => f.startsWith(`tidemark-clip-${process.pid}-`))).toEqual([]);
  });

  it('a slow store: at most 2 parts on the wire and the bytes held stay under the bound while a 24 MiB clip goes up', async () => {
    const key = `tests/${unique('clip')}.tdmclip`;
    let wire = 0;
    let peakWire = 0;
    const upload = new ClipUpload(key, 'application/x-tidemark-clip', new AbortController().signal, {
      partBytes: MiB,
      partsInFlight: 2,
      // The slow store stand-in: every part waits 40 ms before it goes to the S3 stand-in.
      sendPart: async (u, n, body, signal) => {
        peakWire = Math.max(peakWire, ++wire);
        try {
          await sleep(40);
          await u.part(n, body, signal);
        } finally {
          wire--;
        }
      },
    });
    const chunk = 256 * 1024;
    const bound = upload.limitBytes(chunk);
    const total = 24 * MiB;
    expect(bound).toBeLessThan(total);
    const head = randomBytes(1234);
    const whole = createHash('sha256').update(head);
    let peak = 0;
    for (let sent = 0; sent < total; sent += chunk) {
      const c = new Uint8Array(randomBytes(chunk));
      whole.update(c);
      upload.add(c);
      peak = Math.max(peak, upload.bufferedBytes);
      await upload.room();
    }
    const { bytes, sha256 } = await upload.finish(head);
    expect(peakWire).toBe(2);
    expect(Math.max(peak, upload.peakBufferedBytes)).toBeLessThanOrEqual(bound);
    const expected = whole.digest('hex');
    expect(sha256).toBe(expected);
    expect(await objectDigest(key)).toEqual({ sha256: expected, size: bytes });
    expect(bytes).toBe(head.length + total);
    await deleteObject(key);
  });

  it('the bake thread waits for acknowledgements: unacknowledged chunk bytes stay within the window, clip unchanged', async () => {
    const scene = sceneFromDocument(tinyScene(48));
    const reference = await bakeScene(scene, 'h'.repeat(64));
    // A window smaller than the clip, so the thread has to wait (a chunk larger than the window still goes alone).
    const window = 4096;
    const thread = new BakeThread(() => {}, window);
    const chunks: Uint8Array[] = [];
    try {
      const baked = await thread.bake(
        scene,
        'h'.repeat(64),
        {
          // A slow consumer: each chunk is acknowledged 15 ms after it arrived.
          onChunk: async (c) => {
            chunks.push(c);
            await sleep(15);
          },
        },
        new AbortController().signal,
      );
      const sent = chunks.reduce((a, c) => a + c.length, 0);
      const biggest = Math.max(...chunks.map((c) => c.length));
      expect(chunks.length).toBeGreaterThan(2);
      expect(sent).toBeGreaterThan(window);
      expect(thread.peakUnackedBytes).toBeGreaterThan(0);
      expect(thread.peakUnackedBytes).toBeLessThanOrEqual(Math.max(window, biggest));
      expect(sha(baked.head, ...chunks)).toBe(sha(reference!.clip));
    } finally {
      await thread.end();
    }
  });
});
