// Small scenes for solver tests (coarse grids keep the suite fast).
import { parseScene, type Scene } from '../../../src/lib/scene/schema';

/** Parses a scene document or throws with the errors; for tests. */
export function sceneFrom(doc: unknown): Scene {
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
