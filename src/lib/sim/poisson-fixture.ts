// A pressure system to compare the projection's solvers on (tests and `npm run bench -- pressure`): a
// walled tank of n × n liquid-or-air cells with a wavy free surface, a round solid obstacle in the liquid,
// ghost-fluid face weights 1/θ at the surface (θ from the surface's exact height, as surface.ts derives it
// from the density) and a velocity field that is a smooth swirl plus a seeded random part (so the
// right-hand side has both smooth and cell-sized components). Our own construction (no outside source).
import { FLUID, AIR, SOLID, type ProjectionGrid } from './pressure';
import { THETA_MIN } from './surface';
import { mulberry32 } from './prng';

/**
 * `closed`: the tank is walled on all four sides and full of liquid (no air: only Neumann boundaries, a
 * singular system whose right-hand side sums to zero, as the velocities through the walls are zero).
 */
export function poissonFixture(n: number, seed = 1, closed = false): ProjectionGrid {
  const nx = n + 2, ny = n + 2, nc = nx * ny;
  const f = () => new Float64Array(nc);
  const g: ProjectionGrid = {
    nx, ny, gu: f(), gv: f(), open: f(), faceU: f(), faceV: f(), type: new Uint8Array(nc), fluid: new Int32Array(nc), fluidCount: 0,
    q: f(), res: f(), zv: f(), dir: f(), adir: f(), precon: f(), diag: f(), lastIterations: 0,
  };
  const rnd = mulberry32(seed);
  // cell centres in units of the tank width; the surface height at x
  const surface = (x: number) => 0.6 + 0.08 * Math.sin(5 * x) + 0.03 * Math.sin(17 * x);
  const cx = (i: number) => (i - 0.5) / n, cy = (j: number) => (j - 0.5) / n;
  for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) {
    const c = i + nx * j;
    const wall = i === 0 || j === 0 || i === nx - 1 || (closed && j === ny - 1); // the top row stays open air
    const obstacle = (cx(i) - 0.62) ** 2 + (cy(j) - 0.25) ** 2 < 0.012;
    g.type[c] = wall || obstacle ? SOLID : !closed && (j === ny - 1 || cy(j) > surface(cx(i))) ? AIR : FLUID;
    g.open[c] = g.type[c] === SOLID ? 0 : 1;
  }
  const weight = (a: number, b: number, vertical: boolean): number => {
    const ta = g.type[a], tb = g.type[b];
    if (ta === SOLID || tb === SOLID) return 0;
    if (ta === FLUID && tb === FLUID) return 1;
    if (ta !== FLUID && tb !== FLUID) return 0;
    const l = ta === FLUID ? a : b;
    // distance (cells) from the liquid centre to the surface along the face normal (sideways: a seeded 0.5–1)
    const theta = vertical ? (surface(cx(l % nx)) - cy((l / nx) | 0)) * n : 0.5 + 0.5 * rnd();
    return 1 / Math.min(1, Math.max(THETA_MIN, theta));
  };
  for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) {
    const c = i + nx * j;
    g.faceU[c] = i > 0 ? weight(c - 1, c, false) : 0;
    g.faceV[c] = j > 0 ? weight(c - nx, c, true) : 0;
    const x = i / n, y = j / n;
    g.gu[c] = Math.sin(3 * x) * Math.cos(2 * y) + 0.3 * (rnd() - 0.5);
    g.gv[c] = -Math.cos(3 * x) * Math.sin(2 * y) + 0.3 * (rnd() - 0.5);
    if (g.faceU[c] === 0) g.gu[c] = 0; // solid faces carry the (resting) solid's velocity
    if (g.faceV[c] === 0) g.gv[c] = 0;
  }
  return g;
}

/** A deep copy (the solvers write the velocities, q and the scratch). */
export function copyGrid(g: ProjectionGrid): ProjectionGrid {
  return {
    ...g, gu: g.gu.slice(), gv: g.gv.slice(), open: g.open.slice(), faceU: g.faceU.slice(), faceV: g.faceV.slice(), type: g.type.slice(),
    fluid: g.fluid.slice(), q: g.q.slice(), res: g.res.slice(), zv: g.zv.slice(), dir: g.dir.slice(), adir: g.adir.slice(),
    precon: g.precon.slice(), diag: g.diag.slice(),
  };
}
