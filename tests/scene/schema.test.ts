// Scene document (v1 documents here, migrated on read): good documents parse with defaults; bad fields are reported by path.
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { parseScene, formatSceneErrors, DEFAULT_PRESSURE_SOLVER, DEFAULT_PRESSURE_TOLERANCE } from '../../src/lib/scene/schema';

const example = JSON.parse(readFileSync(new URL('../fixtures/scenes/harbour-splash.json', import.meta.url), 'utf8'));
const minimal = { version: 1, tank: { width: 1, height: 0.5, cellSize: 0.03125 } };

function errorsOf(doc: unknown) {
  const r = parseScene(doc);
  if (r.ok) throw new Error('expected the scene to be rejected');
  return r.errors;
}

function withChange(path: (string | number)[], value: unknown) {
  const doc = structuredClone(example);
  let o = doc;
  for (const k of path.slice(0, -1)) o = o[k];
  o[path[path.length - 1]] = value;
  return doc;
}

describe('parseScene', () => {
  it('parses the example document and keeps its values', () => {
    const r = parseScene(example);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.scene.tank.cellSize).toBe(0.0078125);
    expect(r.scene.props[0].keys[1]).toEqual({ frame: 1010, dx: 0, dy: -0.6, angle: 25 });
    expect(r.scene.walls[0].shape).toEqual({ type: 'circle', x: 0.7, y: 0.15, radius: 0.1 });
  });

  it('accepts a JSON string as well as a value', () => {
    expect(parseScene(JSON.stringify(example)).ok).toBe(true);
  });

  it('fills defaults, including the optional pressure solver fields (backwards compatible)', () => {
    const r = parseScene(minimal);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.scene.physics.flipRatio).toBe(0.9);
    expect(r.scene.physics.particlesPerCell).toBe(4);
    expect(r.scene.physics.pressureSolver).toBe(DEFAULT_PRESSURE_SOLVER);
    expect(r.scene.physics.pressureTolerance).toBe(DEFAULT_PRESSURE_TOLERANCE);
    expect(r.scene.tank.sides).toEqual({ left: true, right: true, bottom: true, top: true });
    expect(r.scene.timing).toEqual({ fps: 24, startFrame: 1001, endFrame: 1048, substeps: 5 });
    expect(r.scene.pours).toEqual([]);
  });

  it('accepts an explicit pressure solver and tolerance', () => {
    const r = parseScene({ ...minimal, physics: { pressureSolver: 'gauss-seidel', pressureTolerance: 1e-3 } });
    expect(r.ok && r.scene.physics.pressureSolver).toBe('gauss-seidel');
  });

  it.each([
    [['physics', 'flipRatio'], 1.5, 'physics.flipRatio'],
    [['physics', 'pressureSolver'], 'jacobi', 'physics.pressureSolver'],
    [['physics', 'pressureTolerance'], 0, 'physics.pressureTolerance'],
    [['physics', 'particlesPerCell'], 3, 'physics.particlesPerCell'],
    [['physics', 'gravity'], [0], 'physics.gravity'],
    [['tank', 'cellSize'], -1, 'tank.cellSize'],
    [['tank', 'width'], 0, 'tank.width'], // any positive width is accepted (tests/sim/tank-size.test.ts); 0 is not
    [['timing', 'substeps'], 0, 'timing.substeps'],
    [['pours', 0, 'shape', 'width'], -0.5, 'pours.0.shape.width'],
    [['walls', 0, 'shape', 'radius'], 'big', 'walls.0.shape.radius'],
    [['walls', 0, 'shape', 'type'], 'star', 'walls.0.shape.type'],
    [['props', 0, 'keys', 1, 'frame'], 1000, 'props.0.keys.1.frame'],
    [['spouts', 0, 'endFrame'], 1000, 'spouts.0.endFrame'],
    [['drains', 0, 'id'], 'basin', 'drains.0.id'],
    [['version'], 3, 'version'],
  ])('reports %j = %j at path %s', (path, value, expected) => {
    const errors = errorsOf(withChange(path as (string | number)[], value));
    expect(errors.map((e) => e.path)).toContain(expected);
    expect(errors.every((e) => e.message.length > 0)).toBe(true);
  });

  it('rejects unknown fields (catches typos) at their path', () => {
    const errors = errorsOf({ ...minimal, physics: { flipRatoi: 0.5 } });
    expect(errors[0].path).toBe('physics');
    expect(errors[0].message).toMatch(/flipRatoi/);
  });

  it('rejects polygons with zero area', () => {
    const errors = errorsOf({ ...minimal, walls: [{ id: 'w', shape: { type: 'polygon', points: [[0, 0], [1, 1], [2, 2]] } }] });
    expect(errors.map((e) => e.path)).toContain('walls.0.shape.points');
  });

  it('enforces the grid limit of 2000 × 2000 cells', () => {
    const errors = errorsOf({ version: 1, tank: { width: 2.001, height: 1, cellSize: 0.001 } });
    expect(errors.find((e) => e.path === 'tank.cellSize')?.message).toMatch(/2001 × 1000 cells/);
  });

  it('enforces the 2 M particle limit', () => {
    // 1 m² at cell 1/1000 m and 4 per cell = 4 M particles
    const errors = errorsOf({ version: 1, tank: { width: 1, height: 1, cellSize: 0.001 }, pours: [{ id: 'p', shape: { type: 'rect', x: 0, y: 0, width: 1, height: 1 } }] });
    expect(errors.map((e) => e.path)).toContain('pours');
  });

  it('reports invalid JSON as a document error', () => {
    const errors = errorsOf('{"version": 1,');
    expect(errors[0].path).toBe('(document)');
    expect(formatSceneErrors(errors)).toMatch(/^\(document\): not valid JSON/);
  });
});
