// Plays frames at the shot's fps from the wall clock: frame = start + ⌊elapsed·fps⌋, wrapped into the in/out range.
// A frame that is not decoded in time is skipped (the clock never waits), so playback keeps real time.
import type { PlayerEngine } from './engine';

export interface PlayRange {
  inFrame: number;
  outFrame: number;
  loop: boolean;
}

export class Playback {
  playing = false;
  /** Frames drawn and skipped since play started. */
  drawn = 0;
  skipped = 0;
  private raf = 0;
  private t0 = 0;
  private f0 = 0;
  private lastTarget = NaN;

  constructor(
    private engine: PlayerEngine,
    private onFrame: (frame: number) => void,
    private onStop: () => void,
  ) {}

  /** Starts at `from` (or the in point when `from` is outside the range or at its end). */
  start(from: number, fps: number, range: PlayRange) {
    this.stop(false);
    const { inFrame, outFrame } = range;
    const f0 = from < inFrame || from >= outFrame ? inFrame : from;
    this.playing = true;
    this.drawn = 0;
    this.skipped = 0;
    this.f0 = f0;
    this.t0 = performance.now();
    this.lastTarget = NaN;
    this.engine.prefetch(f0, inFrame, outFrame);
    const tick = (now: number) => {
      if (!this.playing) return;
      const n = Math.floor(((now - this.t0) / 1000) * fps);
      let target = this.f0 + n;
      if (target > outFrame) {
        if (range.loop) target = inFrame + ((target - inFrame) % (outFrame - inFrame + 1));
        else {
          if (this.engine.drawNow(outFrame)) this.onFrame(outFrame);
          this.stop();
          return;
        }
      }
      if (target !== this.lastTarget) {
        if (!Number.isNaN(this.lastTarget) && target !== this.lastTarget + 1 && !(target === inFrame && this.lastTarget === outFrame)) {
          this.skipped += Math.max(0, target - this.lastTarget - 1);
        }
        this.lastTarget = target;
        if (this.engine.drawNow(target)) {
          this.drawn++;
          this.onFrame(target);
        } else {
          this.skipped++;
          void this.engine.decode(target).catch(() => undefined);
        }
        this.engine.prefetch(target, inFrame, outFrame);
      }
      this.raf = requestAnimationFrame(tick);
    };
    this.raf = requestAnimationFrame(tick);
  }

  stop(notify = true) {
    const was = this.playing;
    this.playing = false;
    cancelAnimationFrame(this.raf);
    if (was && notify) this.onStop();
  }
}
