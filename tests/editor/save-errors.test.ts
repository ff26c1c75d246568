// The save panel's errors in words (src/lib/editor/save-errors.ts): real schema errors of a broken scene come out
// with no dotted paths and no camelCase field names.
import { describe, expect, it } from 'vitest';
import { parseScene } from '../../src/lib/scene/schema';
import { errorInWords, messageInWords } from '../../src/lib/editor/save-errors';

describe('save errors in words', () => {
  it('words the messages of a broken scene', () => {
    const r = parseScene({
      version: 2,
      liquids: [{ id: 'water', name: 'Water', colour: '#3A8FB7', viscosity: 1e-6 }, { id: 'water', name: 'Again', colour: '#3A8FB7', viscosity: 1e-6 }],
      tank: { width: 1, height: 1, cellSize: 0.1 },
      spouts: [{ id: 'jet', liquid: 'paint', shape: { type: 'circle', x: 0.5, y: 0.5, radius: 0.05 }, velocity: [0, -1], startFrame: 1010, endFrame: 1001 }],
      props: [{ id: 'can', shape: { type: 'rect', x: 0.1, y: 0.5, width: 0.1, height: 0.1 }, motion: 'free' }],
    });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    const lines = r.errors.map(errorInWords);
    expect(lines.length).toBeGreaterThanOrEqual(4);
    for (const l of lines) {
      expect(`${l.where}: ${l.what}`).not.toMatch(/\b[a-z]+\.\d|[a-z][A-Z]/);
    }
    const text = lines.map((l) => `${l.where}: ${l.what}`).join('\n');
    expect(text).toContain('Spout 1 · end frame: end frame must not be before start frame');
    expect(text).toContain('Prop 1 · density: is required for a free prop');
    expect(text).toMatch(/Liquid 2 · name: id 'water' is already used by Liquid 1/);
  });

  it('leaves plain words alone', () => {
    expect(messageInWords('must be between 0 and 1')).toBe('must be between 0 and 1');
    expect(messageInWords('must be at most 0.5 (a fraction of cellSize)')).toBe('must be at most 0.5 (a fraction of cell size)');
  });
});
