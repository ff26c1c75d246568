// The one place a prop's pose at a frame comes from its keys: the editor's drawing and hit test and the
// solver's keyed props (and free props up to their release) all call propPoseInto / propPlacementAt.
import type { Shape } from './shapes';
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
