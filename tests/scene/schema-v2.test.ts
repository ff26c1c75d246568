// Scene document version 2: liquids, the liquid of pours and spouts, keyed and free props; version 1 documents
// migrate on read and keep their hash.
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { parseScene, DEFAULT_LIQUID, type SceneInput } from '../../src/lib/scene/schema';
import { sceneHash, asVersion1 } from '../../src/lib/scene/hash';
import { LIQUID_PRESETS } from '../../src/lib/scene/liquids';
import { propPlacementAt, keyedFrameOf } from '../../src/lib/scene/pose';

const example = JSON.parse(readFileSync(new URL('../fixtures/scenes/harbour-splash.json', import.meta.url), 'utf8'));

/** The version 2 example of the issue (tank, timing and physics added so it is a whole document). */
const v2 = {
  version: 2,
  tank: { width: 1.6, height: 0.9, cellSize: 0.0125 },
  timing: { fps: 24, startFrame: 1001, endFrame: 1048, substeps: 4 },
  liquids: [
    { id: 'water', name: 'Pool water', colour: '#3A8FB7', viscosity: 1e-6 },
    { id: 'paint', name: 'Red paint', colour: '#C8341E', viscosity: 0.02 },
  ],
  pours: [{ id: 'pool', liquid: 'water', shape: { type: 'rect', x: 0, y: 0, width: 1.6, height: 0.45 } }],
  spouts: [{ id: 'can-pour', liquid: 'paint', shape: { type: 'circle', x: 0.3, y: 0.8, radius: 0.02 }, velocity: [0, -0.5], startFrame: 1001, endFrame: 1030 }],
  props: [
    { id: 'can', shape: { type: 'rect', x: 0.75, y: 0.7, width: 0.066, height: 0.115 }, motion: 'free', density: 350, velocity: [0, 0], spin: 0 },
    {
      id: 'crate', shape: { type: 'rect', x: 1.1, y: 0.8, width: 0.2, height: 0.2 }, motion: 'free', density: 600, releaseFrame: 1010,
      keys: [{ frame: 1001, dx: 0, dy: 0, angle: 0 }, { frame: 1010, dx: -0.2, dy: 0.05, angle: 10 }],
    },
  ],
};

function errorsOf(doc: unknown) {
  const r = parseScene(doc);
  if (r.ok) throw new Error('expected the scene to be rejected');
  return r.errors;
}
const ok = (doc: unknown) => { const r = parseScene(doc); if (!r.ok) throw new Error(JSON.stringify(r.errors)); return r.scene; };
const edit = (f: (d: any) => void) => { const d = structuredClone(v2) as any; f(d); return d; };

describe('scene version 2', () => {
  it('parses the version 2 example with its liquids and free props', () => {
    const s = ok(v2);
    expect(s.version).toBe(2);
    expect(s.liquids.map((l) => l.id)).toEqual(['water', 'paint']);
    expect(s.spouts[0].liquid).toBe('paint');
    expect(s.props[0]).toMatchObject({ motion: 'free', density: 350, velocity: [0, 0], spin: 0, keys: [] });
    expect(s.props[1]).toMatchObject({ motion: 'free', density: 600, releaseFrame: 1010 });
  });

  it('defaults liquids to one water liquid and a pour or spout to the first liquid', () => {
    const s = ok({ ...v2, liquids: undefined, pours: [{ id: 'pool', shape: v2.pours[0].shape }], spouts: [] });
    expect(s.liquids).toEqual([DEFAULT_LIQUID]);
    expect(s.pours[0].liquid).toBe('water');
    const t = ok({ ...v2, liquids: [v2.liquids[1], v2.liquids[0]], pours: [{ id: 'pool', shape: v2.pours[0].shape }] });
    expect(t.pours[0].liquid).toBe('paint');
  });

  it('a prop is keyed unless it says free', () => {
    const s = ok(edit((d) => { d.props = [{ id: 'box', shape: v2.props[0].shape, keys: [{ frame: 1001, dx: 0, dy: 0, angle: 0 }] }]; }));
    expect(s.props[0].motion).toBe('keyed');
  });

  it.each([
    ['an unknown liquid', (d: any) => { d.spouts[0].liquid = 'oil'; }, 'spouts.0.liquid', /no liquid 'oil'/],
    ['a free prop without density', (d: any) => { delete d.props[0].density; }, 'props.0.density', /^is required for a free prop$/],
    ['a density below 1', (d: any) => { d.props[0].density = 0.5; }, 'props.0.density', /between 1 and 20000/],
    ['a density above 20 000', (d: any) => { d.props[0].density = 25000; }, 'props.0.density', /between 1 and 20000/],
    ['a keyed prop without keys', (d: any) => { d.props[0] = { id: 'can', shape: v2.props[0].shape, motion: 'keyed' }; }, 'props.0.keys', /at least one key/],
    ['a release frame without keys', (d: any) => { d.props[1].keys = []; }, 'props.1.keys', /at least one key/],
    ['a release velocity beside a release frame', (d: any) => { d.props[1].velocity = [1, 0]; }, 'props.1.velocity', /from the keys/],
    ['an unknown motion', (d: any) => { d.props[0].motion = 'thrown'; }, 'props.0.motion', /'keyed' or 'free'/],
    ['a bad colour', (d: any) => { d.liquids[1].colour = 'red'; }, 'liquids.1.colour', /#RRGGBB/],
    ['a negative viscosity', (d: any) => { d.liquids[1].viscosity = -1; }, 'liquids.1.viscosity', /m²\/s/],
    ['a repeated liquid id', (d: any) => { d.liquids[1].id = 'water'; }, 'liquids.1.id', /already used/],
    ['no liquids at all', (d: any) => { d.liquids = []; }, 'liquids', /at least one liquid/],
    ['a non-numeric spin', (d: any) => { d.props[0].spin = 'fast'; }, 'props.0.spin', /number/],
  ])('names the field for %s', (_what, change, path, message) => {
    const errors = errorsOf(edit(change));
    const e = errors.find((x) => x.path === path);
    expect(e, JSON.stringify(errors)).toBeDefined();
    expect(e!.message).toMatch(message);
  });

  it('reports several bad fields of one document at once', () => {
    const errors = errorsOf(edit((d) => { delete d.props[0].density; d.spouts[0].liquid = 'oil'; d.liquids[0].colour = '#12'; }));
    expect(errors.map((e) => e.path).sort()).toEqual(['liquids.0.colour', 'props.0.density', 'spouts.0.liquid']);
  });
});

describe('version 1 documents', () => {
  it('migrate on read to one water liquid and keyed props', () => {
    const s = ok(example);
    expect(s.version).toBe(2);
    expect(s.liquids).toEqual([DEFAULT_LIQUID]);
    expect(s.pours.every((p) => p.liquid === 'water')).toBe(true);
    expect(s.props.every((p) => p.motion === 'keyed')).toBe(true);
  });

  it('keep their hash: the migrated scene hashes as its version 1 form, and the explicit version 2 equivalent hashes the same', () => {
    const s = ok(example);
    const v1form = asVersion1(s);
    expect(v1form).not.toBeNull();
    const again = ok(v1form);
    expect(sceneHash(again)).toBe(sceneHash(s));
    const explicit: SceneInput = { ...example, version: 2, liquids: [{ ...DEFAULT_LIQUID }] };
    expect(sceneHash(ok(explicit))).toBe(sceneHash(s));
    // a scene that uses version 2 (a second liquid) hashes differently
    expect(sceneHash(ok({ ...explicit, liquids: [{ ...DEFAULT_LIQUID }, v2.liquids[1]] }))).not.toBe(sceneHash(s));
  });

  it('refuse version 2 fields at their path', () => {
    const errors = errorsOf({ ...example, liquids: [DEFAULT_LIQUID], props: [{ ...example.props[0], motion: 'free' }] });
    expect(errors.map((e) => e.path).sort()).toEqual(['liquids', 'props.0.motion']);
  });
});

describe('liquid presets', () => {
  it('are valid liquids with a source beside each value', () => {
    for (const p of LIQUID_PRESETS) {
      expect(ok({ ...v2, liquids: [{ id: p.key, name: p.name, colour: p.colour, viscosity: p.viscosity }], pours: [], spouts: [] }).liquids[0].viscosity).toBe(p.viscosity);
      expect(p.source.length).toBeGreaterThan(10);
    }
    expect(LIQUID_PRESETS.map((p) => p.key)).toEqual(['water', 'thin-paint', 'thick-paint', 'syrup']);
  });
});

describe('prop pose', () => {
  const keys = [{ frame: 1001, dx: 0, dy: 0, angle: 0 }, { frame: 1011, dx: 1, dy: -2, angle: 90 }];
  const shape = { type: 'rect' as const, x: 0, y: 0, width: 2, height: 1 };
  it('a keyed prop follows its keys (linear between keys)', () => {
    const p = propPlacementAt({ shape, keys }, 1006);
    expect([p.dx, p.dy, p.angleRad]).toEqual([0.5, -1, Math.PI / 4]);
  });
  it('a free prop follows them up to its release frame and holds its first key without one', () => {
    expect(keyedFrameOf({ shape, keys, motion: 'free', releaseFrame: 1006 }, 1010)).toBe(1006);
    expect(keyedFrameOf({ shape, keys, motion: 'free', releaseFrame: 1006 }, 1003)).toBe(1003);
    const p = propPlacementAt({ shape, keys, motion: 'free' }, 1010);
    expect([p.dx, p.dy]).toEqual([0, 0]);
  });
});
