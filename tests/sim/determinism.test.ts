// Determinism: the same scene gives bit-identical frames; the checksum helper is what a Node worker
// thread and a browser Web Worker compare.
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { bakeFrames, framesChecksum, bakeChecksum } from '../../src/lib/sim/bake';
import { sceneFrom } from './helpers/scenes';

function scene(seed: number) {
  const doc = JSON.parse(readFileSync(new URL('../fixtures/scenes/harbour-splash.json', import.meta.url), 'utf8'));
  doc.tank.cellSize = 1 / 32;
  doc.physics.seed = seed;
  return sceneFrom(doc);
}

describe('determinism', () => {
  it('two bakes of the same scene give identical bytes', () => {
    const a = bakeFrames(scene(1), 12), b = bakeFrames(scene(1), 12);
    expect(a.length).toBe(12);
    for (let f = 0; f < a.length; f++) {
      expect(Buffer.from(a[f].buffer).equals(Buffer.from(b[f].buffer))).toBe(true);
    }
    expect(framesChecksum(a)).toBe(framesChecksum(b));
  });
  it('a different seed gives different frames (the checksum is not constant)', () => {
    expect(bakeChecksum(scene(2), 4)).not.toBe(bakeChecksum(scene(1), 4));
  });
});
