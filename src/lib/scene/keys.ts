// Prop keyframes: translation (dx, dy) in metres and rotation `angle` in degrees (counter-clockwise)
// about the drawn shape's centroid, relative to the drawn pose; linear between keys, held outside them.
import type { Shape } from './shapes';
import { shapeCentroid } from './shapes';

export interface Key { frame: number; dx: number; dy: number; angle: number }
export interface Pose { dx: number; dy: number; angle: number }

/** Pose at (fractional) `frame`: linear interpolation of the keys, held before the first and after the last. */
export function poseAt(keys: readonly Key[], frame: number): Pose {
  return poseInto(keys, frame, { dx: 0, dy: 0, angle: 0 });
}

/** Same as poseAt, written into `out` (no allocation); returns `out`. */
export function poseInto(keys: readonly Key[], frame: number, out: Pose): Pose {
  const n = keys.length;
  if (n === 0) { out.dx = 0; out.dy = 0; out.angle = 0; return out; }
  let a = keys[0], b = keys[0], t = 0;
  if (frame >= keys[n - 1].frame) { a = b = keys[n - 1]; }
  else if (frame > keys[0].frame) {
    let k = 0;
    while (keys[k + 1].frame < frame) k++;
    a = keys[k]; b = keys[k + 1];
    t = (frame - a.frame) / (b.frame - a.frame);
  }
  out.dx = a.dx + t * (b.dx - a.dx);
  out.dy = a.dy + t * (b.dy - a.dy);
  out.angle = a.angle + t * (b.angle - a.angle);
  return out;
}

/**
 * A rigid placement of a drawn shape: world = R(angle)·(drawn − c) + c + d,
 * with c the drawn centroid. Stored as numbers so the solver can reuse it without allocating.
 */
export interface Placement { cx: number; cy: number; dx: number; dy: number; cos: number; sin: number; angleRad: number }

/** Placement of `shape` at `pose`. */
export function placementOf(shape: Shape, pose: Pose, out?: Placement): Placement {
  const [cx, cy] = shapeCentroid(shape);
  const a = (pose.angle * Math.PI) / 180;
  const p = out ?? { cx: 0, cy: 0, dx: 0, dy: 0, cos: 1, sin: 0, angleRad: 0 };
  p.cx = cx; p.cy = cy; p.dx = pose.dx; p.dy = pose.dy; p.cos = Math.cos(a); p.sin = Math.sin(a); p.angleRad = a;
  return p;
}

/** World point of drawn point (x, y), written into out[0..1]. */
export function toWorld(p: Placement, x: number, y: number, out: { [index: number]: number }): void {
  const rx = x - p.cx, ry = y - p.cy;
  out[0] = p.cos * rx - p.sin * ry + p.cx + p.dx;
  out[1] = p.sin * rx + p.cos * ry + p.cy + p.dy;
}

/** Drawn-pose point of world point (x, y), written into out[0..1] (inverse of toWorld). */
export function toDrawn(p: Placement, x: number, y: number, out: { [index: number]: number }): void {
  const rx = x - p.cx - p.dx, ry = y - p.cy - p.dy;
  out[0] = p.cos * rx + p.sin * ry + p.cx;
  out[1] = -p.sin * rx + p.cos * ry + p.cy;
}

/** Rotates a drawn-frame vector into the world frame, written into out[0..1]. */
export function rotateToWorld(p: Placement, vx: number, vy: number, out: { [index: number]: number }): void {
  out[0] = p.cos * vx - p.sin * vy;
  out[1] = p.sin * vx + p.cos * vy;
}
