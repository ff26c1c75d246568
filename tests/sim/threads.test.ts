// A bake on several threads (src/lib/sim/parallel.ts): every threaded stage makes the serial stage's sums in the
// serial order, so the frames on N threads are the frames on one thread, bit for bit (not merely within the clip's
// quantisation), and a threaded bake run twice is bit-identical. Our own design property (no outside source).
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { bakeFrames, framesChecksum } from '../../src/lib/sim/bake';
import { createSolver } from '../../src/lib/sim/solver';
import { referenceDamBreak } from '../../src/lib/sim/reference';
import { createSolverTeam, type NodeSolverTeam } from '../../src/lib/bake/solver-team';
import { goldenScene } from './helpers/scenes';

const same = (a: Float32Array[], b: Float32Array[]) =>
  a.length === b.length && a.every((f, i) => Buffer.from(f.buffer, f.byteOffset, f.byteLength).equals(Buffer.from(b[i].buffer, b[i].byteOffset, b[i].byteLength)));

describe('a bake on several threads', () => {
  const teams: Record<number, NodeSolverTeam> = {};
  beforeAll(async () => {
    // 'threaded': every step runs the threaded stages (the adaptive schedule may pick the serial ones)
    teams[2] = await createSolverTeam(2, 'threaded');
    teams[4] = await createSolverTeam(4, 'threaded');
  });
  afterAll(async () => {
    await Promise.all(Object.values(teams).map((t) => t.end()));
  });

  it('two bakes on 1, on 2 and on 4 threads give identical bytes', () => {
    for (const n of [1, 2, 4]) {
      const team = n === 1 ? null : teams[n];
      const a = bakeFrames(goldenScene(), 10, { team });
      const b = bakeFrames(goldenScene(), 10, { team });
      expect(a).toHaveLength(10);
      expect(same(a, b), `${n} threads`).toBe(true);
    }
  });

  it('the adaptive schedule (threaded or serial per stage, by speed) gives the 1-thread bytes too', async () => {
    const adaptive = await createSolverTeam(2, 'adaptive');
    try {
      expect(framesChecksum(bakeFrames(goldenScene(), 10, { team: adaptive }))).toBe(framesChecksum(bakeFrames(goldenScene(), 10, { team: null })));
    } finally {
      await adaptive.end();
    }
  });

  it('1, 2 and 4 threads give the same bytes on a scene that runs every stage', () => {
    const one = bakeFrames(goldenScene(), 10, { team: null });
    const two = bakeFrames(goldenScene(), 10, { team: teams[2] });
    const four = bakeFrames(goldenScene(), 10, { team: teams[4] });
    expect(framesChecksum(two)).toBe(framesChecksum(one));
    expect(framesChecksum(four)).toBe(framesChecksum(one));
    // the scene moves: a bake that froze would also agree with itself
    expect(same(one.slice(0, 1), one.slice(9, 10))).toBe(false);
  });

  it('the reference dam break (25k particles, 128² cells) on 2 threads is the 1-thread run, step for step', () => {
    const setup = referenceDamBreak(1, undefined, undefined, 24);
    const serial = createSolver(setup.scene, { ...setup.options, team: null });
    const threaded = createSolver(setup.scene, { ...setup.options, team: teams[2] });
    // stepped alternately: the team re-attaches to its solver each time, which must not change anything either
    for (let s = 0; s < setup.steps; s++) {
      const a = serial.stepFrame(), b = threaded.stepFrame();
      expect(b.maxSpeed).toBe(a.maxSpeed);
      expect(b.pressureResidual).toBe(a.pressureResidual);
    }
    expect(Buffer.from(threaded.x.buffer, threaded.x.byteOffset, threaded.x.byteLength).equals(
      Buffer.from(serial.x.buffer, serial.x.byteOffset, serial.x.byteLength))).toBe(true);
    expect(threaded.count).toBe(serial.count);
  });
});
