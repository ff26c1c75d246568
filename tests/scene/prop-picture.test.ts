// A prop's picture in the scene document: the asset id round-trips through parse and JSON, a bad value is refused at
// its path, older documents (no picture, version 1) keep parsing as before, and the picture stays out of the bake's
// scene hash (it is drawn over the clip, never simulated).
import { describe, it, expect } from 'vitest';
import { parseScene } from '../../src/lib/scene/schema';
import { sceneHash } from '../../src/lib/scene/hash';

const prop = { id: 'can', colour: '#D23C32', shape: { type: 'rect', x: 0.5, y: 0.2, width: 0.1, height: 0.2 }, keys: [{ frame: 1001 }] };
const base = { version: 2, tank: { width: 1, height: 0.5, cellSize: 0.05 }, props: [prop] };

describe('a prop picture in the scene', () => {
  it('keeps the picture id through parse → JSON → parse', () => {
    const first = parseScene({ ...base, props: [{ ...prop, picture: 4711 }] });
    if (!first.ok) throw new Error(JSON.stringify(first.errors));
    expect(first.scene.props[0].picture).toBe(4711);
    const again = parseScene(JSON.stringify(first.scene));
    if (!again.ok) throw new Error(JSON.stringify(again.errors));
    expect(again.scene).toEqual(first.scene);
    expect(again.scene.props[0].picture).toBe(4711);
    expect(again.scene.props[0].colour).toBe('#D23C32');
  });

  it('names the field of a picture that is not an asset id', () => {
    for (const bad of ['can.png', 0, -3, 2.5]) {
      const r = parseScene({ ...base, props: [{ ...prop, picture: bad }] });
      expect(r.ok).toBe(false);
      if (r.ok) continue;
      expect(r.errors).toEqual([{ path: 'props.0.picture', message: 'must be the id of a prop picture' }]);
    }
  });

  it('reads documents without a picture as before (version 2 and version 1)', () => {
    const v2 = parseScene(base);
    if (!v2.ok) throw new Error(JSON.stringify(v2.errors));
    expect(v2.scene.props[0].picture).toBeUndefined();
    const v1 = parseScene({ ...base, version: 1 });
    if (!v1.ok) throw new Error(JSON.stringify(v1.errors));
    expect(v1.scene.props[0]).toEqual(v2.scene.props[0]);
    // A version 1 document cannot name a picture (pictures came with version 2).
    const v1Picture = parseScene({ ...base, version: 1, props: [{ ...prop, picture: 1 }] });
    expect(v1Picture.ok).toBe(false);
    if (!v1Picture.ok) expect(v1Picture.errors[0].path).toBe('props.0.picture');
  });

  it('leaves the picture out of the scene hash, so choosing one needs no new bake', () => {
    const plain = parseScene(base), pictured = parseScene({ ...base, props: [{ ...prop, picture: 12 }] });
    const other = parseScene({ ...base, props: [{ ...prop, picture: 13 }] });
    if (!plain.ok || !pictured.ok || !other.ok) throw new Error('test scenes are invalid');
    expect(sceneHash(pictured.scene)).toBe(sceneHash(plain.scene));
    expect(sceneHash(other.scene)).toBe(sceneHash(plain.scene));
    // The colour still is part of it (the clip stores it): the hash does see prop changes.
    const recoloured = parseScene({ ...base, props: [{ ...prop, colour: '#102030', picture: 12 }] });
    if (!recoloured.ok) throw new Error('recoloured scene is invalid');
    expect(sceneHash(recoloured.scene)).not.toBe(sceneHash(plain.scene));
  });
});
