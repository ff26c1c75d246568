// Small scenes for solver tests (coarse grids keep the suite fast).
import { readFileSync } from 'node:fs';
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

/**
 * The golden scene (tests/sim/golden.test.ts, also baked on several threads in threads.test.ts): the harbour splash
 * at 1/32 m with two liquids, a spout of the second (particles appended anywhere), a drain and a wall, a keyed and a
 * free prop — every stage runs.
 */
export function goldenScene(): Scene {
  const doc = JSON.parse(readFileSync(new URL('../../fixtures/scenes/harbour-splash.json', import.meta.url), 'utf8'));
  doc.version = 2;
  doc.tank.cellSize = 1 / 32;
  doc.liquids = [
    { id: 'water', name: 'Water', colour: '#3A8FB7', viscosity: 1e-6 },
    { id: 'paint', name: 'Paint', colour: '#C8341E', viscosity: 1e-6 },
  ];
  doc.spouts[0].liquid = 'paint';
  doc.props.push({ id: 'float', shape: { type: 'rect', x: 0.2, y: 0.85, width: 0.1, height: 0.06 }, motion: 'free', density: 500 });
  return sceneFrom(doc);
}
