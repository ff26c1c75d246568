// Editing geometry in tank metres (y up): shapes made from drags, moved, resized, rotated; outlines for drawing;
// hit tests and handles for the select tool; snapping to the grid or the cells. Pure functions.
import type { ShapeDoc } from '../scene/schema';
import { shapeBounds, shapeCentroid, pointInShape, shapeSignedDistance, type Bounds } from '../scene/shapes';
import { toDrawn, toWorld } from '../scene/keys';
import { shownPlacementAt, type PropLike, type SolvedPose } from '../scene/pose';
import { type EditorDoc, type ItemRef, type AnyItem, allItems } from './document';

export type Vec = [number, number];

/** Rounds to 1e-6 m (a micrometre) so documents don't carry float noise like 0.30000000000000004. */
export const tidy = (v: number) => Math.round(v * 1e6) / 1e6;
const tidyPt = (p: readonly number[]): Vec => [tidy(p[0]), tidy(p[1])];

/** Snaps a value to the nearest multiple of `step` (no snapping when step ≤ 0). */
export function snapValue(v: number, step: number): number {
  return step > 0 ? tidy(Math.round(v / step) * step) : v;
}

/** Rectangle spanned by two corners (any order). */
export function rectFromCorners(a: Vec, b: Vec): ShapeDoc {
  return { type: 'rect', x: tidy(Math.min(a[0], b[0])), y: tidy(Math.min(a[1], b[1])), width: tidy(Math.abs(b[0] - a[0])), height: tidy(Math.abs(b[1] - a[1])) };
}

/** Circle centred on `a` through `b`. */
export function circleFromDrag(a: Vec, b: Vec): ShapeDoc {
  return { type: 'circle', x: tidy(a[0]), y: tidy(a[1]), radius: tidy(Math.hypot(b[0] - a[0], b[1] - a[1])) };
}

/**
 * The ellipse inscribed in the box of two corners, as a polygon of `segments` points. The polygon is chosen to have
 * the ellipse's area: vertices on an ellipse scaled by √(2π / (n·sin(2π/n))) (a regular n-gon inscribed in a circle of
 * radius R has area ½·n·R²·sin(2π/n)).
 */
export function ellipseFromCorners(a: Vec, b: Vec, segments = 48): ShapeDoc {
  const cx = (a[0] + b[0]) / 2, cy = (a[1] + b[1]) / 2;
  const k = Math.sqrt((2 * Math.PI) / (segments * Math.sin((2 * Math.PI) / segments)));
  const rx = (Math.abs(b[0] - a[0]) / 2) * k, ry = (Math.abs(b[1] - a[1]) / 2) * k;
  const points: Vec[] = [];
  for (let i = 0; i < segments; i++) {
    const t = (2 * Math.PI * i) / segments;
    points.push(tidyPt([cx + rx * Math.cos(t), cy + ry * Math.sin(t)]));
  }
  return { type: 'polygon', points };
}

/** Smallest extent (m) a dragged shape must have to be kept (a click is not a shape). */
export function shapeIsTiny(shape: ShapeDoc, minSize: number): boolean {
  const b = shapeBounds(shape);
  return b.maxX - b.minX < minSize && b.maxY - b.minY < minSize;
}

export function translateShape(shape: ShapeDoc, dx: number, dy: number): ShapeDoc {
  switch (shape.type) {
    case 'rect': return { ...shape, x: tidy(shape.x + dx), y: tidy(shape.y + dy) };
    case 'circle': return { ...shape, x: tidy(shape.x + dx), y: tidy(shape.y + dy) };
    case 'polygon': return { ...shape, points: shape.points.map((p) => tidyPt([p[0] + dx, p[1] + dy])) };
  }
}

/** Maps the shape's bounds `from` onto `to` (axis-aligned scale); a circle keeps its roundness (mean scale). */
export function fitShape(shape: ShapeDoc, from: Bounds, to: Bounds): ShapeDoc {
  const fw = from.maxX - from.minX || 1e-9, fh = from.maxY - from.minY || 1e-9;
  const sx = (to.maxX - to.minX) / fw, sy = (to.maxY - to.minY) / fh;
  const mapX = (x: number) => to.minX + (x - from.minX) * sx;
  const mapY = (y: number) => to.minY + (y - from.minY) * sy;
  switch (shape.type) {
    case 'rect': return rectFromCorners([mapX(shape.x), mapY(shape.y)], [mapX(shape.x + shape.width), mapY(shape.y + shape.height)]);
    case 'circle': {
      const r = shape.radius * Math.sqrt(Math.abs(sx * sy));
      return { type: 'circle', x: tidy(mapX(shape.x)), y: tidy(mapY(shape.y)), radius: tidy(Math.max(r, 1e-6)) };
    }
    case 'polygon': return { type: 'polygon', points: shape.points.map((p) => tidyPt([mapX(p[0]), mapY(p[1])])) };
  }
}

/** Rotates the shape by `degrees` (counter-clockwise) about `about`. A rect becomes a polygon unless the turn is a multiple of 180°. */
export function rotateShape(shape: ShapeDoc, degrees: number, about: Vec = shapeCentroid(shape)): ShapeDoc {
  const a = (degrees * Math.PI) / 180, c = Math.cos(a), s = Math.sin(a);
  const rot = (p: readonly number[]): Vec => {
    const x = p[0] - about[0], y = p[1] - about[1];
    return tidyPt([about[0] + c * x - s * y, about[1] + s * x + c * y]);
  };
  switch (shape.type) {
    case 'circle': { const [x, y] = rot([shape.x, shape.y]); return { ...shape, x, y }; }
    case 'rect': {
      const turns = degrees / 180;
      if (Math.abs(turns - Math.round(turns)) < 1e-9) {
        const [x, y] = rot([shape.x + shape.width, shape.y + shape.height]);
        const [x2, y2] = rot([shape.x, shape.y]);
        return rectFromCorners([x, y], [x2, y2]);
      }
      return { type: 'polygon', points: rectCorners(shape).map(rot) };
    }
    case 'polygon': return { type: 'polygon', points: shape.points.map(rot) };
  }
}

function rectCorners(r: { x: number; y: number; width: number; height: number }): Vec[] {
  return [[r.x, r.y], [r.x + r.width, r.y], [r.x + r.width, r.y + r.height], [r.x, r.y + r.height]];
}

/** The outline of a shape as points (a circle as `segments` points), metres. */
export function shapeOutline(shape: ShapeDoc, segments = 64): Vec[] {
  switch (shape.type) {
    case 'rect': return rectCorners(shape);
    case 'circle': {
      const out: Vec[] = [];
      for (let i = 0; i < segments; i++) {
        const t = (2 * Math.PI * i) / segments;
        out.push([shape.x + shape.radius * Math.cos(t), shape.y + shape.radius * Math.sin(t)]);
      }
      return out;
    }
    case 'polygon': return shape.points.map((p) => [p[0], p[1]] as Vec);
  }
}

/**
 * A prop's outline at `frame` (world metres) as the view shows it: a free prop at its solved pose when `solved` (the
 * live preview's prop states at that frame) has it, otherwise where its keys put it (shownPlacementAt).
 */
export function propOutlineAt(item: PropLike & { id: string }, frame: number, solved: readonly SolvedPose[] | null = null): Vec[] {
  const place = shownPlacementAt(item, frame, solved);
  const out: Vec[] = [];
  const tmp = [0, 0];
  for (const p of shapeOutline(item.shape)) { toWorld(place, p[0], p[1], tmp); out.push([tmp[0], tmp[1]]); }
  return out;
}

/** The drawn-pose point of world point (x, y) for an item as shown at `frame` (props move; everything else stays). */
function toItemFrame(item: AnyItem, x: number, y: number, frame: number, solved: readonly SolvedPose[] | null): Vec {
  if (!('keys' in item)) return [x, y];
  const place = shownPlacementAt(item, frame, solved);
  const out = [0, 0];
  toDrawn(place, x, y, out);
  return [out[0], out[1]];
}

/**
 * True when world point (x, y) is on the item as shown at `frame`, within `tolerance` metres of its edge. A free prop
 * is where the live preview solved it (`solved`: the preview's prop states at that frame, or null).
 */
export function hitsItem(item: AnyItem, x: number, y: number, frame: number, tolerance: number, solved: readonly SolvedPose[] | null = null): boolean {
  const [px, py] = toItemFrame(item, x, y, frame, solved);
  if (pointInShape(item.shape, px, py)) return true;
  return shapeSignedDistance(item.shape, px, py, [0, 0]) <= tolerance;
}

/** The topmost item under world point (x, y) as shown at `frame` (drains and props are drawn last, so they come first). */
export function hitTest(doc: EditorDoc, x: number, y: number, frame: number, tolerance: number, solved: readonly SolvedPose[] | null = null): ItemRef | null {
  const items = allItems(doc);
  for (let i = items.length - 1; i >= 0; i--) if (hitsItem(items[i].item, x, y, frame, tolerance, solved)) return items[i].ref;
  return null;
}

/** Items whose drawn bounds meet the box. */
export function itemsInBox(doc: EditorDoc, box: Bounds): ItemRef[] {
  return allItems(doc)
    .filter(({ item }) => {
      const b = shapeBounds(item.shape);
      return b.maxX >= box.minX && b.minX <= box.maxX && b.maxY >= box.minY && b.minY <= box.maxY;
    })
    .map((e) => e.ref);
}

export type HandleKind = 'corner' | 'rotate' | 'key' | 'direction';
export interface Handle {
  kind: HandleKind;
  /** World position, metres. */
  x: number;
  y: number;
  /** corner: 0 lower-left, 1 lower-right, 2 upper-right, 3 upper-left; key: the key's index. */
  index: number;
  /** key: the key's frame. */
  frame?: number;
}

/** Metres of handle arm per m/s of spout speed (the direction handle sits at centroid + velocity·this). */
export const SPOUT_ARM_PER_SPEED = 0.1;

/**
 * The handles of one selected item: four resize corners on its drawn bounds, a rotate knob above them, a key dot per
 * prop key (where the key puts the centroid) and a spout's direction knob. `pixel` is metres per screen pixel.
 */
export function handlesOf(item: AnyItem, pixel: number): Handle[] {
  const b = shapeBounds(item.shape);
  const hs: Handle[] = [
    { kind: 'corner', x: b.minX, y: b.minY, index: 0 },
    { kind: 'corner', x: b.maxX, y: b.minY, index: 1 },
    { kind: 'corner', x: b.maxX, y: b.maxY, index: 2 },
    { kind: 'corner', x: b.minX, y: b.maxY, index: 3 },
    { kind: 'rotate', x: (b.minX + b.maxX) / 2, y: b.maxY + 24 * pixel, index: 0 },
  ];
  const [cx, cy] = shapeCentroid(item.shape);
  if ('keys' in item) item.keys.forEach((k, i) => hs.push({ kind: 'key', x: cx + k.dx, y: cy + k.dy, index: i, frame: k.frame }));
  if ('startFrame' in item && 'velocity' in item) {
    hs.push({ kind: 'direction', x: cx + item.velocity[0] * SPOUT_ARM_PER_SPEED, y: cy + item.velocity[1] * SPOUT_ARM_PER_SPEED, index: 0 });
  }
  return hs;
}

/**
 * The handle within `radius` metres of (x, y), preferring keys and knobs over corners. When key diamonds overlap there
 * (keys on neighbouring frames), the key nearest in time to `frame` wins — the one at the current frame when there is
 * one — so the keys list's pick (which sets the frame) is the key a drag takes.
 */
export function handleAt(handles: readonly Handle[], x: number, y: number, radius: number, frame?: number): Handle | null {
  let best: Handle | null = null, bestD = radius;
  for (const h of handles) {
    const d = Math.hypot(h.x - x, h.y - y) - (h.kind === 'corner' ? 0 : 0.25 * radius);
    if (d <= bestD) { best = h; bestD = d; }
  }
  if (best?.kind !== 'key' || frame === undefined) return best;
  let key = best, gap = Math.abs((best.frame ?? 0) - frame);
  for (const h of handles) {
    if (h.kind !== 'key' || Math.hypot(h.x - x, h.y - y) > radius) continue;
    const g = Math.abs((h.frame ?? 0) - frame);
    if (g < gap) { key = h; gap = g; }
  }
  return key;
}
