// Bake cost estimate: one total over cells × frames × substeps × pressure iterations plus particles × frames × substeps,
// refused above the limit with the field to change. Expected values come from the formula in src/lib/scene/cost.ts
// (common practice (no source): work-unit counting, not physics).
import { describe, it, expect } from 'vitest';
import { parseScene, type Scene } from '../../src/lib/scene/schema';
import { bakeCost, checkBakeCost, DEFAULT_BAKE_COST_LIMIT } from '../../src/lib/scene/cost';
import { referenceDamBreak } from '../../src/lib/sim/reference';

function scene(doc: Record<string, unknown>): Scene {
  const r = parseScene({ version: 2, tank: { width: 1, height: 0.5, cellSize: 0.03125 }, ...doc });
  if (!r.ok) throw new Error(JSON.stringify(r.errors));
  return r.scene;
}

const timing = (endFrame: number, substeps = 5) => ({ fps: 24, startFrame: 1, endFrame, substeps });

describe('bakeCost', () => {
  it('adds pressure work (cells × frames × substeps × iterations) and particle work (particles × frames × substeps)', () => {
    // 32 × 16 cells, 10 frames, 2 substeps, 7 iterations; a 0.5 × 0.25 m pour at 4 per cell of (1/32 m)²
    const s = scene({
      timing: timing(10, 2), physics: { pressureIterations: 7 },
      pours: [{ id: 'p', shape: { type: 'rect', x: 0, y: 0, width: 0.5, height: 0.25 } }],
    });
    const c = bakeCost(s);
    const particles = 0.5 * 0.25 * 4 * 32 * 32;
    expect(c.cells).toBe(32 * 16);
    expect(c.pressure).toBe(32 * 16 * 10 * 2 * 7);
    expect(c.particles).toBeCloseTo(particles * 10 * 2, 6);
    expect(c.total).toBeCloseTo(c.pressure + c.particles, 6);
  });

  it('counts spout emission in the particles', () => {
    const base = { timing: timing(48) };
    const spout = { id: 's', shape: { type: 'circle', x: 0.5, y: 0.4, radius: 0.05 }, velocity: [0, -2], startFrame: 1, endFrame: 48 };
    expect(bakeCost(scene({ ...base, spouts: [spout] })).particles).toBeGreaterThan(bakeCost(scene(base)).particles);
  });

  it('grows linearly with frames', () => {
    const pours = [{ id: 'p', shape: { type: 'rect', x: 0, y: 0, width: 0.5, height: 0.25 } }];
    const a = bakeCost(scene({ timing: timing(100), pours })).total;
    const b = bakeCost(scene({ timing: timing(300), pours })).total;
    expect(b / a).toBeCloseTo(3, 9);
  });

  it('names the field furthest above its nominal value', () => {
    expect(bakeCost(scene({ timing: timing(10_000) })).dominant).toBe('timing.endFrame');
    expect(bakeCost(scene({ timing: timing(48, 150) })).dominant).toBe('timing.substeps');
    expect(bakeCost(scene({ timing: timing(48), physics: { pressureIterations: 5000 } })).dominant).toBe('physics.pressureIterations');
    expect(bakeCost(scene({ tank: { width: 8, height: 8, cellSize: 0.005 }, timing: timing(48) })).dominant).toBe('tank.cellSize');
  });
});

describe('checkBakeCost', () => {
  it('refuses a scene of 10⁷ frames, naming timing.endFrame and the limit', () => {
    const err = checkBakeCost(scene({ timing: timing(10_000_000) }));
    expect(err).not.toBeNull();
    expect(err!.field).toBe('timing.endFrame');
    expect(err!.message).toContain('the limit is 1.0 × 10¹¹');
  });

  it('accepts the reference dam break at the default limit', () => {
    expect(checkBakeCost(referenceDamBreak().scene)).toBeNull();
  });

  it('uses the limit it is given (a studio limit)', () => {
    const s = referenceDamBreak().scene;
    const total = bakeCost(s).total;
    expect(checkBakeCost(s, total)).toBeNull();
    expect(checkBakeCost(s, total - 1)).not.toBeNull();
    expect(DEFAULT_BAKE_COST_LIMIT).toBeGreaterThan(total);
  });
});
