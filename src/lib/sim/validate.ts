// Debug checks of the solver state after each stage (SolverOptions.validate or TIDEMARK_VALIDATE=1).
// Each check names the stage after which an invariant first broke, so a bad bake points at its cause.
import type { Scene } from '../scene/schema';
import type { FlipState } from './stages';
import { FLUID, SOLID } from './pressure';

export class SolverInvariantError extends Error {
  constructor(readonly stage: string, detail: string) {
    super(`after stage "${stage}": ${detail}`);
    this.name = 'SolverInvariantError';
  }
}

/**
 * Throws SolverInvariantError when the state is broken after `stage`:
 * - particle count within capacity, positions and velocities finite;
 * - from "particles to grid" on: no liquid cell inside a solid, grid velocities finite;
 * - after "pressure": the relative residual within the scene's tolerance unless the iteration cap was hit
 *   (then the solve stopped early by design and the frame stats report it). 1.5 × because CG stops on its
 *   recurrence residual, which drifts from the true ‖b − A q‖ by rounding.
 */
export function validateAfter(S: FlipState, stage: string, physics: Scene['physics'], residual: number): void {
  if (S.n < 0 || S.n > S.cap) throw new SolverInvariantError(stage, `particle count ${S.n} outside 0…${S.cap}`);
  for (let p = 0; p < S.n; p++) {
    if (!Number.isFinite(S.x[p]) || !Number.isFinite(S.y[p]) || !Number.isFinite(S.u[p]) || !Number.isFinite(S.v[p])) {
      throw new SolverInvariantError(stage, `particle ${S.ids[p]} has a non-finite position or velocity`);
    }
  }
  if (stage === 'particles to grid' || stage === 'pressure' || stage === 'grid to particles') {
    for (let c = 0; c < S.nc; c++) {
      if (S.type[c] === FLUID && S.solid[c] !== 0) throw new SolverInvariantError(stage, `liquid cell ${c} inside a solid`);
      if (S.type[c] === SOLID && S.solid[c] === 0) throw new SolverInvariantError(stage, `solid cell ${c} with no solid`);
      if (!Number.isFinite(S.gu[c]) || !Number.isFinite(S.gv[c])) throw new SolverInvariantError(stage, `grid velocity at cell ${c} is not finite`);
    }
  }
  if (stage === 'pressure' && S.fluidCount > 0) {
    const capped = S.lastIterations >= physics.pressureIterations;
    if (!Number.isFinite(residual) || (!capped && residual > 1.5 * physics.pressureTolerance)) {
      throw new SolverInvariantError(stage, `pressure residual ${residual} above the tolerance ${physics.pressureTolerance}`);
    }
  }
}
