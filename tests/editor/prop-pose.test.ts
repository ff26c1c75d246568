// The editor's view draws and hit-tests a free prop at the live preview's solved pose (src/lib/scene/pose.ts:
// poseOfSolved, shownPoseInto, shownPlacementAt; src/lib/editor/geometry.ts: propOutlineAt, hitTest). The solved
// states come from a real solver run, so the test checks that the editor and the solver agree on what a pose means
// (centroid offset + angle about the centroid), and that the Pick tool hits a free prop where it is shown.
import { describe, expect, it } from 'vitest';
import { createSolver } from '../../src/lib/sim/solver';
import { parseScene } from '../../src/lib/scene/schema';
import { hitTest, propOutlineAt } from '../../src/lib/editor/geometry';
import { poseOfSolved, shownPoseInto, propPoseInto } from '../../src/lib/scene/pose';
import { EditorStore } from '../../src/lib/editor/store';
import { shapeCentroid } from '../../src/lib/scene/shapes';

const doc = {
  version: 2,
  tank: { width: 1, height: 1, cellSize: 1 / 16, sides: { left: true, right: true, bottom: true, top: true } },
  timing: { fps: 24, startFrame: 1, endFrame: 24, substeps: 2 },
  props: [
    { id: 'can', shape: { type: 'rect', x: 0.4, y: 0.7, width: 0.2, height: 0.1 }, motion: 'free', density: 600, velocity: [0.2, 0], spin: 90 },
    { id: 'paddle', shape: { type: 'rect', x: 0.1, y: 0.1, width: 0.1, height: 0.1 }, motion: 'keyed', keys: [{ frame: 1, dx: 0, dy: 0, angle: 0 }, { frame: 24, dx: 0.2, dy: 0, angle: 0 }] },
  ],
};

function run(frames: number) {
  const parsed = parseScene(doc);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors));
  const sim = createSolver(parsed.scene);
  let st = sim.stats();
  for (let f = 0; f < frames; f++) st = sim.stepFrame();
  return { scene: parsed.scene, props: st.props };
}

const centroidOf = (pts: number[][]) => {
  // vertex mean of a rectangle's four corners is its centroid
  const n = pts.length;
  return [pts.reduce((s, p) => s + p[0], 0) / n, pts.reduce((s, p) => s + p[1], 0) / n];
};

describe('free props in the editor view', () => {
  it("draws a free prop's outline centred on the solver's centroid and turned by its angle", () => {
    const { scene, props } = run(6);
    const can = scene.props[0];
    const state = props.find((p) => p.id === 'can')!;
    // six frames of free fall with spin: the prop has moved and turned (else the test could not fail)
    expect(state.y).toBeLessThan(0.75 - 0.05);
    expect(Math.abs(state.angle)).toBeGreaterThan(5);
    const outline = propOutlineAt(can, 7, props);
    const [mx, my] = centroidOf(outline);
    expect(mx).toBeCloseTo(state.x, 9);
    expect(my).toBeCloseTo(state.y, 9);
    // the first edge (bottom edge of the drawn rect) points along the solved angle
    const a = (Math.atan2(outline[1][1] - outline[0][1], outline[1][0] - outline[0][0]) * 180) / Math.PI;
    const [e0x, e0y] = [outline[1][0] - outline[0][0], outline[1][1] - outline[0][1]];
    const drawn = propOutlineAt(can, 1);
    const a0 = (Math.atan2(drawn[1][1] - drawn[0][1], drawn[1][0] - drawn[0][0]) * 180) / Math.PI;
    expect(((a - a0 - state.angle + 540) % 360) - 180).toBeCloseTo(0, 6);
    expect(Math.hypot(e0x, e0y)).toBeCloseTo(Math.hypot(drawn[1][0] - drawn[0][0], drawn[1][1] - drawn[0][1]), 9);
  });

  it('keeps a keyed prop on its keys and a free prop on its keys while nothing is solved', () => {
    const { scene, props } = run(3);
    const [can, paddle] = scene.props;
    const pose = () => ({ dx: 0, dy: 0, angle: 0 });
    // the keyed paddle follows its keys even when the solver reports it; the can without a solved state holds its first key
    expect(shownPoseInto(paddle, 2.5, props, pose())).toEqual(propPoseInto(paddle, 2.5, pose()));
    expect(propPoseInto(paddle, 2.5, pose()).dx).toBeGreaterThan(0);
    expect(shownPoseInto(can, 4, null, pose())).toEqual({ dx: 0, dy: 0, angle: 0 });
    expect(shownPoseInto({ ...can, id: 'other' }, 4, props, pose())).toEqual({ dx: 0, dy: 0, angle: 0 });
  });

  it("reads the solver's start pose as the drawn pose", () => {
    const { scene, props } = run(0);
    const can = scene.props[0];
    const [cx, cy] = shapeCentroid(can.shape);
    const pose = poseOfSolved(can.shape, props[0]);
    expect(pose.dx).toBeCloseTo(0, 12);
    expect(pose.dy).toBeCloseTo(0, 12);
    expect(pose.angle).toBe(0);
    expect(props[0].x).toBeCloseTo(cx, 12);
    expect(props[0].y).toBeCloseTo(cy, 12);
  });

  it('picks a free prop where the preview shows it, not where it is drawn', () => {
    const { scene, props } = run(12);
    const state = props.find((p) => p.id === 'can')!;
    const drawnCentre = shapeCentroid(scene.props[0].shape);
    // twelve frames of fall: the solved centroid is well clear of the drawn rectangle (0.1 m high)
    expect(drawnCentre[1] - state.y).toBeGreaterThan(0.15);
    const doc = { ...scene };
    expect(hitTest(doc, state.x, state.y, 13, 0.001, props)).toEqual({ group: 'props', id: 'can' });
    expect(hitTest(doc, drawnCentre[0], drawnCentre[1], 13, 0.001, props)).toBeNull();
    // without the preview the prop is where its keys (here: the drawn pose) put it
    expect(hitTest(doc, drawnCentre[0], drawnCentre[1], 13, 0.001, null)).toEqual({ group: 'props', id: 'can' });
    expect(hitTest(doc, state.x, state.y, 13, 0.001, null)).toBeNull();

    // through the store: a click with the Pick tool selects the prop at its shown pose
    const store = new EditorStore(doc);
    store.setFrame(13);
    store.solvedPropsAt = (f) => (f === 13 ? props : null);
    store.pointerDown({ x: state.x, y: state.y, shift: false, alt: false, detail: 1 });
    store.pointerUp({ x: state.x, y: state.y, shift: false, alt: false, detail: 1 });
    expect(store.snapshot.selection).toEqual([{ group: 'props', id: 'can' }]);
    store.select([]);
    store.pointerDown({ x: drawnCentre[0], y: drawnCentre[1], shift: false, alt: false, detail: 1 });
    store.pointerUp({ x: drawnCentre[0], y: drawnCentre[1], shift: false, alt: false, detail: 1 });
    expect(store.snapshot.selection).toEqual([]);
  });
});
