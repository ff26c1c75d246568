// The timing helper: a prop dropped into liquid must hit the surface on the frame the cut needs. From ballistics
// (Newton's second law with constant gravity g, no drag): the drop after t seconds is h(t) = v0·t + g·t²/2, with v0 the
// downward release speed. Given the release frame, the impact frame and either the drop height (solve v0) or a release
// from rest (solve the height), the helper writes one key per frame along that path.
import type { ShapeDoc } from '../scene/schema';
import { shapeBounds } from '../scene/shapes';
import type { EditorDoc } from './document';

export interface PropLike { id: string; shape: ShapeDoc; keys: { frame: number; dx: number; dy: number; angle: number }[] }

export interface DropPlan {
  /** Frame on which the prop lets go (held still before it). */
  releaseFrame: number;
  /** Frame on which the prop's lowest point reaches the liquid surface. */
  impactFrame: number;
  /** Height (m, tank coordinates) of the liquid surface under the prop. */
  surfaceY: number;
  /** 'keep-height': the prop stays where it is drawn and gets the release speed it needs; 'from-rest': v0 = 0 and the prop is raised or lowered to the height that takes exactly that long. */
  mode: 'keep-height' | 'from-rest';
  /** Frames after impact to keep moving (slowing in the liquid), default 6. */
  followFrames?: number;
}

export interface DropResult {
  keys: { frame: number; dx: number; dy: number; angle: number }[];
  /** Downward release speed v0, m/s (negative: thrown upward first). */
  releaseSpeed: number;
  /** Fall height from the prop's lowest point to the surface, m. */
  dropHeight: number;
  /** Downward speed at impact, m/s: v0 + g·t. */
  impactSpeed: number;
  /** Seconds from release to impact. */
  fallTime: number;
}

/** Magnitude of the scene's downward gravity (m/s²), the y component (y points up). */
export function downwardGravity(doc: EditorDoc): number {
  return Math.max(0, -doc.physics.gravity[1]);
}

/**
 * Height (m) of the liquid surface below x: the highest point of any pour's outline on the vertical line at x
 * (the pours as drawn at the first frame), or null when no pour lies under x.
 */
export function surfaceHeightAt(doc: EditorDoc, x: number): number | null {
  let best: number | null = null;
  for (const p of doc.pours) {
    const s = p.shape;
    let top: number | null = null;
    if (s.type === 'rect') top = x >= s.x && x <= s.x + s.width ? s.y + s.height : null;
    else if (s.type === 'circle') top = Math.abs(x - s.x) <= s.radius ? s.y + Math.sqrt(s.radius * s.radius - (x - s.x) ** 2) : null;
    else {
      for (let i = 0, n = s.points.length; i < n; i++) {
        const a = s.points[i], b = s.points[(i + 1) % n];
        if ((a[0] <= x && x <= b[0]) || (b[0] <= x && x <= a[0])) {
          const y = a[0] === b[0] ? Math.max(a[1], b[1]) : a[1] + ((x - a[0]) / (b[0] - a[0])) * (b[1] - a[1]);
          top = top === null ? y : Math.max(top, y);
        }
      }
    }
    if (top !== null) best = best === null ? top : Math.max(best, top);
  }
  return best;
}

/** Lowest point (m) of the prop's drawn shape at its first key's offset. */
export function propBottom(prop: PropLike): number {
  return shapeBounds(prop.shape).minY + (prop.keys[0]?.dy ?? 0);
}

/**
 * Keys that drop the prop so its lowest point reaches `surfaceY` at `impactFrame`. The prop keeps its first key's
 * dx and angle; dy(t) = dy0 − (v0·t + g·t²/2) at every frame from release to impact; afterwards it slows in the
 * liquid (speed halved each frame, art direction, not physics) for `followFrames` frames without going below the
 * tank floor. Throws when the impact frame is not after the release frame or gravity is zero.
 */
export function planDrop(doc: EditorDoc, prop: PropLike, plan: DropPlan): DropResult {
  const { fps } = doc.timing;
  const g = downwardGravity(doc);
  if (!(plan.impactFrame > plan.releaseFrame)) throw new Error('the impact frame must come after the release frame');
  if (!(g > 0)) throw new Error('gravity must point down to drop a prop');
  const t = (plan.impactFrame - plan.releaseFrame) / fps;
  const first = prop.keys[0] ?? { frame: plan.releaseFrame, dx: 0, dy: 0, angle: 0 };
  const drawnBottom = shapeBounds(prop.shape).minY;
  let dy0 = first.dy;
  let h = drawnBottom + dy0 - plan.surfaceY;
  let v0: number;
  if (plan.mode === 'from-rest') {
    // h = g·t²/2 (v0 = 0): move the prop so its lowest point starts that far above the surface
    v0 = 0;
    h = 0.5 * g * t * t;
    dy0 = plan.surfaceY + h - drawnBottom;
  } else {
    // h = v0·t + g·t²/2  ⇒  v0 = h/t − g·t/2
    v0 = h / t - 0.5 * g * t;
  }
  const r6 = (v: number) => Math.round(v * 1e6) / 1e6;
  const keys: DropResult['keys'] = [];
  if (plan.releaseFrame > doc.timing.startFrame) keys.push({ frame: doc.timing.startFrame, dx: first.dx, dy: r6(dy0), angle: first.angle });
  for (let f = plan.releaseFrame; f <= plan.impactFrame; f++) {
    const s = (f - plan.releaseFrame) / fps;
    keys.push({ frame: f, dx: first.dx, dy: r6(dy0 - (v0 * s + 0.5 * g * s * s)), angle: first.angle });
  }
  // exact at impact (rounding aside): lowest point on the surface
  keys[keys.length - 1].dy = r6(plan.surfaceY - drawnBottom);
  const impactSpeed = v0 + g * t;
  let speed = impactSpeed, dy = plan.surfaceY - drawnBottom;
  const floor = -drawnBottom; // dy that puts the lowest point on the tank floor
  for (let k = 1; k <= (plan.followFrames ?? 6); k++) {
    speed *= 0.5;
    dy = Math.max(floor, dy - speed / fps);
    keys.push({ frame: plan.impactFrame + k, dx: first.dx, dy: r6(dy), angle: first.angle });
  }
  return { keys, releaseSpeed: v0, dropHeight: h, impactSpeed, fallTime: t };
}

/**
 * The first frame on which the prop's lowest point is at or below `surfaceY`, read from its keys (linear between
 * keys, as the solver reads them); null if it never gets there. This is what the ruler marks as the impact frame.
 */
export function impactFrameOf(prop: PropLike, surfaceY: number, fromFrame: number, toFrame: number): number | null {
  const bottom = shapeBounds(prop.shape).minY;
  for (let f = fromFrame; f <= toFrame; f++) {
    const dy = poseDy(prop.keys, f);
    if (bottom + dy <= surfaceY + 1e-6) return f;
  }
  return null;
}

function poseDy(keys: PropLike['keys'], frame: number): number {
  if (!keys.length) return 0;
  if (frame <= keys[0].frame) return keys[0].dy;
  for (let k = 1; k < keys.length; k++) {
    if (frame <= keys[k].frame) {
      const a = keys[k - 1], b = keys[k];
      return a.dy + ((frame - a.frame) / (b.frame - a.frame)) * (b.dy - a.dy);
    }
  }
  return keys[keys.length - 1].dy;
}
