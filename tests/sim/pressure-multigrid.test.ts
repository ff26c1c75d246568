// The multigrid-preconditioned CG (McAdams, Sifakis & Teran 2010, "A parallel multigrid Poisson solver for
// fluids simulation on large grids") against today's MIC(0) CG (Bridson 2015, §5.4) on the same systems:
// walled tanks with a ghost-fluid free surface (face weights 1/θ), a solid obstacle and a random-plus-smooth
// velocity field (src/lib/sim/poisson-fixture.ts). Residuals are recomputed here from the face weights and
// the untouched velocities, not taken from the solver.
import { describe, it, expect } from 'vitest';
import { projectPcgMic0, projectPcgMultigrid, solvePoisson, FLUID, type Coupling, type ProjectionGrid } from '../../src/lib/sim/pressure';
import { poissonFixture, copyGrid } from '../../src/lib/sim/poisson-fixture';
import { createSolver, WATER_DENSITY } from '../../src/lib/sim/solver';
import { sceneFrom } from './helpers/scenes';

type Project = (g: ProjectionGrid, maxIterations: number, tolerance: number, coupling?: Coupling) => number;
const METHODS: [string, Project][] = [['pcg-mic0', projectPcgMic0], ['pcg-multigrid', projectPcgMultigrid]];

/**
 * ‖b − (A + C)·q‖₂ / ‖b‖₂ from first principles: b_c = −(u_{i+1} − u_i + v_{j+1} − v_j) of the velocities
 * before the solve; (A·q)_c = Σ_faces w_f·(q_c − q_n) with q_n = 0 outside liquid and w_f = 0 at solids.
 */
function independentResidual(before: ProjectionGrid, q: Float64Array, coupling?: Coupling): number {
  const { nx, ny, type, gu: u, gv: v, faceU: wu, faceV: wv } = before;
  const qn = (c: number) => (type[c] === FLUID ? q[c] : 0);
  const cq = new Float64Array(nx * ny);
  if (coupling) coupling.apply(q, cq, 1);
  let rr = 0, bb = 0;
  for (let j = 1; j < ny - 1; j++) for (let i = 1; i < nx - 1; i++) {
    const c = i + nx * j;
    if (type[c] !== FLUID) continue;
    const b = -(u[c + 1] - u[c] + v[c + nx] - v[c]);
    const aq = wu[c] * (q[c] - qn(c - 1)) + wu[c + 1] * (q[c] - qn(c + 1)) + wv[c] * (q[c] - qn(c - nx)) + wv[c + nx] * (q[c] - qn(c + nx));
    rr += (b - aq - cq[c]) ** 2;
    bb += b * b;
  }
  return Math.sqrt(rr / bb);
}

/** ‖D‖₂/‖b‖₂ of the velocities after the projection (what the step keeps), recomputed here. */
function divergenceAfter(before: ProjectionGrid, after: ProjectionGrid): number {
  const { nx, ny, type } = before;
  let dd = 0, bb = 0;
  for (let c = nx; c < nx * (ny - 1); c++) {
    if (type[c] !== FLUID) continue;
    const div = (g: ProjectionGrid) => g.gu[c + 1] - g.gu[c] + g.gv[c + nx] - g.gv[c];
    dd += div(after) ** 2;
    bb += div(before) ** 2;
  }
  return Math.sqrt(dd / bb);
}

function solve(method: Project, n: number, tolerance: number, seed = 1, coupling?: Coupling, closed = false) {
  const before = poissonFixture(n, seed, closed);
  const g = copyGrid(before);
  const reported = method(g, 5000, tolerance, coupling);
  return { before, g, reported, iterations: g.lastIterations };
}

describe('multigrid-preconditioned CG: same system, same tolerance', () => {
  for (const n of [64, 128]) for (const tolerance of [1e-2, 1e-6]) {
    it(`${n}² cells, tolerance ${tolerance}: both CG solvers reach it (residual recomputed independently)`, () => {
      for (const [name, method] of METHODS) {
        const { before, g, reported } = solve(method, n, tolerance);
        const r = independentResidual(before, g.q);
        expect(r, name).toBeLessThanOrEqual(tolerance * (1 + 1e-9));
        // what the step keeps: the projected velocities' divergence is that residual
        expect(Math.abs(divergenceAfter(before, g) - r), name).toBeLessThan(1e-9 + 1e-6 * r);
        expect(Math.abs(reported - r), name).toBeLessThan(1e-9 + 1e-6 * r);
        expect(g.lastIterations, name).toBeGreaterThan(0);
      }
    });
  }

  it('closed tank full of liquid (Neumann walls only, a singular system): both reach 1e-6', () => {
    for (const [name, method] of METHODS) {
      const { before, g } = solve(method, 96, 1e-6, 4, undefined, true);
      expect(g.fluidCount, name).toBeGreaterThan(80 * 80);
      expect(independentResidual(before, g.q), name).toBeLessThanOrEqual(1e-6 * (1 + 1e-9));
    }
  });

  it('tight tolerance: both give the same pressure (within 1e-6 relative)', () => {
    const a = solve(projectPcgMic0, 64, 1e-10).g, b = solve(projectPcgMultigrid, 64, 1e-10).g;
    let dd = 0, qq = 0;
    for (let k = 0; k < a.fluidCount; k++) { const c = a.fluid[k]; dd += (a.q[c] - b.q[c]) ** 2; qq += a.q[c] ** 2; }
    expect(Math.sqrt(dd / qq)).toBeLessThan(1e-6);
  });

  it('with a rigid-body coupling term (symmetric, rank one, as rigid.ts adds): both reach the tolerance of (A + C)·q = b', () => {
    // C = k·w·wᵀ over a strip of liquid cells (a prop's row of B, rigid.ts): k chosen of the order of A's diagonal
    const probe = poissonFixture(64, 3);
    const cells: number[] = [];
    for (let j = 20; j < 30; j++) { const c = 30 + probe.nx * j; if (probe.type[c] === FLUID) cells.push(c); }
    expect(cells.length).toBeGreaterThan(5);
    const k = 3;
    const coupling: Coupling = {
      apply(x, out, sign) { let s = 0; for (const c of cells) s += x[c]; for (const c of cells) out[c] += sign * k * s; return k * s * s; },
      finish() { /* nothing moves */ },
    };
    for (const [name, method] of METHODS) {
      const { before, g } = solve(method, 64, 1e-6, 3, coupling);
      expect(independentResidual(before, g.q, coupling), name).toBeLessThanOrEqual(1e-6 * (1 + 1e-9));
    }
  });

  it('solvePoisson (the drift correction) after a multigrid projection reaches its tolerance on the same matrix', () => {
    const { before, g } = solve(projectPcgMultigrid, 64, 1e-2);
    const rhs = new Float64Array(g.nx * g.ny), x = new Float64Array(g.nx * g.ny);
    for (let k = 0; k < g.fluidCount; k++) rhs[g.fluid[k]] = Math.sin(k);
    solvePoisson(g, x, rhs, 5000, 1e-6);
    // ‖rhs − A·x‖ recomputed: as independentResidual with b = rhs
    const { nx, type, faceU: wu, faceV: wv } = before;
    const xn = (c: number) => (type[c] === FLUID ? x[c] : 0);
    let rr = 0, bb = 0;
    for (let k = 0; k < g.fluidCount; k++) {
      const c = g.fluid[k];
      const ax = wu[c] * (x[c] - xn(c - 1)) + wu[c + 1] * (x[c] - xn(c + 1)) + wv[c] * (x[c] - xn(c - nx)) + wv[c + nx] * (x[c] - xn(c + nx));
      rr += (rhs[c] - ax) ** 2; bb += rhs[c] ** 2;
    }
    expect(Math.sqrt(rr / bb)).toBeLessThanOrEqual(1e-6 * (1 + 1e-9));
  });
});

describe('multigrid-preconditioned CG: iterations as the grid grows', () => {
  it('64² → 128² → 256² at tolerance 1e-6: multigrid grows at most 1.5×, less than MIC(0) does', () => {
    // McAdams et al. 2010 report an iteration count about independent of resolution for MGPCG; incomplete-
    // Cholesky PCG's count grows with the grid's side (from memory: roughly like its square root). The 1.5×
    // band is the brief's; measured here: MIC(0) 36, 63, 119 and multigrid 10, 10, 11.
    const counts: Record<string, number[]> = {};
    for (const [name, method] of METHODS) {
      counts[name] = [64, 128, 256].map((n) => {
        const { before, g } = solve(method, n, 1e-6, 2);
        expect(independentResidual(before, g.q)).toBeLessThanOrEqual(1e-6 * (1 + 1e-9));
        return g.lastIterations;
      });
    }
    const growth = (a: number[]) => a[2] / a[0];
    console.log(`iterations at 64², 128², 256²: ${Object.entries(counts).map(([k, v]) => `${k} ${v.join(', ')}`).join('; ')}`);
    expect(growth(counts['pcg-multigrid'])).toBeLessThanOrEqual(1.5);
    expect(growth(counts['pcg-multigrid'])).toBeLessThan(growth(counts['pcg-mic0']));
    // and it needs fewer of them at every size
    for (let k = 0; k < 3; k++) expect(counts['pcg-multigrid'][k]).toBeLessThan(counts['pcg-mic0'][k]);
  });
});

describe('the solver with pcg-multigrid', () => {
  it('settled tank at 1/64 m cells: p(d) = ρ·g·d within 2 % (Pascal), as with the default solver', () => {
    const sim = createSolver(sceneFrom({
      version: 1,
      tank: { width: 0.25, height: 0.625, cellSize: 1 / 64 },
      timing: { fps: 24, startFrame: 1001, endFrame: 1048, substeps: 4 },
      physics: { seed: 5, pressureSolver: 'pcg-multigrid' },
      pours: [{ id: 'still', shape: { type: 'rect', x: 0, y: 0, width: 0.25, height: 0.5 } }],
    }));
    const g = 9.81, heights = [0.05, 0.15, 0.25], mean = heights.map(() => 0);
    let surface = 0, worst = 0;
    for (let f = 0; f < 48; f++) {
      const st = sim.stepFrame();
      worst = Math.max(worst, st.pressureResidual);
      if (f >= 36) {
        heights.forEach((y, k) => { mean[k] += sim.pressureAt(0.125, y) / 12; });
        surface += st.liquidArea / 0.25 / 12;
      }
    }
    expect(worst).toBeLessThanOrEqual(1e-2 * (1 + 1e-9)); // the default tolerance, every substep
    heights.forEach((y, k) => {
      const expected = WATER_DENSITY * g * (surface - y); // Pascal's law
      expect(Math.abs(mean[k] - expected) / expected).toBeLessThan(0.02);
    });
  });
});

describe('the scene option', () => {
  it('physics.pressureSolver takes pcg-multigrid and still refuses an unknown name, naming the field', async () => {
    const { parseScene } = await import('../../src/lib/scene/schema');
    const doc = { version: 1, tank: { width: 1, height: 1, cellSize: 1 / 32 }, timing: { fps: 24, startFrame: 1, endFrame: 2 } };
    const ok = parseScene({ ...doc, physics: { pressureSolver: 'pcg-multigrid' } });
    expect(ok.ok && ok.scene.physics.pressureSolver).toBe('pcg-multigrid');
    const bad = parseScene({ ...doc, physics: { pressureSolver: 'multigrid' } });
    expect(bad.ok).toBe(false);
    expect(JSON.stringify(bad)).toContain('physics.pressureSolver');
  });
});
