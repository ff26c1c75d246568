// The streamed ZIP (no services needed): entries come out in order, stored files unchanged, and a file's source is
// opened only once the reader has taken the bytes before it — the ZIP is never built whole before the first byte.
import { describe, it, expect } from 'vitest';
import { unzipSync, strFromU8, strToU8 } from 'fflate';
import { zipStream } from '../../src/lib/server/zip-stream';

/** A stream of `size` pseudo-random bytes in `chunk`-byte pieces; `opened` records when it was asked for. */
function source(size: number, chunk: number, seed: number, log: string[], name: string) {
  const bytes = new Uint8Array(size);
  let x = seed;
  for (let i = 0; i < size; i++) bytes[i] = (x = (x * 1103515245 + 12345) >>> 0) >>> 24;
  return {
    bytes,
    open: async () => {
      log.push(`open ${name}`);
      let at = 0;
      return new ReadableStream<Uint8Array>({
        pull(c) {
          if (at >= size) return c.close();
          c.enqueue(bytes.slice(at, at + chunk));
          at += chunk;
        },
      });
    },
  };
}

async function readAll(stream: ReadableStream<Uint8Array>, onChunk?: (n: number) => void) {
  const parts: Uint8Array[] = [];
  const reader = stream.getReader();
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    parts.push(value);
    onChunk?.(parts.length);
  }
  const out = new Uint8Array(parts.reduce((n, p) => n + p.length, 0));
  let at = 0;
  for (const p of parts) (out.set(p, at), (at += p.length));
  return { bytes: out, chunks: parts.length };
}

describe('zipStream', () => {
  it('writes every entry (text deflated, MP4s stored) and reads back equal', async () => {
    const log: string[] = [];
    const a = source(300_000, 64 * 1024, 1, log, 'a');
    const b = source(120_001, 10_000, 2, log, 'b');
    const { bytes, chunks } = await readAll(
      zipStream([
        { name: 'cut.edl', data: strToU8('TITLE: QUAY\r\n') },
        { name: 'a.mp4', stored: true, data: a.open },
        { name: 'b.mp4', stored: true, data: b.open },
      ]),
    );
    const files = unzipSync(bytes);
    expect(Object.keys(files)).toEqual(['cut.edl', 'a.mp4', 'b.mp4']);
    expect(strFromU8(files['cut.edl'])).toBe('TITLE: QUAY\r\n');
    const same = (x: Uint8Array, y: Uint8Array) => Buffer.from(x).equals(Buffer.from(y));
    expect(same(files['a.mp4'], a.bytes)).toBe(true);
    expect(same(files['b.mp4'], b.bytes)).toBe(true);
    expect(same(files['b.mp4'], a.bytes.subarray(0, b.bytes.length))).toBe(false);
    expect(chunks).toBeGreaterThan(10); // many pieces, not one buffer
  });

  it('opens a file only when the reader has got that far (the first bytes leave before the last file is read)', async () => {
    const log: string[] = [];
    const a = source(200_000, 50_000, 3, log, 'a');
    const b = source(200_000, 50_000, 4, log, 'b');
    const stream = zipStream([
      { name: 'a.mp4', stored: true, data: a.open },
      { name: 'b.mp4', stored: true, data: b.open },
    ]);
    const reader = stream.getReader();
    const first = await reader.read();
    expect(first.done).toBe(false);
    expect(log).toEqual(['open a']);
    reader.releaseLock();
    await readAll(stream);
    expect(log).toEqual(['open a', 'open b']);
  });

  it('a cancelled download cancels the file being read and opens no other', async () => {
    const log: string[] = [];
    let cancelled = false;
    const stream = zipStream([
      {
        name: 'a.mp4',
        stored: true,
        data: async () => {
          log.push('open a');
          return new ReadableStream<Uint8Array>({ pull: (c) => c.enqueue(new Uint8Array(1000)), cancel: () => void (cancelled = true) });
        },
      },
      { name: 'b.mp4', stored: true, data: source(10, 10, 5, log, 'b').open },
    ]);
    const reader = stream.getReader();
    await reader.read();
    await reader.read();
    await reader.cancel();
    expect(cancelled).toBe(true);
    expect(log).toEqual(['open a']);
  });
});
