// The bake summary compares like with like: area per particle, first frame with liquid against the last frame.
// Expected values are arithmetic on the figures given (no outside source needed).
import { describe, expect, it } from 'vitest';
import { areaChange } from '../../src/lib/review/bake-summary';

describe('areaChange', () => {
  it('reads a bake that lost all its measured liquid as −100 %, not a small change', () => {
    const frames = [{ count: 1000, liquidArea: 2 }, { count: 1000, liquidArea: 2.02 }, { count: 1000, liquidArea: 0 }];
    expect(areaChange(frames)).toBe(-1);
  });

  it('does not count liquid a spout adds as volume gained', () => {
    // a spout doubles the particles and the area: the volume per particle is unchanged
    expect(areaChange([{ count: 0, liquidArea: 0 }, { count: 500, liquidArea: 1 }, { count: 1000, liquidArea: 2 }])).toBeCloseTo(0, 12);
  });

  it('reports a 10 % compression at a constant particle count', () => {
    expect(areaChange([{ count: 800, liquidArea: 1 }, { count: 800, liquidArea: 0.9 }])).toBeCloseTo(-0.1, 12);
  });

  it('is null with nothing to compare', () => {
    expect(areaChange([])).toBeNull();
    expect(areaChange([{ count: 10, liquidArea: null }, { count: 10, liquidArea: 1 }])).toBeNull();
  });
});
