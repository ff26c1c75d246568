// Small scene documents for integration tests (coarse grids so bakes take well under a second).
export function tinyScene(frames = 10, seed = 1) {
  return {
    version: 1,
    tank: { width: 0.5, height: 0.5, cellSize: 0.5 / 16 },
    timing: { fps: 24, startFrame: 1001, endFrame: 1000 + frames, substeps: 2 },
    physics: { seed },
    pours: [{ id: 'block', shape: { type: 'rect', x: 0, y: 0, width: 0.2, height: 0.3 }, velocity: [0, 0] }],
  };
}

/** A heavier scene (about a second per frame) for tests that need a bake to be caught mid-way. */
export function slowScene(frames = 60) {
  return {
    version: 1,
    tank: { width: 1, height: 1, cellSize: 1 / 96 },
    timing: { fps: 24, startFrame: 1001, endFrame: 1000 + frames, substeps: 6 },
    physics: { seed: 3 },
    pours: [{ id: 'block', shape: { type: 'rect', x: 0, y: 0, width: 0.5, height: 0.8 }, velocity: [0, 0] }],
  };
}
