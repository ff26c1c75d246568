// Pressure-solve benchmark: the same systems (src/lib/sim/poisson-fixture.ts: a walled tank with a
// ghost-fluid free surface and an obstacle) at 64², 128² and 256² cells, solved by each method to the
// default tolerance and to 1e-6: iterations and ms per solve (median of several solves after a warm-up),
// all in one run. Also part of `npm run bench -- sim` (its JSON line carries the same figures).
// Usage: npx tsx src/cli/bench-pressure.ts [--rounds N]
import { projectGaussSeidel, projectPcgMic0, projectPcgMultigrid, type ProjectionGrid } from '../lib/sim/pressure';
import { poissonFixture, copyGrid } from '../lib/sim/poisson-fixture';
import { DEFAULT_PRESSURE_TOLERANCE, PRESSURE_SOLVERS, type PressureSolverName } from '../lib/scene/schema';

const SIZES = [64, 128, 256];

function run(name: PressureSolverName, g: ProjectionGrid, tolerance: number): number {
  switch (name) {
    case 'gauss-seidel': return projectGaussSeidel(g, 10000, 1.9, tolerance);
    case 'pcg-mic0': return projectPcgMic0(g, 10000, tolerance);
    case 'pcg-multigrid': return projectPcgMultigrid(g, 10000, tolerance);
  }
}

export interface PressureFigures { method: string; cells: string; tolerance: number; iterations: number; ms: number; residual: number }

export function benchPressure(rounds = 5): PressureFigures[] {
  const out: PressureFigures[] = [];
  for (const tolerance of [DEFAULT_PRESSURE_TOLERANCE, 1e-6]) {
    for (const n of SIZES) {
      const base = poissonFixture(n, 1);
      // Gauss–Seidel needs thousands of sweeps at 256² for 1e-6: left out there
      for (const name of PRESSURE_SOLVERS) {
        if (name === 'gauss-seidel' && (tolerance < 1e-3 || n > 128)) continue;
        run(name, copyGrid(base), tolerance); // warm-up (JIT)
        const ms: number[] = [];
        let iterations = 0, residual = 0;
        for (let r = 0; r < rounds; r++) {
          const g = copyGrid(base);
          const t0 = performance.now();
          residual = run(name, g, tolerance);
          ms.push(performance.now() - t0);
          iterations = g.lastIterations;
        }
        ms.sort((a, b) => a - b);
        const f = { method: name, cells: `${n}x${n}`, tolerance, iterations, ms: +ms[Math.floor(ms.length / 2)].toFixed(3), residual };
        out.push(f);
        console.log(`pressure ${f.cells.padEnd(8)} tol=${tolerance.toExponential(0)} ${name.padEnd(14)} iterations=${String(iterations).padStart(5)} ms_per_solve=${f.ms.toFixed(2).padStart(9)} residual=${residual.toExponential(2)}`);
      }
    }
  }
  return out;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const i = process.argv.indexOf('--rounds');
  const figures = benchPressure(i >= 0 ? Number(process.argv[i + 1]) : 5);
  console.log(JSON.stringify({ pressure: figures }));
}
