// Scenes made in the editor go through the shared schema unchanged: parseScene(JSON(doc)) gives the document back,
// starting scenes are valid and sized to the plate in whole cells, and the preview scene is valid too.
import { describe, it, expect } from 'vitest';
import { startingScene, makeItem, type EditorDoc } from '../../src/lib/editor/document';
import { addItem } from '../../src/lib/editor/commands';
import { ellipseFromCorners, rotateShape } from '../../src/lib/editor/geometry';
import { parseScene, tankCells } from '../../src/lib/scene/schema';
import { previewScene } from '../../src/lib/editor/preview';
import { applyPreset, PHYSICS_PRESETS } from '../../src/lib/editor/params';
import { planDrop } from '../../src/lib/editor/timing';
import { shapeArea } from '../../src/lib/scene/shapes';

function blocked(): EditorDoc {
  let d = startingScene({ firstFrame: 1001, lastFrame: 1040, frameRate: '29.97df', plateWidth: 1920, plateHeight: 1080, metresPerPixel: 0.0009 });
  const add = (g: Parameters<typeof makeItem>[1], shape: Parameters<typeof makeItem>[2]) => { d = addItem(g, makeItem(d, g, shape)).apply(d); };
  add('pours', { type: 'rect', x: 0, y: 0, width: 1.7, height: 0.2 });
  add('pours', ellipseFromCorners([0.2, 0.5], [0.4, 0.6]));
  add('walls', rotateShape({ type: 'rect', x: 1, y: 0.1, width: 0.2, height: 0.05 }, 30));
  add('spouts', { type: 'circle', x: 0.1, y: 0.8, radius: 0.02 });
  add('drains', { type: 'rect', x: 1.6, y: 0, width: 0.1, height: 0.04 });
  add('props', { type: 'rect', x: 0.8, y: 0.7, width: 0.1, height: 0.1 });
  const prop = d.props[0];
  d = { ...d, props: [{ ...prop, keys: planDrop(d, prop, { releaseFrame: 1004, impactFrame: 1012, surfaceY: 0.2, mode: 'keep-height' }).keys }] };
  return applyPreset(d, PHYSICS_PRESETS[2]);
}

describe('scene round-trip through the schema', () => {
  it('an editor document parses back to itself', () => {
    const doc = blocked();
    const parsed = parseScene(JSON.stringify(doc));
    expect(parsed.ok, JSON.stringify(!parsed.ok && parsed.errors)).toBe(true);
    if (parsed.ok) expect(parsed.scene).toEqual(doc);
  });

  it('starting scene: tank lower-left on the plate, width = plate width × metresPerPixel in whole cells', () => {
    const d = startingScene({ firstFrame: 1001, lastFrame: 1100, frameRate: '25', plateWidth: 1920, plateHeight: 1080, metresPerPixel: 0.0015 });
    const { nx, ny } = tankCells(d.tank);
    expect(Math.abs(d.tank.width - 1920 * 0.0015)).toBeLessThanOrEqual(d.tank.cellSize / 2);
    expect(Math.abs(d.tank.height - 1080 * 0.0015)).toBeLessThanOrEqual(d.tank.cellSize / 2);
    expect(d.tank.width / d.tank.cellSize).toBeCloseTo(nx, 9);
    expect(d.tank.height / d.tank.cellSize).toBeCloseTo(ny, 9);
    expect(d.timing).toMatchObject({ fps: 25, startFrame: 1001, endFrame: 1100 });
    expect(parseScene(d).ok).toBe(true);
    const def = startingScene({ firstFrame: 1, lastFrame: 48, frameRate: '24', plateWidth: 1920, plateHeight: 1080, metresPerPixel: null });
    expect([def.tank.width, def.tank.height]).toEqual([1.6, 0.9]);
  });

  it('the preview scene is the same scene on a coarser, still whole-cell grid', () => {
    const doc = blocked();
    for (const f of [1, 2, 3, 4]) {
      const p = previewScene(doc, f);
      const parsed = parseScene(p);
      expect(parsed.ok, JSON.stringify(!parsed.ok && parsed.errors)).toBe(true);
      expect(p.tank.cellSize).toBeCloseTo(doc.tank.cellSize * f, 12);
      expect(Math.abs(p.tank.width - doc.tank.width)).toBeLessThanOrEqual(p.tank.cellSize / 2 + 1e-9);
    }
  });

  it('an ellipse drawn as a polygon keeps the ellipse’s area πab within 0.1 %', () => {
    const e = ellipseFromCorners([0, 0], [0.4, 0.2]);
    expect(Math.abs(shapeArea(e) - Math.PI * 0.2 * 0.1) / (Math.PI * 0.02)).toBeLessThan(1e-3);
  });
});
