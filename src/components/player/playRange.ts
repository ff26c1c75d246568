// The player's frame ranges: the shot's cut range with its handles (what the timeline spans and playback loops over,
// as the studio's handle convention laid it out), met with the frames the bake holds (only those can be drawn).

export interface FrameSpan {
  start: number;
  end: number;
}

/**
 * `timeline`: the cut range with head and tail handles, widened to any baked frames outside it; `play`: the default
 * in/out, the cut range with handles where it is baked (the baked range when the two do not meet); `baked` as given.
 */
export function playRanges(shot: { firstFrame: number; lastFrame: number; headHandles: number; tailHandles: number }, baked: FrameSpan): { timeline: FrameSpan; play: FrameSpan; baked: FrameSpan } {
  const cut = { start: shot.firstFrame - Math.max(0, shot.headHandles), end: shot.lastFrame + Math.max(0, shot.tailHandles) };
  const start = Math.max(cut.start, baked.start);
  const end = Math.min(cut.end, baked.end);
  return {
    timeline: { start: Math.min(cut.start, baked.start), end: Math.max(cut.end, baked.end) },
    play: start <= end ? { start, end } : { ...baked },
    baked: { ...baked },
  };
}
