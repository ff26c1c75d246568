// The Liquids panel's rules (src/lib/editor/liquids.ts): a liquid added from a preset carries the preset's values under
// a fresh id, a liquid in use or the last one can't be removed and the reason names who uses it, edits undo exactly,
// and the panel's problems in words match what the shared schema refuses.
import { describe, expect, it } from 'vitest';
import { startingScene, makeItem, type EditorDoc } from '../../src/lib/editor/document';
import { addItem, setSection } from '../../src/lib/editor/commands';
import { History } from '../../src/lib/editor/history';
import { parseScene, type Liquid } from '../../src/lib/scene/schema';
import { LIQUID_PRESETS, liquidPreset } from '../../src/lib/scene/liquids';
import { liquidFromPreset, liquidProblems, liquidUsers, replaceLiquid, viscosityText, whyNotRemovable } from '../../src/lib/editor/liquids';

function scene(): EditorDoc {
  let d = startingScene({ firstFrame: 1001, lastFrame: 1048, frameRate: '24', plateWidth: 0, plateHeight: 0, metresPerPixel: null });
  d = addItem('pours', makeItem(d, 'pours', { type: 'rect', x: 0, y: 0, width: 1.6, height: 0.3 })).apply(d);
  d = addItem('spouts', makeItem(d, 'spouts', { type: 'rect', x: 0.05, y: 0.7, width: 0.03, height: 0.05 })).apply(d);
  return d;
}

describe('liquids in the editor', () => {
  it('adds a preset with its values under a fresh id and name, and the scene still parses', () => {
    const d0 = scene();
    const thick = liquidPreset('thick-paint')!;
    const a = liquidFromPreset(d0, thick);
    expect(a).toEqual({ id: 'thick-paint', name: thick.name, colour: thick.colour, viscosity: thick.viscosity });
    const d1 = { ...d0, liquids: [...d0.liquids, a] };
    const b = liquidFromPreset(d1, thick);
    expect(b.id).toBe('thick-paint-2');
    expect(b.name).toBe(`${thick.name} 2`);
    const d2 = { ...d1, liquids: [...d1.liquids, b], spouts: [{ ...d1.spouts[0], liquid: b.id }] };
    const parsed = parseScene(d2);
    expect(parsed.ok).toBe(true);
    if (parsed.ok) expect(parsed.scene.spouts[0].liquid).toBe('thick-paint-2');
  });

  it("won't remove the last liquid nor one in use, and says who uses it", () => {
    const d0 = scene();
    const water = d0.liquids[0].id;
    expect(whyNotRemovable(d0, water)).toBe(`Standing liquid “${d0.pours[0].id}” and Spout “${d0.spouts[0].id}” use it, and a scene needs at least one liquid.`);
    expect(whyNotRemovable({ ...d0, pours: [], spouts: [] }, water)).toBe('A scene needs at least one liquid.');
    const paint = liquidFromPreset(d0, liquidPreset('thin-paint')!);
    const d1 = { ...d0, liquids: [...d0.liquids, paint] };
    expect(liquidUsers(d1, water).map((r) => r.id)).toEqual([d0.pours[0].id, d0.spouts[0].id]);
    expect(whyNotRemovable(d1, water)).toBe(`Standing liquid “${d0.pours[0].id}” and Spout “${d0.spouts[0].id}” use it: pick another liquid there before removing it.`);
    expect(whyNotRemovable(d1, paint.id)).toBeNull();
    // removing what the panel allows leaves a valid scene; removing what it refuses would not
    expect(parseScene({ ...d1, liquids: d1.liquids.filter((l) => l.id !== paint.id) }).ok).toBe(true);
    expect(parseScene({ ...d1, liquids: d1.liquids.filter((l) => l.id !== water) }).ok).toBe(false);
    const d2 = { ...d1, spouts: [{ ...d1.spouts[0], liquid: paint.id }] };
    expect(whyNotRemovable(d2, paint.id)).toBe(`Spout “${d0.spouts[0].id}” uses it: pick another liquid there before removing it.`);
  });

  it('edits liquids as one undoable command', () => {
    const d0 = scene();
    const h = new History(d0);
    const next: Liquid = { ...d0.liquids[0], name: 'Pool water', colour: '#2266AA', viscosity: 2e-6 };
    h.execute(setSection('liquids', replaceLiquid(d0.liquids, d0.liquids[0].id, next), 'Rename'));
    expect(h.doc.liquids[0]).toEqual(next);
    h.undo();
    expect(JSON.stringify(h.doc)).toBe(JSON.stringify(d0));
  });

  it('names problems in words exactly when the schema refuses the liquid', () => {
    const d0 = scene();
    const base = d0.liquids[0];
    const cases: Liquid[] = [
      base, { ...base, name: '' }, { ...base, name: 'x'.repeat(81) }, { ...base, colour: 'blue' }, { ...base, colour: '#12345' },
      { ...base, viscosity: -1e-6 }, { ...base, viscosity: 1.5 }, { ...base, viscosity: 1 }, { ...base, viscosity: 0 },
    ];
    for (const l of cases) {
      const problems = liquidProblems(l);
      expect(problems.length === 0, JSON.stringify({ l, problems })).toBe(parseScene({ ...d0, liquids: [l] }).ok);
      for (const m of problems) expect(m).not.toMatch(/liquids\.|[a-z][A-Z]/);
    }
  });

  it('writes viscosities as powers of ten', () => {
    expect(viscosityText(1e-6)).toBe('10⁻⁶ m²/s');
    expect(viscosityText(5e-2)).toBe('5 × 10⁻² m²/s');
    expect(viscosityText(1e-2)).toBe('10⁻² m²/s');
    expect(viscosityText(1)).toBe('1 m²/s');
    expect(viscosityText(0.25)).toBe('2.5 × 10⁻¹ m²/s');
    // every preset shows a value and a source
    for (const p of LIQUID_PRESETS) { expect(viscosityText(p.viscosity)).toMatch(/m²\/s$/); expect(p.source.length).toBeGreaterThan(10); }
  });
});
