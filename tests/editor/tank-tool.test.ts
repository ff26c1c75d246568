// The Tank tool: dragging sizes the tank smoothly in metres (to the millimetre); whole cells only while Shift is
// held; the dragged tank is always a scene the schema accepts (src/lib/editor/tools.ts TankTool).
import { describe, it, expect } from 'vitest';
import { TankTool, draggedTankLength, type ToolContext, type ToolPointer } from '../../src/lib/editor/tools';
import { startingScene, type EditorDoc } from '../../src/lib/editor/document';
import type { Command } from '../../src/lib/editor/commands';
import { parseScene, tankCells, SCENE_LIMITS } from '../../src/lib/scene/schema';

function context(doc: EditorDoc) {
  const done: Command[] = [];
  let draft: EditorDoc | null = null;
  const ctx = {
    doc, frame: doc.timing.startFrame, selection: [], pixel: 0.002, shapeMode: 'rect', brushRadius: 0.05, solvedProps: null,
    snap: (p: [number, number]) => p, execute: (c: Command) => { done.push(c); }, confirm: () => true, select: () => {},
    setDraft: (d: EditorDoc | null) => { draft = d; }, setOverlay: () => {},
  } as unknown as ToolContext;
  return { ctx, done, draft: () => draft };
}

const at = (x: number, y: number, shift = false): ToolPointer => ({ x, y, shift, alt: false, detail: 1 });

function drag(doc: EditorDoc, to: ToolPointer) {
  const tool = new TankTool(), c = context(doc);
  tool.onPointerDown(c.ctx, at(doc.tank.width, doc.tank.height));
  tool.onPointerMove(c.ctx, to);
  const shown = c.draft();
  tool.onPointerUp(c.ctx);
  expect(c.done).toHaveLength(1);
  return { shown: shown!, after: c.done[0].apply(doc) };
}

const doc = startingScene({ firstFrame: 1001, lastFrame: 1048, frameRate: '24', plateWidth: 0, plateHeight: 0, metresPerPixel: null });

describe('tank tool', () => {
  it('follows the pointer to the millimetre, not to whole cells', () => {
    const h = doc.tank.cellSize; // 1.6 m / 128 cells → 1/80 m (niceCellSize)
    const { shown, after } = drag(doc, at(1.2346, 0.7012));
    expect(after.tank.width).toBe(1.235); // the pointer's 1.2346 m to the millimetre
    expect(after.tank.height).toBe(0.701);
    expect(shown.tank).toEqual(after.tank); // the draft shown while dragging is what the drop keeps
    expect(after.tank.cellSize).toBe(h);
    // not a whole number of cells, and the scene accepts it (the grid covers it: tankCells rounds up)
    expect(Math.abs(after.tank.width / h - Math.round(after.tank.width / h))).toBeGreaterThan(1e-6);
    const r = parseScene(after);
    expect(r.ok).toBe(true);
    expect(tankCells(after.tank).nx).toBe(Math.ceil(1.235 / h - 1e-9));
  });

  it('snaps to whole cells while Shift is held', () => {
    const h = doc.tank.cellSize;
    const { after } = drag(doc, at(1.2346, 0.7012, true));
    expect(after.tank.width).toBeCloseTo(Math.round(1.2346 / h) * h, 9);
    expect(after.tank.height).toBeCloseTo(Math.round(0.7012 / h) * h, 9);
    expect(parseScene(after).ok).toBe(true);
  });

  it('keeps the tank a valid scene at the extremes of a drag (at least 2 cells, at most the cells per side)', () => {
    const h = doc.tank.cellSize;
    for (const shift of [false, true]) {
      const small = drag(doc, at(-1, 0.001, shift)).after;
      expect(small.tank.width).toBeCloseTo(2 * h, 9);
      expect(small.tank.height).toBeCloseTo(2 * h, 9);
      expect(parseScene(small).ok).toBe(true);
      const big = drag(doc, at(1e6, 1e6, shift)).after;
      expect(tankCells(big.tank).nx).toBeLessThanOrEqual(SCENE_LIMITS.maxCellsPerSide);
      expect(parseScene(big).ok).toBe(true);
    }
    expect(draggedTankLength(0.6, 1 / 256, false)).toBe(0.6); // the example size, kept as dragged
  });
});
