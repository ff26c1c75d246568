// Keys without surprises (src/lib/editor/geometry.ts handleAt, src/lib/editor/key-jump.ts, the Pick tool): where key
// diamonds of neighbouring frames overlap, the key nearest the current frame is the one a drag takes; a key change that
// makes a prop jump more than its own size in one frame is asked about first; Shift snaps rotation to 15° steps.
// Common practice (no source): rotation snapping in 15° steps while a modifier is held.
import { describe, expect, it } from 'vitest';
import { startingScene, makeItem, type EditorDoc } from '../../src/lib/editor/document';
import { addItem } from '../../src/lib/editor/commands';
import { handleAt, handlesOf } from '../../src/lib/editor/geometry';
import { EditorStore } from '../../src/lib/editor/store';
import { jumpWarning, largestFrameJump, propSize } from '../../src/lib/editor/key-jump';
import type { Prop } from '../../src/lib/scene/schema';

/** A 0.2 m box with keys at 1010 (dx 0.3) and 1011 (dx 0.302): their diamonds overlap on screen. */
function docWithKeys(): EditorDoc {
  let d = startingScene({ firstFrame: 1001, lastFrame: 1048, frameRate: '24', plateWidth: 0, plateHeight: 0, metresPerPixel: null });
  d = addItem('props', makeItem(d, 'props', { type: 'rect', x: 0.2, y: 0.4, width: 0.2, height: 0.2 })).apply(d);
  const p = d.props[0];
  return { ...d, props: [{ ...p, keys: [{ frame: 1001, dx: 0, dy: 0, angle: 0 }, { frame: 1010, dx: 0.3, dy: 0, angle: 0 }, { frame: 1011, dx: 0.302, dy: 0, angle: 0 }] }] };
}
const ptr = (x: number, y: number, shift = false) => ({ x, y, shift, alt: false, detail: 1 });
/** Drags with the Pick tool from a to b in small steps. */
function drag(store: EditorStore, a: [number, number], b: [number, number], shift = false) {
  store.pointerDown(ptr(a[0], a[1], shift));
  for (let k = 1; k <= 4; k++) store.pointerMove(ptr(a[0] + ((b[0] - a[0]) * k) / 4, a[1] + ((b[1] - a[1]) * k) / 4, shift));
  store.pointerUp(ptr(b[0], b[1], shift));
}

describe('picking keys where diamonds overlap', () => {
  it('gives the key nearest the current frame, and the nearest in space without a frame', () => {
    const prop = docWithKeys().props[0];
    const hs = handlesOf(prop, 0.002);
    // centroid (0.3, 0.5); the diamonds sit at x 0.6 and 0.602, within the 7 px (0.014 m) pick radius of each other
    const atX = 0.6015, atY = 0.5, r = 0.014;
    expect(handleAt(hs, atX, atY, r)?.frame).toBe(1011);
    expect(handleAt(hs, atX, atY, r, 1010)?.frame).toBe(1010);
    expect(handleAt(hs, atX, atY, r, 1011)?.frame).toBe(1011);
    expect(handleAt(hs, atX, atY, r, 1030)?.frame).toBe(1011);
    expect(handleAt(hs, atX, atY, r, 1005)?.frame).toBe(1010);
  });

  it('drags the key at the current frame and leaves its neighbour where it was', () => {
    const store = new EditorStore(docWithKeys());
    store.select([{ group: 'props', id: 'prop-1' }]);
    store.setSnap('off');
    store.setFrame(1010);
    drag(store, [0.6015, 0.5], [0.6015, 0.55]);
    const keys = store.doc.props[0].keys;
    expect(keys[1].frame).toBe(1010);
    expect(keys[1].dy).toBeCloseTo(0.05, 6);
    expect(keys[2]).toMatchObject({ frame: 1011, dx: 0.302, dy: 0 });
  });
});

describe('a key change that makes a prop jump', () => {
  it('measures the largest move between two frames', () => {
    const doc = docWithKeys();
    const slide: Prop = { ...doc.props[0], keys: [{ frame: 1001, dx: 0, dy: 0, angle: 0 }, { frame: 1011, dx: 1, dy: 0, angle: 0 }] };
    expect(largestFrameJump(slide)!.distance).toBeCloseTo(0.1, 12); // 1 m over 10 frames, linear
    // a quarter turn in one frame: a corner of the 0.2 m square, 0.1·√2 m from the centre, travels at most (π/2)·0.1·√2
    const turn: Prop = { ...doc.props[0], keys: [{ frame: 1001, dx: 0, dy: 0, angle: 0 }, { frame: 1002, dx: 0, dy: 0, angle: 90 }] };
    expect(largestFrameJump(turn)!.distance).toBeCloseTo((Math.PI / 2) * 0.1 * Math.SQRT2, 3);
    expect(propSize(doc.props[0].shape)).toBeCloseTo(0.2, 12);
    // a free prop without a release frame is not moved by its keys
    const loose: Prop = { ...slide, motion: 'free', density: 500 };
    expect(largestFrameJump(loose)).toBeNull();
  });

  it('asks before keeping a 4 m jump from a dragged key, and keeps nothing on no', () => {
    const doc = docWithKeys();
    const before = JSON.stringify(doc);
    const store = new EditorStore(doc);
    const asked: string[] = [];
    store.confirm = (q) => { asked.push(q); return false; };
    store.select([{ group: 'props', id: 'prop-1' }]);
    store.setFrame(1011);
    drag(store, [0.602, 0.5], [4.6, 0.5]);
    expect(asked).toHaveLength(1);
    expect(asked[0]).toMatch(/prop-1 jumps 4\.\d\d m between frames 1010 and 1011, more than its own size \(0\.20 m\): about \d+ m\/s\. Keep the change\?/);
    expect(JSON.stringify(store.doc)).toBe(before);
    store.confirm = (q) => { asked.push(q); return true; };
    drag(store, [0.602, 0.5], [4.6, 0.5]);
    expect(asked).toHaveLength(2);
    expect(store.doc.props[0].keys[2].dx).toBeCloseTo(4.3, 6);
  });

  it("doesn't ask about a small move, nor about a jump the prop already had", () => {
    const doc = docWithKeys();
    const p = doc.props[0];
    expect(jumpWarning(p, { ...p, keys: p.keys.map((k) => (k.frame === 1011 ? { ...k, dx: 0.45 } : k)) }, 24)).toBeNull(); // 0.15 m < 0.2 m
    const jumpy = { ...p, keys: p.keys.map((k) => (k.frame === 1011 ? { ...k, dx: 2 } : k)) };
    expect(jumpWarning(p, jumpy, 24)).toMatch(/jumps 1\.70 m between frames 1010 and 1011/);
    // editing another key of a prop that already jumps 1.7 m does not ask again
    expect(jumpWarning(jumpy, { ...jumpy, keys: jumpy.keys.map((k) => (k.frame === 1001 ? { ...k, dy: 0.01 } : k)) }, 24)).toBeNull();
  });
});

describe('rotating with the Pick tool', () => {
  /** Angle (degrees) of the first edge of the rotated box (a rectangle turns into a polygon). */
  const firstEdgeAngle = (doc: EditorDoc) => {
    const s = doc.walls[0].shape;
    if (s.type !== 'polygon') throw new Error(`expected a polygon, got ${s.type}`);
    return (Math.atan2(s.points[1][1] - s.points[0][1], s.points[1][0] - s.points[0][0]) * 180) / Math.PI;
  };
  function rotateBy(degrees: number, shift: boolean): EditorDoc {
    let d = startingScene({ firstFrame: 1001, lastFrame: 1048, frameRate: '24', plateWidth: 0, plateHeight: 0, metresPerPixel: null });
    d = addItem('walls', makeItem(d, 'walls', { type: 'rect', x: 0.4, y: 0.2, width: 0.2, height: 0.2 })).apply(d);
    const store = new EditorStore(d);
    store.select([{ group: 'walls', id: 'wall-1' }]);
    const knob = handlesOf(d.walls[0], store.pixel).find((h) => h.kind === 'rotate')!;
    const c = [0.5, 0.3];
    const r = Math.hypot(knob.x - c[0], knob.y - c[1]);
    const a = Math.PI / 2 + (degrees * Math.PI) / 180; // the knob starts straight above the centre
    drag(store, [knob.x, knob.y], [c[0] + r * Math.cos(a), c[1] + r * Math.sin(a)], shift);
    return store.doc;
  }
  it('turns freely in whole degrees without Shift and in 15° steps with it', () => {
    expect(firstEdgeAngle(rotateBy(37, false))).toBeCloseTo(37, 3);
    expect(firstEdgeAngle(rotateBy(37, true))).toBeCloseTo(30, 3);
    expect(firstEdgeAngle(rotateBy(38, true))).toBeCloseTo(45, 3);
    expect(firstEdgeAngle(rotateBy(-50, true))).toBeCloseTo(-45, 3);
  });
});
