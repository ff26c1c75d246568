// Field paths in words: what a save error or the compare table shows instead of a schema path.
import { describe, expect, it } from 'vitest';
import { fieldLabel } from '../../src/lib/scene/labels';

describe('fieldLabel', () => {
  it('names objects by their place, counting from 1', () => {
    expect(fieldLabel('spouts.0.endFrame')).toBe('Spout 1 · end frame');
    expect(fieldLabel('props.1.keys.3.frame')).toBe('Prop 2 · key 4 · frame');
    expect(fieldLabel('pours.2.shape.points.0')).toBe('Standing liquid 3 · shape · point 1');
    expect(fieldLabel('props.0.density')).toBe('Prop 1 · density');
  });
  it('names objects by their id in the compare form', () => {
    expect(fieldLabel('spouts[jet].velocity')).toBe('Spout “jet” · velocity');
    expect(fieldLabel('props[can]')).toBe('Prop “can”');
  });
  it('names sections and vector components', () => {
    expect(fieldLabel('physics.flipRatio')).toBe('Physics · FLIP / PIC blend');
    expect(fieldLabel('physics.gravity.1')).toBe('Physics · gravity (up)');
    expect(fieldLabel('tank.sides.top')).toBe('Tank · open and closed sides · top');
    expect(fieldLabel('(document)')).toBe('Scene');
    expect(fieldLabel('spouts')).toBe('Spouts');
  });
  it('spaces an unknown camelCase field rather than showing it raw', () => {
    expect(fieldLabel('physics.someNewThing')).toBe('Physics · some new thing');
  });
});
