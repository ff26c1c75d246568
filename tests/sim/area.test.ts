// Liquid area: the ½ρ₀ iso-contour of the cell-centred density (marching squares), which must read a block's
// geometric area, grow when the particles spread out and shrink when they are compressed.
import { describe, it, expect } from 'vitest';
import { squareIsoArea, liquidArea } from '../../src/lib/sim/area';
import { FlipState, classifyCells, depositDensity, estimateRestDensity } from '../../src/lib/sim/stages';
import { createSolver } from '../../src/lib/sim/solver';
import { sceneFrom } from './helpers/scenes';

describe('squareIsoArea (one marching square)', () => {
  it('gives the exact polygon areas of linear crossings (shoelace by hand)', () => {
    expect(squareIsoArea(1, 1, 1, 1, 0.5)).toBe(1);
    expect(squareIsoArea(0, 0, 0, 0, 0.5)).toBe(0);
    // left half inside: crossings at x = ½ on the bottom and top edges → area ½
    expect(squareIsoArea(1, 0, 0, 1, 0.5)).toBeCloseTo(0.5, 12);
    // crossings at x = ¾ (bottom, values 1 → 0 at level ¼) and x = ¾ (top) → area ¾
    expect(squareIsoArea(1, 0, 0, 1, 0.25)).toBeCloseTo(0.75, 12);
    // one corner inside, crossings at ½ along both edges → triangle ½·½·½ = ⅛
    expect(squareIsoArea(1, 0, 0, 0, 0.5)).toBeCloseTo(0.125, 12);
    // three corners inside → 1 − ⅛
    expect(squareIsoArea(0, 1, 1, 1, 0.5)).toBeCloseTo(0.875, 12);
  });
  it('resolves a saddle by the mean of the corners', () => {
    // corners a, c at 1, b, d at 0: mean ½ ≥ level → joined hexagon 1 − 2·⅛ = ¾
    expect(squareIsoArea(1, 0, 1, 0, 0.5)).toBeCloseTo(0.75, 12);
    // corners at 0.8 and 0: mean 0.4 < ½ → two triangles with legs (0.8 − 0.5)/0.8 = ⅜: 2·½·(⅜)²
    expect(squareIsoArea(0.8, 0, 0.8, 0, 0.5)).toBeCloseTo((3 / 8) ** 2, 12);
  });
});

function blockState(pour: { x: number; y: number; width: number; height: number }) {
  const scene = sceneFrom({
    version: 1, tank: { width: 1, height: 1, cellSize: 1 / 32 },
    timing: { fps: 24, startFrame: 1, endFrame: 2, substeps: 1 }, physics: { seed: 2 },
    pours: [{ id: 'block', shape: { type: 'rect', ...pour } }],
  });
  const S = new FlipState(scene);
  classifyCells(S);
  depositDensity(S);
  const rest = estimateRestDensity(S);
  return { S, rest, area: () => { depositDensity(S); return liquidArea(S, rest); } };
}

/** Scales particle x about the block's centroid by sx (positions only; the density is re-deposited). */
function scaleX(S: FlipState, sx: number): void {
  let cx = 0;
  for (let p = 0; p < S.n; p++) cx += S.x[p];
  cx /= S.n;
  for (let p = 0; p < S.n; p++) S.x[p] = cx + (S.x[p] - cx) * sx;
}

describe('liquid area of a block of particles at rest', () => {
  const geometric = 0.4 * 0.3; // m², the poured rectangle
  it('reads the rectangle within 3 % (0.4 m × 0.3 m block, 13 × 10 cells)', () => {
    const { area } = blockState({ x: 0.3, y: 0.3, width: 0.4, height: 0.3 });
    expect(Math.abs(area() - geometric) / geometric).toBeLessThan(0.03);
  });
  it('rises markedly when the particles are spread 1.5× in x (density 2/3 ρ₀, still above ½)', () => {
    const { S, area } = blockState({ x: 0.3, y: 0.3, width: 0.4, height: 0.3 });
    const a0 = area();
    scaleX(S, 1.5);
    const a1 = area();
    // geometric expectation ×1.5, less a rim: at 2/3 ρ₀ the ½ρ₀ level sits about a third of a cell inside
    // the spread block's edges (the bilinear kernel halves the density at an edge). Measured 1.33. The
    // former measure Σ min(1, ρ/ρ₀)·h² reads 1.0 here: it counts particles, not the area they cover.
    expect(a1 / a0).toBeGreaterThan(1.25);
    expect(a1 / a0).toBeLessThan(1.6);
  });
  it('falls when the particles are compressed 1.5× in x', () => {
    const { S, area } = blockState({ x: 0.3, y: 0.3, width: 0.4, height: 0.3 });
    const a0 = area();
    scaleX(S, 1 / 1.5);
    expect(area() / a0).toBeGreaterThan(0.6);
    expect(area() / a0).toBeLessThan(0.74);
  });
  it('a block resting in a corner of the tank reads its area (solid cells count as full, then are subtracted)', () => {
    const { area } = blockState({ x: 0, y: 0, width: 0.4, height: 0.3 });
    expect(Math.abs(area() - geometric) / geometric).toBeLessThan(0.03);
  });
  it('a full tank reads the tank area', () => {
    const { area } = blockState({ x: 0, y: 0, width: 1, height: 1 });
    expect(Math.abs(area() - 1)).toBeLessThan(0.01);
  });
});

describe('stats() before the first step', () => {
  it('reports the initial frame without stepping and without changing the bake', () => {
    const doc = {
      version: 1, tank: { width: 0.5, height: 0.5, cellSize: 1 / 32 },
      timing: { fps: 24, startFrame: 1001, endFrame: 1010, substeps: 2 }, physics: { seed: 7 },
      pours: [{ id: 'drop', shape: { type: 'rect', x: 0.1, y: 0.1, width: 0.2, height: 0.2 }, velocity: [0.5, 0] }],
    };
    const a = createSolver(sceneFrom(doc)), b = createSolver(sceneFrom(doc));
    const st = a.stats();
    expect(st.frame).toBe(1001);
    expect(st.time).toBe(0);
    expect(st.stepMs).toBe(0);
    expect(st.substeps).toBe(0);
    expect(st.count).toBe(a.count);
    expect(st.maxSpeed).toBeCloseTo(0.5, 6);
    expect(Math.abs(st.liquidArea - 0.04) / 0.04).toBeLessThan(0.05);
    expect(a.frame).toBe(1001); // did not step
    const sa = a.stepFrame(), sb = b.stepFrame();
    expect(sa.liquidArea).toBe(sb.liquidArea);
    expect(Array.from(a.x)).toEqual(Array.from(b.x));
    expect(a.stats().liquidArea).toBe(sa.liquidArea); // after a step: the same measure as the step reported
  });
});
