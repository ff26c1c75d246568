// Document commands: every command undoes to the exact previous document (deep equality and the same JSON bytes),
// redo gives the same document again, and documents are never mutated in place.
import { describe, it, expect } from 'vitest';
import { startingScene, makeItem, type EditorDoc } from '../../src/lib/editor/document';
import { addItem, removeItems, updateItem, updateItems, setSection, replaceDocument, batch, type Command } from '../../src/lib/editor/commands';
import { History } from '../../src/lib/editor/history';
import { EditorStore } from '../../src/lib/editor/store';
import { applyPreset, PHYSICS_PRESETS } from '../../src/lib/editor/params';
import { planDrop } from '../../src/lib/editor/timing';

function richDoc(): EditorDoc {
  let d = startingScene({ firstFrame: 1001, lastFrame: 1048, frameRate: '25', plateWidth: 1920, plateHeight: 1080, metresPerPixel: null });
  d = addItem('pours', makeItem(d, 'pours', { type: 'rect', x: 0, y: 0, width: 1.6, height: 0.3 })).apply(d);
  d = addItem('walls', makeItem(d, 'walls', { type: 'circle', x: 1.2, y: 0.2, radius: 0.1 })).apply(d);
  d = addItem('walls', makeItem(d, 'walls', { type: 'polygon', points: [[0.1, 0.4], [0.3, 0.4], [0.2, 0.6]] })).apply(d);
  d = addItem('props', makeItem(d, 'props', { type: 'rect', x: 0.7, y: 0.6, width: 0.1, height: 0.1 })).apply(d);
  d = addItem('spouts', makeItem(d, 'spouts', { type: 'rect', x: 0.05, y: 0.7, width: 0.03, height: 0.05 })).apply(d);
  d = addItem('drains', makeItem(d, 'drains', { type: 'rect', x: 1.5, y: 0, width: 0.1, height: 0.05 })).apply(d);
  return d;
}

function freeze<T>(o: T): T {
  if (o && typeof o === 'object') { Object.freeze(o); for (const v of Object.values(o)) freeze(v); }
  return o;
}

/** Applies and reverts: the reverted document equals the original exactly; apply never mutates its input. */
function roundTrip(doc: EditorDoc, cmd: Command): EditorDoc {
  const before = JSON.stringify(doc);
  const after = cmd.apply(freeze(structuredClone(doc)));
  expect(JSON.stringify(after)).not.toBe(before);
  const back = cmd.revert(freeze(structuredClone(after)));
  expect(back).toEqual(doc);
  expect(JSON.stringify(back)).toBe(before);
  return after;
}

describe('document commands', () => {
  const doc = richDoc();
  const prop = doc.props[0];
  const cases: [string, Command][] = [
    ['addItem at the end', addItem('pours', makeItem(doc, 'pours', { type: 'circle', x: 0.5, y: 0.5, radius: 0.05 }))],
    ['addItem at the front', addItem('walls', makeItem(doc, 'walls', { type: 'rect', x: 0, y: 0, width: 0.1, height: 0.1 }), 0)],
    ['removeItems, one', removeItems([{ group: 'walls', id: doc.walls[0].id }])],
    ['removeItems, several groups', removeItems([{ group: 'walls', id: doc.walls[1].id }, { group: 'pours', id: doc.pours[0].id }, { group: 'walls', id: doc.walls[0].id }])],
    ['updateItem', updateItem({ group: 'walls', id: doc.walls[0].id }, { ...doc.walls[0], shape: { type: 'circle', x: 1, y: 0.3, radius: 0.2 } })],
    ['updateItem renaming', updateItem({ group: 'drains', id: doc.drains[0].id }, { ...doc.drains[0], id: 'gutter' })],
    ['updateItems', updateItems([
      { ref: { group: 'pours', id: doc.pours[0].id }, next: { ...doc.pours[0], velocity: [1, 0] } },
      { ref: { group: 'spouts', id: doc.spouts[0].id }, next: { ...doc.spouts[0], velocity: [0, -2] } },
    ], 'Move 2 items')],
    ['setSection tank', setSection('tank', { ...doc.tank, width: 2, sides: { ...doc.tank.sides, top: true } })],
    ['setSection timing', setSection('timing', { ...doc.timing, substeps: 9 })],
    ['setSection physics', setSection('physics', { ...doc.physics, flipRatio: 0.5, gravity: [0, -3] })],
    ['replaceDocument (a physics preset)', replaceDocument(applyPreset(doc, PHYSICS_PRESETS[2]))],
    ['timing helper keys', updateItem({ group: 'props', id: prop.id }, { ...prop, keys: planDrop(doc, prop, { releaseFrame: 1003, impactFrame: 1012, surfaceY: 0.3, mode: 'keep-height' }).keys })],
    ['batch', batch('several', [removeItems([{ group: 'pours', id: doc.pours[0].id }]), setSection('physics', { ...doc.physics, seed: 7 })])],
  ];
  for (const [name, cmd] of cases) it(`${name} undoes to the exact previous document`, () => { roundTrip(doc, cmd); });

  it('history: undo all the way gives the first document, redo all the way the last', () => {
    const start = richDoc();
    const h = new History(start);
    const states = [JSON.stringify(start)];
    // a sequence where each command still finds its items (cases 2 and 12 would delete what case 3 deletes)
    for (const k of [0, 1, 4, 5, 6, 7, 8, 9, 10, 11, 3]) { h.execute(cases[k][1]); states.push(JSON.stringify(h.doc)); }
    for (let k = states.length - 2; k >= 0; k--) { h.undo(); expect(JSON.stringify(h.doc)).toBe(states[k]); }
    expect(h.canUndo).toBe(false);
    for (let k = 1; k < states.length; k++) { h.redo(); expect(JSON.stringify(h.doc)).toBe(states[k]); }
    expect(h.canRedo).toBe(false);
  });

  it('a new command after undo clears redo', () => {
    const h = new History(richDoc());
    h.execute(cases[0][1]);
    h.undo();
    h.execute(cases[2][1]);
    expect(h.canRedo).toBe(false);
  });

  it('store: duplicate and delete undo exactly', () => {
    const s = new EditorStore(richDoc());
    const first = JSON.stringify(s.doc);
    s.select([{ group: 'walls', id: s.doc.walls[0].id }, { group: 'props', id: s.doc.props[0].id }]);
    s.duplicateSelection();
    expect(s.doc.walls).toHaveLength(3);
    expect(s.doc.props).toHaveLength(2);
    const afterDup = JSON.stringify(s.doc);
    s.deleteSelection();
    expect(s.doc.walls).toHaveLength(2);
    s.undo();
    expect(JSON.stringify(s.doc)).toBe(afterDup);
    s.undo();
    expect(JSON.stringify(s.doc)).toBe(first);
  });

  it('store: drawing tools go idle → pointing → dragging → idle and add one undoable item', () => {
    const s = new EditorStore(richDoc());
    s.setSnap('off');
    s.pixel = 0.002;
    const before = JSON.stringify(s.doc);
    s.setTool('wall');
    const p = (x: number, y: number) => ({ x, y, shift: false, alt: false, detail: 1 });
    expect(s.snapshot.toolState).toBe('idle');
    s.pointerDown(p(0.4, 0.4));
    expect(s.snapshot.toolState).toBe('pointing');
    s.pointerMove(p(0.5, 0.45));
    expect(s.tool().state).toBe('dragging');
    s.pointerUp(p(0.6, 0.5));
    expect(s.snapshot.toolState).toBe('idle');
    expect(s.doc.walls.at(-1)!.shape).toEqual({ type: 'rect', x: 0.4, y: 0.4, width: 0.2, height: 0.1 });
    // move it with the pick tool
    s.setTool('select');
    s.pointerDown(p(0.5, 0.45));
    s.pointerMove(p(0.55, 0.45));
    s.pointerUp(p(0.6, 0.45));
    expect(s.doc.walls.at(-1)!.shape).toMatchObject({ x: 0.5, y: 0.4 });
    s.undo(); s.undo();
    expect(JSON.stringify(s.doc)).toBe(before);
  });

  it('store: a polygon closes on a click near its first point', () => {
    const s = new EditorStore(richDoc());
    s.setSnap('off');
    s.setTool('pour');
    s.setShapeMode('pour', 'polygon');
    const click = (x: number, y: number) => { const e = { x, y, shift: false, alt: false, detail: 1 }; s.pointerDown(e); s.pointerUp(e); };
    click(0.2, 0.5); click(0.5, 0.5); click(0.4, 0.8);
    expect(s.snapshot.toolState).toBe('placing');
    click(0.2005, 0.5);
    expect(s.doc.pours.at(-1)!.shape).toEqual({ type: 'polygon', points: [[0.2, 0.5], [0.5, 0.5], [0.4, 0.8]] });
  });
});
