// A streaming bake: the chunks handed out as they are made, behind the head, are byte for byte the clip that
// finish() returns, and bakeScene's streamed chunks decode to the same frames as a whole-clip bake.
import { describe, it, expect } from 'vitest';
import { ClipWriter } from '../../src/lib/clip/encode';
import { ClipReader } from '../../src/lib/clip/decode';
import { bakeScene, sceneFromDocument } from '../../src/lib/bake/bake';
import { tinyScene } from '../support/scenes';

const concat = (pieces: Uint8Array[]) => {
  const out = new Uint8Array(pieces.reduce((a, p) => a + p.length, 0));
  let at = 0;
  for (const p of pieces) {
    out.set(p, at);
    at += p.length;
  }
  return out;
};

describe('streamed clip', () => {
  it('head + chunks in order equal the whole clip', () => {
    const options = { startFrame: 1001, endFrame: 1020, fps: 24, tankWidth: 1, tankHeight: 0.5, particleCapacity: 400, solverBuild: 't', sceneHash: 'h' };
    const whole = new ClipWriter(options);
    const chunks: Uint8Array[] = [];
    const streamed = new ClipWriter({ ...options, onChunk: (c) => chunks.push(c) });
    for (let f = 0; f < 20; f++) {
      const n = 300 + f;
      const x = Float64Array.from({ length: n }, (_, i) => ((i * 37 + f) % 100) / 100);
      const y = Float64Array.from({ length: n }, (_, i) => ((i * 53) % 50) / 100);
      const u = Float64Array.from({ length: n }, (_, i) => Math.sin(i + f));
      const v = Float64Array.from({ length: n }, (_, i) => Math.cos(i * f));
      whole.addFrame(n, x, y, u, v);
      streamed.addFrame(n, x, y, u, v);
    }
    // 20 frames at 8 per chunk: three chunks, handed out before the end.
    expect(chunks).toHaveLength(3);
    const bytes = whole.finish();
    expect(concat([streamed.finishHead(), ...chunks])).toEqual(bytes);
    expect(() => streamed.finish()).toThrow(/finishHead/);
  });

  it('bakeScene with onChunk returns the head; the assembled clip decodes to the whole bake', async () => {
    const scene = sceneFromDocument(tinyScene(12));
    const whole = await bakeScene(scene, 'hash');
    const chunks: Uint8Array[] = [];
    const streamed = await bakeScene(scene, 'hash', { onChunk: (c) => chunks.push(c) });
    const assembled = concat([streamed!.clip, ...chunks]);
    expect(assembled).toEqual(whole!.clip);
    const reader = await ClipReader.open(async (a, b) => assembled.slice(a, b + 1));
    expect((await reader.frameAt(1012)).count).toBe(whole!.stats[11].count);
  });
});
