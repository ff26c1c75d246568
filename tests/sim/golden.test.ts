// The solver's results are tied to its build id (src/lib/bake/build.ts): a stored clip is reused only when
// the build that baked it is the current one. This test bakes a short scene that runs every stage (two
// liquids, a spout, a drain, a wall, a keyed and a free prop) and compares the frames' checksum with the one
// recorded for the current build. When a solver change alters baked frames, this fails until the build id is
// bumped and the new checksum recorded beside it — the bump is what makes old clips bake again.
// The foam and spray (a read-only stage, not in the liquid's frames) have a checksum of their own from build /6 on.
// The checksums are our own recordings (no outside source): this is a regression lock, not a physics check.
import { describe, it, expect } from 'vitest';
import { bakeChecksum, framesChecksum } from '../../src/lib/sim/bake';
import { createSolver } from '../../src/lib/sim/solver';
import { SOLVER_BUILD } from '../../src/lib/bake/build';
import { goldenScene } from './helpers/scenes';

/** Checksum of GOLDEN_FRAMES frames of goldenScene(), per solver build id. */
const GOLDEN: Record<string, string> = {
  'tidemark-flip/3': 'd1686591c8a05d67ca38f5afcb822ae2a18de045bd869c188ef1cb5597dd9b8e',
  'tidemark-flip/4': '64951bc41313127cf009c457970c3aa65b53bb5c4547574f5da94279cd95bee6',
  // /5 changed only scenes whose pressure tolerance is below 1e-2; this one uses the default
  'tidemark-flip/5': '64951bc41313127cf009c457970c3aa65b53bb5c4547574f5da94279cd95bee6',
  // /6 changed only the foam and spray (checked below); the liquid bakes as before
  'tidemark-flip/6': '64951bc41313127cf009c457970c3aa65b53bb5c4547574f5da94279cd95bee6',
  // /7 changed only the foam of viscous liquids; the golden scene's liquids are thin enough to keep theirs
  'tidemark-flip/7': '64951bc41313127cf009c457970c3aa65b53bb5c4547574f5da94279cd95bee6',
};
/** Checksum of the golden bake's foam and spray (diffuse positions, velocities and kinds), recorded from build /6 on. */
const GOLDEN_FOAM: Record<string, string> = {
  'tidemark-flip/6': 'deb902af6fc90a33612adbc8d25ae7bef6cec4d48b81727df87380fe61befab3',
  'tidemark-flip/7': 'deb902af6fc90a33612adbc8d25ae7bef6cec4d48b81727df87380fe61befab3',
};
const GOLDEN_FRAMES = 8;

describe('golden bake', () => {
  it(`frames match the checksum recorded for solver build ${SOLVER_BUILD}`, () => {
    const sum = bakeChecksum(goldenScene(), GOLDEN_FRAMES);
    expect(GOLDEN[SOLVER_BUILD], `no checksum recorded for ${SOLVER_BUILD}; this build bakes ${sum}`).toBeDefined();
    expect(sum, 'the solver now bakes different frames: bump SOLVER_BUILD (src/lib/bake/build.ts) and record the new checksum').toBe(GOLDEN[SOLVER_BUILD]);
  });

  it(`foam and spray match the checksum recorded for solver build ${SOLVER_BUILD}`, () => {
    // the foam stage is read-only beside the liquid, so its output needs a lock of its own
    const sim = createSolver(goldenScene());
    const parts: Float32Array[] = [];
    let emitted = 0;
    for (let f = 0; f < GOLDEN_FRAMES; f++) {
      sim.stepFrame();
      const d = sim.diffuse;
      emitted += d.count;
      const a = new Float32Array(5 * d.count);
      for (let i = 0; i < d.count; i++) a.set([d.x[i], d.y[i], d.u[i], d.v[i], d.kind[i]], 5 * i);
      parts.push(a);
    }
    expect(emitted).toBeGreaterThan(0);
    const sum = framesChecksum(parts);
    expect(GOLDEN_FOAM[SOLVER_BUILD], `no foam checksum recorded for ${SOLVER_BUILD}; this build bakes ${sum}`).toBeDefined();
    expect(sum, 'the foam stage now bakes different diffuse particles: bump SOLVER_BUILD and record the new checksums').toBe(GOLDEN_FOAM[SOLVER_BUILD]);
  });

  it('the golden scene exercises every stage, and the debug checks pass after each', () => {
    const sim = createSolver(goldenScene(), { validate: true });
    let st = sim.stepFrame();
    for (let f = 1; f < GOLDEN_FRAMES; f++) st = sim.stepFrame();
    expect(Object.keys(st.stageMs)).toEqual([
      'free props', 'solids', 'gravity and advection', 'spatial hash', 'foam and spray', 'separation', 'collision', 'emission',
      'particles to grid', 'density and drift', 'free surface', 'pressure', 'prop contacts', 'drift correction',
      'grid to particles',
    ]);
    for (const ms of Object.values(st.stageMs)) expect(ms).toBeGreaterThanOrEqual(0);
    expect(st.liquidCounts[1]).toBeGreaterThan(0); // the spout's paint is in the tank
  });
});
