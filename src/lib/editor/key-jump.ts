// A guard on key changes: a moved or edited key that makes a prop jump more than its own size between two frames is
// almost always a slip (a diamond dragged onto the wrong frame), so the editor asks before keeping it. Pure functions.
import { shapeBounds, shapeCentroid } from '../scene/shapes';
import { poseInto, type Key } from '../scene/keys';
import type { PropLike } from '../scene/pose';
import { shapeOutline } from './geometry';

/** The prop's size (m): the longer side of its drawn bounds. */
export function propSize(shape: PropLike['shape']): number {
  const b = shapeBounds(shape);
  return Math.max(b.maxX - b.minX, b.maxY - b.minY);
}

/** Farthest any outline point lies from the drawn centroid (m): how far a turn of one radian moves a point at most. */
function reach(shape: PropLike['shape']): number {
  const [cx, cy] = shapeCentroid(shape);
  let r = 0;
  for (const p of shapeOutline(shape, 32)) r = Math.max(r, Math.hypot(p[0] - cx, p[1] - cy));
  return r;
}

/** The frames over which the keys move the prop (a free prop without a release frame: none; with one: up to it). */
function keyedSpan(prop: PropLike): [number, number] | null {
  const keys = prop.keys;
  if (keys.length < 2) return null;
  if (prop.motion === 'free' && prop.releaseFrame === undefined) return null;
  const last = prop.motion === 'free' ? Math.min(keys[keys.length - 1].frame, prop.releaseFrame!) : keys[keys.length - 1].frame;
  return [Math.floor(keys[0].frame), Math.ceil(last)];
}

/**
 * The largest distance (m) a point of the prop moves between two consecutive whole frames of its keyed span, and the
 * first of those frames: |Δ centroid| + |Δ angle| · reach (exact for a slide, an upper bound when it also turns).
 */
export function largestFrameJump(prop: PropLike): { distance: number; frame: number } | null {
  const span = keyedSpan(prop);
  if (!span) return null;
  const r = reach(prop.shape);
  const a = { dx: 0, dy: 0, angle: 0 }, b = { dx: 0, dy: 0, angle: 0 };
  let best = { distance: 0, frame: span[0] };
  const keys: readonly Key[] = prop.keys;
  poseInto(keys, span[0], a);
  for (let f = span[0]; f < span[1]; f++) {
    poseInto(keys, f + 1, b);
    const d = Math.hypot(b.dx - a.dx, b.dy - a.dy) + (Math.abs(b.angle - a.angle) * Math.PI / 180) * r;
    if (d > best.distance) best = { distance: d, frame: f };
    a.dx = b.dx; a.dy = b.dy; a.angle = b.angle;
  }
  return best;
}

/**
 * When the change from `before` to `after` makes the prop jump farther than its own size in one frame (and farther
 * than it already did), the question to ask the artist, in words; otherwise null.
 */
export function jumpWarning(before: PropLike & { id: string }, after: PropLike & { id: string }, fps: number): string | null {
  const jump = largestFrameJump(after);
  if (!jump) return null;
  const size = propSize(after.shape);
  if (jump.distance <= size) return null;
  const was = largestFrameJump(before)?.distance ?? 0;
  if (jump.distance <= was + 1e-9) return null;
  return `With this key ${after.id} jumps ${jump.distance.toFixed(2)} m between frames ${jump.frame} and ${jump.frame + 1}, ` +
    `more than its own size (${size.toFixed(2)} m): about ${(jump.distance * fps).toFixed(0)} m/s. Keep the change?`;
}
