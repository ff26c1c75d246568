// Shape geometry, prop keyframes and frame/time conversion.
import { describe, it, expect } from 'vitest';
import { shapeArea, shapeCentroid, pointInShape, shapeSignedDistance, shapeBounds, type Shape } from '../../src/lib/scene/shapes';
import { poseAt, placementOf, toWorld, toDrawn } from '../../src/lib/scene/keys';
import { frameToTime, timeToFrame, frameCount } from '../../src/lib/scene/time';

const rect: Shape = { type: 'rect', x: 1, y: 2, width: 4, height: 2 };
const circle: Shape = { type: 'circle', x: 0, y: 0, radius: 2 };
const triangleCw: Shape = { type: 'polygon', points: [[0, 0], [0, 3], [3, 0]] }; // clockwise
const lShape: Shape = { type: 'polygon', points: [[0, 0], [2, 0], [2, 1], [1, 1], [1, 2], [0, 2]] };

describe('shapes', () => {
  it('areas: rect w·h, circle π·r², polygon by the shoelace formula in either orientation', () => {
    expect(shapeArea(rect)).toBe(8);
    expect(shapeArea(circle)).toBeCloseTo(Math.PI * 4, 12);
    expect(shapeArea(triangleCw)).toBe(4.5); // ½·3·3
    expect(shapeArea(lShape)).toBe(3);
  });

  it('centroids: triangle at the mean of its vertices; L-shape by decomposition into unit squares', () => {
    expect(shapeCentroid(rect)).toEqual([3, 3]);
    const [tx, ty] = shapeCentroid(triangleCw);
    expect(tx).toBeCloseTo(1, 12);
    expect(ty).toBeCloseTo(1, 12);
    // three unit squares centred at (0.5,0.5), (1.5,0.5), (0.5,1.5) → (5/6, 5/6)
    const [lx, ly] = shapeCentroid(lShape);
    expect(lx).toBeCloseTo(5 / 6, 12);
    expect(ly).toBeCloseTo(5 / 6, 12);
  });

  it('point-in-shape', () => {
    expect(pointInShape(rect, 3, 3)).toBe(true);
    expect(pointInShape(rect, 0.9, 3)).toBe(false);
    expect(pointInShape(circle, 1.4, 1.4)).toBe(true);
    expect(pointInShape(circle, 1.5, 1.5)).toBe(false);
    expect(pointInShape(lShape, 1.5, 1.5)).toBe(false); // the notch
    expect(pointInShape(lShape, 0.5, 1.5)).toBe(true);
  });

  it('signed distance: negative inside, positive outside, with the outward normal', () => {
    const n = [0, 0];
    expect(shapeSignedDistance(rect, 3, 3.5, n)).toBeCloseTo(-0.5, 12);
    expect(n).toEqual([0, 1]);
    expect(shapeSignedDistance(rect, 7, 3, n)).toBeCloseTo(2, 12);
    expect(n).toEqual([1, 0]);
    expect(shapeSignedDistance(rect, 8, 8, n)).toBeCloseTo(5, 12); // corner (5,4), offset (3,4) → 5
    expect(shapeSignedDistance(circle, 3, 0, n)).toBeCloseTo(1, 12);
    expect(shapeSignedDistance(triangleCw, 0.5, 1, n)).toBeCloseTo(-0.5, 12);
    expect(n[0]).toBeCloseTo(-1, 12);
    expect(shapeSignedDistance(lShape, 1.5, 1.5, n)).toBeCloseTo(0.5, 12);
  });

  it('bounds', () => {
    expect(shapeBounds(circle)).toEqual({ minX: -2, minY: -2, maxX: 2, maxY: 2 });
    expect(shapeBounds(lShape)).toEqual({ minX: 0, minY: 0, maxX: 2, maxY: 2 });
  });
});

describe('prop keys', () => {
  const keys = [{ frame: 1001, dx: 0, dy: 0, angle: 0 }, { frame: 1011, dx: 1, dy: -2, angle: 90 }];
  it('interpolates linearly between keys and holds outside them', () => {
    expect(poseAt(keys, 1006)).toEqual({ dx: 0.5, dy: -1, angle: 45 });
    expect(poseAt(keys, 990)).toEqual({ dx: 0, dy: 0, angle: 0 });
    expect(poseAt(keys, 1100)).toEqual({ dx: 1, dy: -2, angle: 90 });
  });
  it('rotates about the drawn centroid, then translates; toDrawn inverts toWorld', () => {
    const square: Shape = { type: 'rect', x: 0, y: 0, width: 2, height: 2 };
    const pl = placementOf(square, { dx: 1, dy: 0, angle: 90 });
    const w = [0, 0];
    toWorld(pl, 2, 1, w); // right-edge midpoint → top-edge midpoint, then +1 in x
    expect(w[0]).toBeCloseTo(2, 12);
    expect(w[1]).toBeCloseTo(2, 12);
    const d = [0, 0];
    toDrawn(pl, w[0], w[1], d);
    expect(d[0]).toBeCloseTo(2, 12);
    expect(d[1]).toBeCloseTo(1, 12);
  });
});

describe('frame ↔ time', () => {
  const timing = { fps: 24, startFrame: 1001, endFrame: 1048 };
  it('frame f is at (f − startFrame)/fps', () => {
    expect(frameToTime(timing, 1001)).toBe(0);
    expect(frameToTime(timing, 1025)).toBe(1);
    expect(timeToFrame(timing, 0.5)).toBe(1013);
    expect(frameCount(timing)).toBe(48);
  });
});
