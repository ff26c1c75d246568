// The Tank panel's cell size and tank size: any value in the parameter's range, no snapping to whole cells
// (src/lib/editor/document.ts withCellSize/cellsNote, src/components/editor/Panels.tsx).
import { describe, it, expect } from 'vitest';
import { withCellSize, cellsNote } from '../../src/lib/editor/document';
import { PARAMS } from '../../src/lib/editor/params';
import { parseScene, tankCells } from '../../src/lib/scene/schema';

const tank = { width: 0.6, height: 0.45, cellSize: 1 / 64, sides: { left: true, right: true, bottom: true, top: false } };

describe('tank cell size in the editor', () => {
  it('a typed cell size is kept as typed and the tank keeps the size the artist gave it', () => {
    for (const h of [1 / 256, 0.0137, 0.03]) {
      const t = withCellSize(tank, h);
      expect(t.cellSize).toBe(h);
      expect(t.width).toBe(0.6);
      expect(t.height).toBe(0.45);
      // the scene document accepts it and the solver's grid covers the whole tank (last cell partly inside)
      const r = parseScene({ version: 2, tank: t, timing: { fps: 24, startFrame: 1, endFrame: 2 } });
      expect(r.ok).toBe(true);
      const { nx, ny } = tankCells(t);
      expect(nx * h).toBeGreaterThanOrEqual(0.6 - 1e-9);
      expect((nx - 1) * h).toBeLessThan(0.6);
      expect(ny * h).toBeGreaterThanOrEqual(0.45 - 1e-9);
    }
  });

  it('the panel offers the parameter range, not a fixed list', () => {
    const spec = PARAMS.find((p) => p.path === 'tank.cellSize')!;
    expect(spec.choices).toBeUndefined();
    expect(spec.min).toBeLessThanOrEqual(0.001);
  });

  it('says how the tank lies on the cells', () => {
    expect(cellsNote(0.5, 1 / 64)).toBe('32 cells.');
    // 0.6 m at 1/256 m: 153.6 cells, the example of a size that used to be refused
    expect(cellsNote(0.6, 1 / 256)).toBe('154 cells; the last is 0.60 of a cell inside the tank (solid on a closed side).');
  });
});
