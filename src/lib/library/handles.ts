// A shot's handles, head (before the cut in) and tail (after the cut out), and the rules that place them: where the
// studio's first frame number falls (its handle convention) and the frame range the cut and its handles make.
// Browser-safe: the import plan, the shot form, the player and exports all read the same rules.
import type { HandleConvention } from '../vocab';

/** The first frame number of a shot when none is given: 1001, common practice (no source). */
export const DEFAULT_FIRST_FRAME = 1001;
/** Handles each end of a new shot when none are given: 8 frames, common practice (no source). */
export const DEFAULT_HANDLES = 8;

/** What a shot stores about its handles; tailHandles null (shots made before head and tail were apart) = the head's count. */
export interface StoredHandles {
  headHandles: number;
  tailHandles?: number | null;
}

/** Returns the shot's tail handles in frames (the head's count when the tail was never stored apart). */
export function tailHandlesOf(shot: StoredHandles): number {
  return shot.tailHandles ?? shot.headHandles;
}

/** Returns the frame numbers of the first head-handle frame and the last tail-handle frame: cut in − head … cut out + tail. */
export function rangeWithHandles(shot: StoredHandles & { firstFrame: number; lastFrame: number }): { first: number; last: number } {
  return { first: shot.firstFrame - shot.headHandles, last: shot.lastFrame + tailHandlesOf(shot) };
}

/**
 * Returns the frame number of the cut in under the studio's convention: 'head-handle' puts the first frame number on
 * the first head-handle frame, so the cut in is startFrame + head handles; 'cut-in' puts it on the cut in itself.
 */
export function cutInFrame(convention: HandleConvention | undefined, headHandles: number, startFrame = DEFAULT_FIRST_FRAME): number {
  return convention === 'cut-in' ? startFrame : startFrame + headHandles;
}
