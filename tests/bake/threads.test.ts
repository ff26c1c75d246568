// The bake worker's thread setting: BAKE_THREADS (or the process's share of the cores) reaches the bake thread,
// whose solver then runs on that many threads and writes the same clip bytes as a bake on one thread.
import { describe, it, expect, afterEach } from 'vitest';
import { availableParallelism } from 'node:os';
import { BakeThread } from '../../src/lib/bake/host';
import { bakeScene, sceneFromDocument } from '../../src/lib/bake/bake';
import { bakeThreads } from '../../src/lib/bake/solver-team';
import { tinyScene } from '../support/scenes';

const concat = (pieces: Uint8Array[]) => {
  const out = new Uint8Array(pieces.reduce((a, p) => a + p.length, 0));
  let at = 0;
  for (const p of pieces) { out.set(p, at); at += p.length; }
  return out;
};

describe('bake threads setting', () => {
  const saved = process.env.BAKE_THREADS;
  afterEach(() => {
    if (saved === undefined) delete process.env.BAKE_THREADS;
    else process.env.BAKE_THREADS = saved;
  });

  it('BAKE_THREADS when set, else the cores shared among the bake slots (at least 1); nonsense is refused', () => {
    process.env.BAKE_THREADS = '3';
    expect(bakeThreads()).toBe(3);
    expect(bakeThreads(4)).toBe(3);
    delete process.env.BAKE_THREADS;
    expect(bakeThreads(1)).toBe(availableParallelism());
    expect(bakeThreads(availableParallelism() * 2)).toBe(1);
    for (const bad of ['0', '-2', '1.5', 'many']) {
      process.env.BAKE_THREADS = bad;
      expect(() => bakeThreads(), bad).toThrow(/BAKE_THREADS/);
    }
  });

  it('a BakeThread with BAKE_THREADS=2 bakes on 2 threads and writes the 1-thread clip byte for byte', async () => {
    process.env.BAKE_THREADS = '2';
    const scene = sceneFromDocument(tinyScene(24));
    const reference = await bakeScene(scene, 'h'.repeat(64), {}, { team: null });
    const thread = new BakeThread();
    expect(thread.solverThreads).toBe(2);
    const chunks: Uint8Array[] = [];
    try {
      const baked = await thread.bake(scene, 'h'.repeat(64), { onChunk: (c) => { chunks.push(c); } }, new AbortController().signal);
      expect(baked.threads).toBe(2);
      expect(Buffer.from(concat([baked.head, ...chunks])).equals(Buffer.from(reference!.clip))).toBe(true);
    } finally {
      await thread.end();
    }
  });
});
