// Frame ↔ time on the shot: frame f is at (f − startFrame) / fps seconds; frames may be fractional.

export interface Timing { fps: number; startFrame: number; endFrame: number }

/** Time in seconds of (possibly fractional) frame `frame`. */
export function frameToTime(timing: Timing, frame: number): number {
  return (frame - timing.startFrame) / timing.fps;
}

/** Frame number (fractional) at time `seconds`. */
export function timeToFrame(timing: Timing, seconds: number): number {
  return timing.startFrame + seconds * timing.fps;
}

/** Number of frames in the shot's frame range, both ends included. */
export function frameCount(timing: Timing): number {
  return timing.endFrame - timing.startFrame + 1;
}

/** Duration of one frame in seconds. */
export function frameDuration(timing: Timing): number {
  return 1 / timing.fps;
}
