// The scene's drawing fields: a prop's fill colour and the wall style are validated at their path, and leaving them
// out changes neither the parsed scene nor its hash (clips baked before them are still reused).
import { describe, it, expect } from 'vitest';
import { parseScene } from '../../src/lib/scene/schema';
import { sceneHash } from '../../src/lib/scene/hash';

const base = {
  version: 2,
  tank: { width: 1, height: 0.5, cellSize: 0.05 },
  walls: [{ id: 'w', shape: { type: 'rect', x: 0, y: 0, width: 0.1, height: 0.1 } }],
  props: [{ id: 'box', shape: { type: 'rect', x: 0.5, y: 0.2, width: 0.1, height: 0.1 }, keys: [{ frame: 1001 }] }],
};

describe('scene look fields', () => {
  it('accepts a prop colour and a wall style', () => {
    const r = parseScene({ ...base, look: { walls: 'fill' }, props: [{ ...base.props[0], colour: '#12ab9F' }] });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.scene.look).toEqual({ walls: 'fill' });
    expect(r.scene.props[0].colour).toBe('#12ab9F');
  });

  it('names the field of a bad colour or style', () => {
    const r = parseScene({ ...base, look: { walls: 'dotted' }, props: [{ ...base.props[0], colour: 'red' }] });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors).toEqual(
      expect.arrayContaining([
        { path: 'props.0.colour', message: 'must be a colour #RRGGBB' },
        { path: 'look.walls', message: "must be 'outline', 'fill' or 'hidden'" },
      ]),
    );
  });

  it('leaves the scene and its hash as before when the fields are left out', () => {
    const r = parseScene(base);
    if (!r.ok) throw new Error('base scene is invalid');
    expect('look' in r.scene && r.scene.look !== undefined).toBe(false);
    expect(r.scene.props[0].colour).toBeUndefined();
    const withColour = parseScene({ ...base, props: [{ ...base.props[0], colour: '#123456' }] });
    if (!withColour.ok) throw new Error('colour scene is invalid');
    expect(sceneHash(withColour.scene)).not.toBe(sceneHash(r.scene));
  });
});
