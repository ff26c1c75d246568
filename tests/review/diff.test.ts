// The scene diff behind the compare screen: parameters, objects added/removed/moved/reshaped by id, tank and timing.
import { describe, it, expect } from 'vitest';
import { diffScenes, countChanges, translationBetween } from '../../src/lib/review/diff';

function base() {
  return {
    version: 1,
    tank: { width: 2, height: 1, cellSize: 0.05, sides: { left: true, right: true, bottom: true, top: false } },
    timing: { fps: 24, startFrame: 1001, endFrame: 1048, substeps: 5 },
    physics: { gravity: [0, -9.81], flipRatio: 0.9, seed: 1 },
    pours: [{ id: 'pool', shape: { type: 'rect', x: 0, y: 0, width: 1, height: 0.3 }, velocity: [0, 0] }],
    spouts: [{ id: 'jet', shape: { type: 'circle', x: 0.2, y: 0.8, radius: 0.05 }, velocity: [2, 0], startFrame: 1001, endFrame: 1020 }],
    walls: [{ id: 'lip', shape: { type: 'polygon', points: [[1, 0], [1.2, 0], [1.2, 0.4]] } }],
    props: [{ id: 'paddle', shape: { type: 'rect', x: 1.5, y: 0.2, width: 0.1, height: 0.4 }, keys: [{ frame: 1001, dx: 0, dy: 0, angle: 0 }] }],
    drains: [] as unknown[],
  };
}

describe('diffScenes', () => {
  it('finds nothing between a scene and a copy of itself', () => {
    expect(diffScenes(base(), structuredClone(base()))).toEqual([]);
  });

  it('ignores float noise far below a millimetre', () => {
    const b = base();
    b.pours[0].shape.x = 1e-13;
    expect(diffScenes(base(), b)).toEqual([]);
  });

  it('lists changed parameters with old and new values', () => {
    const b = base();
    b.physics.flipRatio = 0.95;
    b.physics.gravity = [0, -4.9];
    b.tank.cellSize = 0.025;
    b.tank.sides.top = true;
    b.timing.endFrame = 1060;
    b.timing.fps = 25;
    const changes = diffScenes(base(), b);
    const byPath = Object.fromEntries(changes.map((c) => [c.path, c]));
    expect(byPath['physics.flipRatio']).toMatchObject({ area: 'physics', kind: 'changed', before: 0.9, after: 0.95 });
    expect(byPath['physics.gravity']).toMatchObject({ before: [0, -9.81], after: [0, -4.9] });
    expect(byPath['tank.cellSize']).toMatchObject({ area: 'tank', before: 0.05, after: 0.025 });
    expect(byPath['tank.sides.top']).toMatchObject({ before: false, after: true });
    expect(byPath['timing.endFrame']).toMatchObject({ area: 'timing', before: 1048, after: 1060 });
    expect(byPath['timing.fps']).toMatchObject({ before: 24, after: 25 });
    expect(changes).toHaveLength(6);
    expect(byPath['timing.endFrame'].summary).toBe('timing.endFrame: 1048 → 1060');
  });

  it('matches objects by id across every group: added, removed, moved, reshaped', () => {
    const b = base();
    b.pours[0].shape.x = 0.25; // moved 0.25 m right
    b.spouts[0].shape.radius = 0.08; // reshaped in place
    b.walls[0].shape.points = [[1.1, 0.1], [1.3, 0.1], [1.3, 0.5]]; // the whole triangle moved
    b.props = []; // paddle removed
    b.drains = [{ id: 'sump', shape: { type: 'rect', x: 1.8, y: 0, width: 0.2, height: 0.05 } }];
    const changes = diffScenes(base(), b);
    const rows = changes.map((c) => [c.area, c.objectId, c.kind]);
    expect(rows).toEqual([
      ['pours', 'pool', 'moved'],
      ['spouts', 'jet', 'reshaped'],
      ['walls', 'lip', 'moved'],
      ['props', 'paddle', 'removed'],
      ['drains', 'sump', 'added'],
    ]);
    expect(changes[0].offset![0]).toBeCloseTo(0.25, 12);
    expect(changes[0].offset![1]).toBeCloseTo(0, 12);
    expect(changes[2].offset![0]).toBeCloseTo(0.1, 12);
    expect(changes[2].offset![1]).toBeCloseTo(0.1, 12);
    expect(changes[1].offset).toBeUndefined(); // a circle grown in place keeps its centre
    expect(countChanges(changes)).toEqual({ changed: 0, added: 1, removed: 1, moved: 2, reshaped: 1 });
  });

  it('reports a change of shape type, a resize that also moves the centre, and other object fields', () => {
    const b = base();
    (b.pours[0] as { shape: unknown }).shape = { type: 'circle', x: 0.5, y: 0.15, radius: 0.2 };
    b.props[0].shape.width = 0.3; // wider to the right: centre moves 0.1 m
    b.props[0].keys = [{ frame: 1001, dx: 0, dy: 0, angle: 0 }, { frame: 1010, dx: 0.2, dy: 0, angle: 15 }];
    b.spouts[0].velocity = [3, 0];
    b.spouts[0].endFrame = 1030;
    const changes = diffScenes(base(), b);
    const find = (p: string) => changes.find((c) => c.path === p)!;
    expect(find('pours[pool].shape')).toMatchObject({ kind: 'reshaped' });
    expect(find('pours[pool].shape').summary).toMatch(/rect → circle/);
    const paddle = find('props[paddle].shape');
    expect(paddle.kind).toBe('reshaped');
    expect(paddle.offset![0]).toBeCloseTo(0.1, 12);
    expect(find('props[paddle].keys').summary).toMatch(/1 → 2 keys/);
    expect(find('spouts[jet].velocity')).toMatchObject({ kind: 'changed', before: [2, 0], after: [3, 0] });
    expect(find('spouts[jet].endFrame')).toMatchObject({ before: 1020, after: 1030 });
  });

  it('treats an id that changed group as removed from one and added to the other', () => {
    const b = base();
    b.walls = [];
    b.drains = [{ id: 'lip', shape: base().walls[0].shape }];
    expect(diffScenes(base(), b).map((c) => `${c.area}:${c.kind}`)).toEqual(['walls:removed', 'drains:added']);
  });

  it('copes with documents that are not scenes (empty objects, missing groups)', () => {
    expect(diffScenes({}, {})).toEqual([]);
    const rows = diffScenes({}, base());
    expect(rows.filter((r) => r.kind === 'added').map((r) => r.objectId)).toEqual(['water', 'pool', 'jet', 'lip', 'paddle']) // the scene reads with its default liquid;
    expect(diffScenes(null, undefined)).toEqual([]);
  });
});

describe('translationBetween', () => {
  it('finds the offset of a translated polygon and refuses a rotated one', () => {
    const a = { type: 'polygon' as const, points: [[0, 0], [1, 0], [0, 1]] as [number, number][] };
    const moved = { type: 'polygon' as const, points: [[2, 3], [3, 3], [2, 4]] as [number, number][] };
    const turned = { type: 'polygon' as const, points: [[0, 0], [0, 1], [-1, 0]] as [number, number][] };
    expect(translationBetween(a, moved)).toEqual([2, 3]);
    expect(translationBetween(a, turned)).toBeNull();
    expect(translationBetween({ type: 'circle', x: 0, y: 0, radius: 1 }, { type: 'rect', x: 0, y: 0, width: 1, height: 1 })).toBeNull();
  });
});

describe('diffScenes across document formats', () => {
  it('a version 1 document and its version 2 reading differ in nothing', () => {
    const v1 = base();
    const v2 = {
      ...structuredClone(base()), version: 2,
      liquids: [{ id: 'water', name: 'Water', colour: '#3A8FB7', viscosity: 1e-6 }],
    };
    // v2 spells out what v1 leaves to defaults (the liquid, motion 'keyed', the pour's liquid): no row
    const spelledOut = structuredClone(v2) as Record<string, unknown> & typeof v2;
    (spelledOut.props[0] as Record<string, unknown>).motion = 'keyed';
    (spelledOut.pours[0] as Record<string, unknown>).liquid = 'water';
    expect(diffScenes(v1, spelledOut)).toEqual([]);
  });

  it('lists a liquid whose viscosity changed', () => {
    const a = { ...structuredClone(base()), version: 2, liquids: [{ id: 'water', name: 'Water', colour: '#3A8FB7', viscosity: 1e-6 }] };
    const b = structuredClone(a);
    b.liquids[0].viscosity = 0.01;
    const rows = diffScenes(a, b);
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ area: 'liquids', kind: 'changed', path: 'liquids[water].viscosity', before: 1e-6, after: 0.01 });
  });
});
