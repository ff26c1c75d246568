// Small scenes for solver tests (coarse grids keep the suite fast).
import { parseScene, type Scene } from '../../../src/lib/scene/schema';

/**
 * Parses a scene document or throws with the errors; for tests. TIDEMARK_TEST_PRESSURE_SOLVER (e.g.
 * pcg-multigrid) sets the pressure solver of every scene that does not name one, to run the validation
 * tests with another solver (the golden checksum is then expected to differ).
 */
export function sceneFrom(doc: unknown): Scene {
  const solver = process.env.TIDEMARK_TEST_PRESSURE_SOLVER;
  if (solver && doc && typeof doc === 'object') {
    const d = doc as { physics?: Record<string, unknown> };
    if (d.physics?.pressureSolver === undefined) doc = { ...d, physics: { ...(d.physics ?? {}), pressureSolver: solver } };
  }
  const r = parseScene(doc);
  if (!r.ok) throw new Error(JSON.stringify(r.errors));
  return r.scene;
}

/** Mean of the first `n` entries. */
export function mean(a: ArrayLike<number>, n = a.length): number {
  let s = 0;
  for (let i = 0; i < n; i++) s += a[i];
  return s / n;
}
