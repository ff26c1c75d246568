// The live preview on the browser side: owns the Web Worker, keeps the streamed frames, plays them at the shot's
// frame rate as they arrive, and measures how fast the worker computes them. Views subscribe like to the editor store.
import type { EditorDoc } from '~/lib/editor/document';
import { previewScene, type PreviewMessage, type PreviewRequest } from '~/lib/editor/preview';
import type { FrameStats, PropState } from '~/lib/sim/solver';

/** One streamed frame: particles, stats, and every prop's solved pose (free props are drawn there). */
export interface PreviewFrame { frame: number; count: number; x: Float32Array; y: Float32Array; speed: Float32Array; liquid: Uint8Array; stats: FrameStats; props: PropState[] }

export interface PreviewSnapshot {
  status: 'off' | 'starting' | 'running' | 'paused' | 'done' | 'error';
  playing: boolean;
  /** Last frame the worker has sent (or null). */
  computedTo: number | null;
  /** Frames computed per second over the last second or so. */
  simFps: number;
  /** Frames shown per second (playback). */
  shownFps: number;
  message: string;
  /** Revision of the document the running preview was started from. */
  revision: number;
  factor: number;
  cells: { nx: number; ny: number } | null;
  particles: number;
  /** Particles per square metre at rest in the preview (particlesPerCell / previewCell²), for the looks. */
  restDensity: number;
}

export class PreviewController {
  private worker: Worker | null = null;
  private run = 0;
  private frames = new Map<number, PreviewFrame>();
  private listeners = new Set<() => void>();
  private arrivals: number[] = [];
  private shown: number[] = [];
  private raf = 0;
  private lastTick = 0;
  private playhead = 0;
  snapshot: PreviewSnapshot = { status: 'off', playing: false, computedTo: null, simFps: 0, shownFps: 0, message: '', revision: -1, factor: 2, cells: null, particles: 0, restDensity: 0 };

  constructor(private readonly setFrame: (frame: number) => void, private readonly getFrame: () => number) {}

  subscribe = (fn: () => void) => { this.listeners.add(fn); return () => { this.listeners.delete(fn); }; };
  getSnapshot = () => this.snapshot;
  private set(patch: Partial<PreviewSnapshot>) { this.snapshot = { ...this.snapshot, ...patch }; for (const fn of this.listeners) fn(); }

  frameAt(frame: number): PreviewFrame | null { return this.frames.get(frame) ?? null; }

  private ensureWorker(): Worker {
    if (!this.worker) {
      this.worker = new Worker(new URL('../../lib/editor/preview.worker.ts', import.meta.url), { type: 'module' });
      this.worker.onmessage = (e: MessageEvent<PreviewMessage>) => this.receive(e.data);
      this.worker.onerror = (e) => this.set({ status: 'error', playing: false, message: e.message || 'The preview worker stopped' });
    }
    return this.worker;
  }

  private send(m: PreviewRequest) { this.ensureWorker().postMessage(m); }

  /** Starts (or restarts) the preview of `doc` at the preview factor; plays from the first frame. */
  start(doc: EditorDoc, revision: number, factor = this.snapshot.factor) {
    this.run++;
    this.frames.clear();
    this.arrivals = [];
    this.playhead = doc.timing.startFrame;
    this.docTiming = { fps: doc.timing.fps, startFrame: doc.timing.startFrame, endFrame: doc.timing.endFrame };
    const cell = previewScene(doc, factor).tank.cellSize;
    this.set({ status: 'starting', playing: true, computedTo: null, simFps: 0, message: '', revision, factor, cells: null, particles: 0, restDensity: doc.physics.particlesPerCell / (cell * cell) });
    this.send({ type: 'start', run: this.run, scene: doc, factor });
    this.setFrame(doc.timing.startFrame);
    this.loop();
  }

  setFactor(factor: number) { this.set({ factor }); }

  /** Play or pause playback (and the worker with it). */
  toggle(doc: EditorDoc, revision: number) {
    const s = this.snapshot;
    if (s.status === 'off' || s.status === 'error') { this.start(doc, revision); return; }
    if (s.playing) {
      if (s.status === 'running') this.send({ type: 'pause', run: this.run });
      this.set({ playing: false, status: s.status === 'running' ? 'paused' : s.status });
      cancelAnimationFrame(this.raf);
    } else {
      if (s.status === 'paused') this.send({ type: 'resume', run: this.run });
      this.playhead = this.getFrame();
      this.set({ playing: true, status: s.status === 'paused' ? 'running' : s.status });
      this.loop();
    }
  }

  stop() {
    this.run++;
    this.worker?.postMessage({ type: 'stop' } satisfies PreviewRequest);
    cancelAnimationFrame(this.raf);
    this.frames.clear();
    this.set({ status: 'off', playing: false, computedTo: null, simFps: 0, shownFps: 0 });
  }

  dispose() {
    cancelAnimationFrame(this.raf);
    this.worker?.terminate();
    this.worker = null;
  }

  private receive(m: PreviewMessage) {
    if (m.run !== this.run) return; // a frame of an earlier run
    if (m.type === 'started') { this.set({ status: this.snapshot.playing ? 'running' : 'paused', cells: m.cells }); return; }
    if (m.type === 'error') { this.set({ status: 'error', playing: false, message: m.message }); return; }
    if (m.type === 'done') { this.set({ status: 'done' }); return; }
    this.frames.set(m.frame, { frame: m.frame, count: m.count, x: m.x, y: m.y, speed: m.speed, liquid: m.liquid, stats: m.stats, props: m.props });
    const now = performance.now();
    this.arrivals.push(now);
    while (this.arrivals.length > 2 && now - this.arrivals[0] > 1500) this.arrivals.shift();
    const span = (this.arrivals[this.arrivals.length - 1] - this.arrivals[0]) / 1000;
    const simFps = this.arrivals.length > 1 && span > 0 ? (this.arrivals.length - 1) / span : 0;
    this.set({ computedTo: m.frame, simFps, particles: m.count });
  }

  /** Playback: advances the playhead at the scene's frame rate, never past the last computed frame; loops when done. */
  private loop() {
    cancelAnimationFrame(this.raf);
    this.lastTick = performance.now();
    const tick = (now: number) => {
      if (!this.snapshot.playing) return;
      const doc = this.docTiming;
      const dt = (now - this.lastTick) / 1000;
      this.lastTick = now;
      if (doc && this.snapshot.computedTo !== null) {
        const before = Math.floor(this.playhead);
        this.playhead = Math.min(this.playhead + dt * doc.fps, this.snapshot.computedTo);
        if (this.snapshot.status === 'done' && this.playhead >= doc.endFrame) this.playhead = doc.startFrame;
        const f = Math.floor(this.playhead);
        if (f !== before || f !== this.getFrame()) {
          this.setFrame(f);
          this.shown.push(now);
          while (this.shown.length > 2 && now - this.shown[0] > 1500) this.shown.shift();
          const span = (this.shown[this.shown.length - 1] - this.shown[0]) / 1000;
          if (span > 0) this.set({ shownFps: (this.shown.length - 1) / span });
        }
      }
      this.raf = requestAnimationFrame(tick);
    };
    this.raf = requestAnimationFrame(tick);
  }

  /** Timing of the scene being previewed (set by start). */
  docTiming: { fps: number; startFrame: number; endFrame: number } | null = null;
}
