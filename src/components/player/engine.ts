// The player's drawing engine (no React): a pixi.js 8 stage with the plate underneath and the particles on top, redrawn
// on demand. Frames are decoded on the main thread, kept in a small cache around the playhead, and prefetched ahead of
// it; each look is drawn from small per-frame inputs (gpuLooks.ts: a density texture and a shader, or a dot-sized
// canvas the compositor scales up), so software WebGL never uploads a full-size image. The plate is a DOM element (the plate's own image or
// canvas) under the transparent WebGL canvas, as in the editor: the browser composites it, so software WebGL never
// draws a full-view textured quad for it (≈ 60 ms at 1920×1080 on SwiftShader) nor re-uploads a video plate's frame.
// Pixi's shader code without eval, so the page's Content-Security-Policy needs no 'unsafe-eval'.
import 'pixi.js/unsafe-eval';
import { Application } from 'pixi.js';
import type { LookOptions, ParticleFrame, RenderLook } from '~/lib/render/looks';
import { GpuLooks, viewPxPerTexel } from './gpuLooks';
import { layoutView, type ViewLayout } from '~/lib/render/view';
import type { PlateFrameSource, PlateImage } from '~/lib/plate';
import type { ClipLook } from '~/lib/clip/format';

/** Where the engine gets frames: a clip reader, or synthetic frames in the benchmark. */
export interface FrameSource {
  startFrame: number;
  endFrame: number;
  /** Tank size in metres. */
  tankWidth: number;
  tankHeight: number;
  /** Liquid colours, walls and props to draw (a version 2 clip's header; absent: the liquid alone). */
  look?: ClipLook;
  frameAt(frame: number): Promise<ParticleFrame>;
  /** Starts fetching the bytes of the frames around `frame` (optional). */
  prefetch?(frame: number): void;
}

export interface EngineOptions {
  host: HTMLElement;
  frames: FrameSource;
  plate: PlateFrameSource | null;
  /** Metres per plate pixel (the shot's scale), or null to fit the tank to the view. */
  metresPerPixel: number | null;
  look: RenderLook;
  lookOptions?: LookOptions;
}

/** Milliseconds spent on the last drawn frame: the look's inputs on the CPU, and their upload plus pixi's render. */
export interface DrawTiming {
  frame: number;
  lookMs: number;
  gpuMs: number;
}

const CACHE_FRAMES = 48;
const PREFETCH_AHEAD = 12;

export class PlayerEngine {
  readonly app = new Application();
  private looks!: GpuLooks;
  /** Holds the plate element and the canvas, on the view's background colour. */
  private readonly stageEl: HTMLDivElement;
  private plateEl: PlateImage | null = null;
  private layout!: ViewLayout;
  private decoded = new Map<number, ParticleFrame>();
  private pending = new Map<number, Promise<ParticleFrame>>();
  private shown: number | null = null;
  private wanted: number | null = null;
  private resizeObserver: ResizeObserver | null = null;
  private destroyed = false;
  private playhead = 0;
  look: RenderLook;
  lookOptions: LookOptions;
  lastTiming: DrawTiming | null = null;
  /** Walls left out of the picture (the plate already shows them), whatever the scene's wall style. */
  private wallsHidden = false;
  private withoutWalls: ClipLook | undefined;

  private constructor(private o: EngineOptions) {
    this.stageEl = document.createElement('div');
    this.stageEl.style.cssText = 'position:absolute;inset:0;overflow:hidden;background:#0b1418';
    this.look = o.look;
    this.lookOptions = o.lookOptions ?? {};
    this.playhead = o.frames.startFrame;
  }

  /** Creates the stage in `host` (WebGL: software GL has no WebGPU adapter, PITFALLS.md). */
  static async create(o: EngineOptions): Promise<PlayerEngine> {
    const engine = new PlayerEngine(o);
    const { width, height } = sizeOf(o.host);
    // Above ~0.64 megapixels the canvas is drawn at half size and scaled up by the compositor (viewPxPerTexel).
    await engine.app.init({ preference: 'webgl', width, height, backgroundAlpha: 0, antialias: false, autoStart: false, resolution: 1 / viewPxPerTexel(width, height) });
    engine.app.ticker.stop();
    const canvas = engine.app.canvas;
    canvas.style.cssText = 'position:absolute;inset:0;width:100%;height:100%;display:block';
    if (getComputedStyle(o.host).position === 'static') o.host.style.position = 'relative';
    if (o.plate) {
      // The engine owns the plate source (it destroys it): its element goes into the page as it is.
      engine.plateEl = await o.plate.frameAt(o.frames.startFrame);
      engine.plateEl.style.cssText = 'position:absolute;display:block;max-width:none';
      engine.stageEl.appendChild(engine.plateEl);
    }
    engine.stageEl.appendChild(canvas);
    o.host.appendChild(engine.stageEl);
    engine.build(width, height);
    if (typeof ResizeObserver !== 'undefined') {
      engine.resizeObserver = new ResizeObserver(() => engine.resize());
      engine.resizeObserver.observe(o.host);
    }
    return engine;
  }

  get startFrame() {
    return this.o.frames.startFrame;
  }
  get endFrame() {
    return this.o.frames.endFrame;
  }
  get currentFrame() {
    return this.shown;
  }

  /** (Re)builds the particle layer and the layout for a view size in pixels. */
  private build(width: number, height: number) {
    const { frames, plate, metresPerPixel } = this.o;
    this.layout = layoutView({ viewWidth: width, viewHeight: height, tankWidth: frames.tankWidth, tankHeight: frames.tankHeight, plate, metresPerPixel });
    const old = this.looks;
    this.looks = new GpuLooks(width, height);
    if (old) {
      this.app.stage.removeChild(old.container);
      old.destroy();
    }
    this.app.stage.addChild(this.looks.container);
    if (this.app.canvas.parentElement === this.stageEl) this.stageEl.appendChild(this.looks.dotCanvasEl);
    if (this.plateEl) {
      const r = this.layout.plateRect;
      const st = this.plateEl.style;
      st.visibility = r ? 'visible' : 'hidden';
      if (r) Object.assign(st, { left: `${r.x}px`, top: `${r.y}px`, width: `${r.width}px`, height: `${r.height}px` });
    }
  }

  resize() {
    if (this.destroyed) return;
    const { width, height } = sizeOf(this.o.host);
    if (width === this.looks.width && height === this.looks.height) return;
    this.app.renderer.resize(width, height, 1 / viewPxPerTexel(width, height));
    this.build(width, height);
    const f = this.shown;
    if (f !== null && this.decoded.has(f)) this.drawNow(f);
  }

  /** True when the clip has walls the scene asks to draw (so hiding them changes the picture). */
  get drawsWalls(): boolean {
    const look = this.o.frames.look;
    return !!look && look.walls.length > 0 && look.wallStyle !== 'hidden';
  }

  /** Shows or hides the walls and redraws. */
  setWallsHidden(hidden: boolean) {
    this.wallsHidden = hidden;
    if (this.shown !== null && this.decoded.has(this.shown)) this.drawNow(this.shown);
  }

  setLook(look: RenderLook, options?: LookOptions) {
    this.look = look;
    if (options) this.lookOptions = options;
    if (this.shown !== null && this.decoded.has(this.shown)) this.drawNow(this.shown);
  }

  /** The decoded frame when it is in the cache. */
  cached(frame: number): ParticleFrame | undefined {
    return this.decoded.get(frame);
  }

  /** Decodes a frame (cached; concurrent calls share one decode). */
  decode(frame: number): Promise<ParticleFrame> {
    const hit = this.decoded.get(frame);
    if (hit) return Promise.resolve(hit);
    let p = this.pending.get(frame);
    if (!p) {
      p = this.o.frames.frameAt(frame).then((f) => {
        this.pending.delete(frame);
        this.decoded.set(frame, f);
        this.evict();
        return f;
      });
      p.catch(() => this.pending.delete(frame));
      this.pending.set(frame, p);
    }
    return p;
  }

  private evict() {
    if (this.decoded.size <= CACHE_FRAMES) return;
    // Drop the frames farthest from the playhead (behind it counts double: playback moves forward).
    const far = [...this.decoded.keys()].sort((a, b) => distance(b, this.playhead) - distance(a, this.playhead));
    for (const f of far.slice(0, this.decoded.size - CACHE_FRAMES)) this.decoded.delete(f);
  }

  /** Decodes the next frames after `frame` (wrapping inside [from, to]) one at a time, and fetches their chunks. */
  prefetch(frame: number, from = this.startFrame, to = this.endFrame) {
    this.o.frames.prefetch?.(frame);
    let chain: Promise<unknown> = Promise.resolve();
    for (let k = 1; k <= PREFETCH_AHEAD; k++) {
      let f = frame + k;
      if (f > to) f = from + ((f - from) % (to - from + 1));
      if (this.decoded.has(f) || this.pending.has(f)) continue;
      chain = chain.then(() => (this.destroyed ? null : this.decode(f))).catch(() => null);
    }
  }

  /** Shows a frame as soon as it is decoded; a later call wins over an earlier one still waiting. */
  async show(frame: number): Promise<void> {
    this.wanted = frame;
    this.playhead = frame;
    const f = await this.decode(frame);
    if (this.destroyed || this.wanted !== frame) return;
    await this.updatePlate(frame);
    if (this.destroyed || this.wanted !== frame) return;
    this.drawParticles(frame, f);
    this.prefetch(frame);
  }

  /** Draws a decoded frame at once (returns false when it is not decoded yet); the plate follows when ready. */
  drawNow(frame: number): boolean {
    const f = this.decoded.get(frame);
    if (!f) return false;
    this.wanted = frame;
    this.playhead = frame;
    if (this.o.plate?.kind === 'video') void this.updatePlate(frame);
    this.drawParticles(frame, f);
    return true;
  }

  /** Brings a video plate to the frame (its canvas, in the page, redraws itself); a still has nothing to do. */
  private async updatePlate(frame: number) {
    const plate = this.o.plate;
    if (!plate || plate.kind !== 'video') return;
    await plate.frameAt(frame);
  }

  private drawParticles(frame: number, f: ParticleFrame) {
    const t0 = performance.now();
    const { tankWidth, tankHeight } = this.o.frames;
    const look = this.o.frames.look;
    const scene = look && this.wallsHidden ? (this.withoutWalls ??= { ...look, wallStyle: 'hidden' }) : look;
    this.looks.draw(this.look, f, this.layout.toView, { tank: { width: tankWidth, height: tankHeight }, scene, ...this.lookOptions });
    const t1 = performance.now();
    this.app.render();
    const t2 = performance.now();
    this.shown = frame;
    this.lastTiming = { frame, lookMs: t1 - t0, gpuMs: t2 - t1 };
  }

  destroy() {
    this.destroyed = true;
    this.resizeObserver?.disconnect();
    this.o.plate?.destroy();
    this.app.destroy(true, { children: true, texture: true });
    this.stageEl.remove();
  }
}

function distance(f: number, playhead: number) {
  return f >= playhead ? f - playhead : 2 * (playhead - f);
}

function sizeOf(host: HTMLElement) {
  const r = host.getBoundingClientRect();
  return { width: Math.max(16, Math.round(r.width)), height: Math.max(16, Math.round(r.height)) };
}
