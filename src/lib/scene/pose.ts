// The one place a prop's pose at a frame comes from: its keys (the solver's keyed props, and free props up to their
// release, call propPoseInto), or for a free prop the solver's reported state (poseOfSolved); the editor's drawing
// and hit test both call shownPoseInto / shownPlacementAt, which pick between the two.
import { shapeCentroid, type Shape } from './shapes';
import { poseInto, placementOf, type Key, type Pose, type Placement } from './keys';

/** What the pose needs of a prop (a parsed scene's prop, or the editor's item). */
export interface PropLike {
  shape: Shape;
  keys: readonly Key[];
  motion?: 'keyed' | 'free';
  releaseFrame?: number;
}

/**
 * The frame whose keyed pose a prop shows at `frame`: a keyed prop follows its keys at every frame; a free prop
 * follows them up to its release frame, or — without one — starts at its first key's pose (the drawn pose
 * when it has no keys). After the release only the solver knows where a free prop is.
 */
export function keyedFrameOf(prop: PropLike, frame: number): number {
  if (prop.motion !== 'free') return frame;
  return Math.min(frame, prop.releaseFrame ?? -Infinity);
}

/** Pose of the prop from its keys at (fractional) `frame` (see keyedFrameOf), written into `out`. */
export function propPoseInto(prop: PropLike, frame: number, out: Pose): Pose {
  return poseInto(prop.keys, keyedFrameOf(prop, frame), out);
}

/** Placement (drawn → world) of the prop at `frame` from its keys. */
export function propPlacementAt(prop: PropLike, frame: number, out?: Placement): Placement {
  return placementOf(prop.shape, propPoseInto(prop, frame, { dx: 0, dy: 0, angle: 0 }), out);
}

/** A prop's state as the solver reports it each frame: its centroid (tank metres) and angle (degrees). */
export interface SolvedPose { id: string; x: number; y: number; angle: number }

/**
 * The pose a solved state stands for: the solver's centroid less the drawn shape's centroid, and the same angle
 * (the inverse of how the solver reports a placed prop: centroid = drawn centroid + (dx, dy)).
 */
export function poseOfSolved(shape: Shape, state: Pick<SolvedPose, 'x' | 'y' | 'angle'>, out: Pose = { dx: 0, dy: 0, angle: 0 }): Pose {
  const [cx, cy] = shapeCentroid(shape);
  out.dx = state.x - cx; out.dy = state.y - cy; out.angle = state.angle;
  return out;
}

/**
 * Where a prop is shown at `frame`: a free prop at its solved pose when `solved` (the live preview's states at that
 * frame) has it, otherwise — and for every keyed prop — where its keys put it (propPoseInto). The editor draws and
 * hit-tests props with this, so what the artist clicks is what the view shows.
 */
export function shownPoseInto(prop: PropLike & { id: string }, frame: number, solved: readonly SolvedPose[] | null, out: Pose): Pose {
  const s = prop.motion === 'free' && solved ? solved.find((p) => p.id === prop.id) : undefined;
  return s ? poseOfSolved(prop.shape, s, out) : propPoseInto(prop, frame, out);
}

/** Placement (drawn → world) of the prop as shown at `frame` (see shownPoseInto). */
export function shownPlacementAt(prop: PropLike & { id: string }, frame: number, solved: readonly SolvedPose[] | null, out?: Placement): Placement {
  return placementOf(prop.shape, shownPoseInto(prop, frame, solved, { dx: 0, dy: 0, angle: 0 }), out);
}
