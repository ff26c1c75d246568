// The render looks. "speed": particles as dots coloured by speed. "surface": a smooth liquid surface from the particle
// density (splat → blur → threshold at half the rest density, with an edge line). LookRenderer draws them on the CPU
// into one image a frame (exports and the editor); the player draws the same looks on the GPU from the per-frame
// inputs computed here (density field, spray droplets, dot sizes): src/components/player/gpuLooks.ts. Never a sprite
// per particle: software WebGL can't draw 50k of them at the shot's fps (PITFALLS.md). Free of React and the DOM.
import { createImage, packPremultiplied, rampColour, type PixelImage } from './image';
import type { TankToView } from './view';

export const RENDER_LOOKS = ['surface', 'speed'] as const;
export type RenderLook = (typeof RENDER_LOOKS)[number];

export const LOOK_LABELS: Record<RenderLook, string> = { surface: 'Surface', speed: 'Speed' };

/** One frame of particles: positions in metres (tank coordinates, y up), speeds in m/s. */
export interface ParticleFrame {
  count: number;
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  speed: ArrayLike<number>;
  maxSpeed: number;
}

export interface LookOptions {
  /** Speed that gets the top colour of the speed ramp, m/s (default: the frame's own max speed). */
  speedScale?: number;
  /** Particles per square metre at rest: sets the surface's threshold (default: estimated from the frame). */
  restDensity?: number;
  /**
   * The tank in metres: the surface look mirrors liquid across its left, right and bottom sides, so liquid resting
   * on a side is not drawn with an edge line along it.
   */
  tank?: { width: number; height: number };
}

/** Speed ramp, slow → fast: deep blue, cyan, pale yellow, coral. Stops are [position, r, g, b]. */
export const SPEED_RAMP = [
  [0, 28, 72, 190],
  [0.35, 30, 190, 225],
  [0.7, 250, 240, 160],
  [1, 240, 96, 62],
] as const;

const SPEED_ALPHA = 0.92;
const SURFACE_FILL: [number, number, number] = [110, 196, 232];
const SURFACE_DEEP: [number, number, number] = [40, 120, 185];
const SURFACE_EDGE: [number, number, number] = [236, 250, 255];

/**
 * Estimates the rest density (particles per m²) of a frame: the 80th percentile of particle counts over the
 * occupied cells of a grid coarse enough to hold about 16 particles a full cell.
 */
export function estimateRestDensity(frame: ParticleFrame): number {
  const n = frame.count;
  if (n === 0) return 1;
  let minX = Infinity, maxX = -Infinity, minY = Infinity, maxY = -Infinity;
  for (let i = 0; i < n; i++) {
    const x = frame.x[i], y = frame.y[i];
    if (x < minX) minX = x;
    if (x > maxX) maxX = x;
    if (y < minY) minY = y;
    if (y > maxY) maxY = y;
  }
  const area = Math.max((maxX - minX) * (maxY - minY), 1e-9);
  const h = Math.sqrt((area / n) * 16);
  const gw = Math.max(1, Math.ceil((maxX - minX) / h) + 1);
  const gh = Math.max(1, Math.ceil((maxY - minY) / h) + 1);
  const counts = new Uint32Array(gw * gh);
  for (let i = 0; i < n; i++) counts[Math.floor((frame.y[i] - minY) / h) * gw + Math.floor((frame.x[i] - minX) / h)]++;
  const occupied = Array.from(counts).filter((c) => c > 0).sort((a, b) => a - b);
  const p80 = occupied[Math.min(occupied.length - 1, Math.floor(occupied.length * 0.8))] ?? 1;
  return p80 / (h * h);
}

/** Dot size and speed scale of the "speed" look, shared by the CPU image and the player's GPU points. */
export interface SpeedDots {
  /** Dot side in view pixels (1–4, about the particle spacing). */
  dot: number;
  /** Multiply a speed (m/s) by this to get its place on SPEED_RAMP (0–1, clamp above). */
  perMetrePerSecond: number;
}

/**
 * The surface look's density field: ρ/ρ₀ on a grid of `cellPx`-pixel cells with one guard cell on each side,
 * row-major, `gw` × `gh`. Cell (i, j) is centred on view pixel ((i − 1 + ½)·cellPx, (j − 1 + ½)·cellPx).
 */
export interface DensityField {
  cellPx: number;
  gw: number;
  gh: number;
  /** ρ/ρ₀ per cell (reused between frames: read it before the next call). */
  ratio: Float32Array;
}

/** Surface look colours, [r, g, b] in 0–255: fill at the surface, fill deep inside, and the edge line / spray. */
export const SURFACE_COLOURS: Readonly<Record<'fill' | 'deep' | 'edge', readonly [number, number, number]>> = {
  fill: SURFACE_FILL,
  deep: SURFACE_DEEP,
  edge: SURFACE_EDGE,
};
export const SPEED_DOT_ALPHA = SPEED_ALPHA;
export const SPRAY_ALPHA = 0.85;

/**
 * Draws particle frames into one reusable image of the view's size, and computes the per-frame inputs (density field,
 * spray droplets, dot sizes) that the player's GPU path draws with shaders instead.
 */
export class LookRenderer {
  private img: PixelImage | null = null;
  private readonly viewWidth: number;
  private readonly viewHeight: number;
  private speedLut = new Uint32Array(256);
  // Surface look: density grid (cells of `cellPx` view pixels, one cell centred on every cellPx-th pixel).
  private cellPx = 0;
  private gw = 0;
  private gh = 0;
  private density = new Float32Array(0);
  private scratch = new Float32Array(0);
  private quiet = new Uint8Array(0);
  private colIndex = new Int32Array(0);
  private colFrac = new Float32Array(0);
  private estimatedRest = 0;
  private sprayScratch = new Int32Array(0);

  constructor(width: number, height: number) {
    this.viewWidth = Math.max(1, Math.round(width));
    this.viewHeight = Math.max(1, Math.round(height));
    for (let i = 0; i < 256; i++) {
      const [r, g, b] = rampColour(SPEED_RAMP, i / 255);
      this.speedLut[i] = packPremultiplied(r, g, b, SPEED_ALPHA);
    }
  }

  /** The image `render` draws into (allocated on first use: the GPU path never needs it). */
  get image(): PixelImage {
    return (this.img ??= createImage(this.viewWidth, this.viewHeight));
  }

  /** Draws the frame in the look; returns the image (cleared first: transparent where there is no liquid). */
  render(look: RenderLook, frame: ParticleFrame, toView: TankToView, options: LookOptions = {}): PixelImage {
    this.image.pixels.fill(0);
    if (frame.count > 0) {
      if (look === 'speed') this.drawSpeed(frame, toView, options);
      else this.drawSurface(frame, toView, options);
    }
    return this.image;
  }

  /** Dot size (view px) and speed scale of the speed look for this frame and view. */
  speedDots(frame: ParticleFrame, t: TankToView, options: LookOptions = {}): SpeedDots {
    const rest = options.restDensity ?? this.restFor(frame);
    const spacingPx = t.sx / Math.sqrt(rest);
    const dot = Math.max(1, Math.min(4, Math.round(spacingPx)));
    const scale = options.speedScale && options.speedScale > 0 ? options.speedScale : frame.maxSpeed || 1;
    return { dot, perMetrePerSecond: 1 / scale };
  }

  /** Dots of about the particle spacing (1–4 px), coloured by speed / speedScale through SPEED_RAMP. */
  private drawSpeed(frame: ParticleFrame, t: TankToView, options: LookOptions) {
    const { width, height, pixels } = this.image;
    const { dot, perMetrePerSecond } = this.speedDots(frame, t, options);
    const toLut = 255 * perMetrePerSecond;
    const lut = this.speedLut;
    const half = (dot - 1) / 2;
    const { ox, oy, sx, sy } = t;
    const { x, y, speed, count } = frame;
    for (let i = 0; i < count; i++) {
      const px = Math.round(ox + x[i] * sx - half);
      const py = Math.round(oy - y[i] * sy - half);
      if (px < 0 || py < 0 || px + dot > width || py + dot > height) continue;
      let s = (speed[i] * toLut) | 0;
      if (s > 255) s = 255;
      const c = lut[s];
      let p = py * width + px;
      for (let dy = 0; dy < dot; dy++, p += width) for (let dx = 0; dx < dot; dx++) pixels[p + dx] = c;
    }
  }

  private restFor(frame: ParticleFrame): number {
    if (!this.estimatedRest) this.estimatedRest = estimateRestDensity(frame);
    return this.estimatedRest;
  }

  private ensureGrid(cellPx: number) {
    if (cellPx === this.cellPx) return;
    const width = this.viewWidth;
    const height = this.viewHeight;
    this.cellPx = cellPx;
    this.gw = Math.ceil(width / cellPx) + 2;
    this.gh = Math.ceil(height / cellPx) + 2;
    this.density = new Float32Array(this.gw * this.gh);
    this.scratch = new Float32Array(this.gw * this.gh);
    this.quiet = new Uint8Array(this.gw * this.gh);
    // Pixel centre px + ½ sits at grid coordinate (px + ½)/cellPx − ½ (cell k is centred on pixel (k + ½)·cellPx).
    this.colIndex = new Int32Array(Math.max(width, height));
    this.colFrac = new Float32Array(Math.max(width, height));
    for (let p = 0; p < this.colIndex.length; p++) {
      const g = (p + 0.5) / cellPx - 0.5 + 1; // +1: one guard cell on each side
      this.colIndex[p] = Math.floor(g);
      this.colFrac[p] = g - Math.floor(g);
    }
  }

  /**
   * The surface look's density field for a frame: splat each particle bilinearly into the grid (particles near a
   * tank side also splat their mirror image), blur it (two box passes ≈ a Gaussian), and normalise to r = ρ/ρ₀.
   */
  densityField(frame: ParticleFrame, t: TankToView, options: LookOptions = {}): DensityField {
    const rest = options.restDensity ?? this.restFor(frame);
    const spacingPx = t.sx / Math.sqrt(rest);
    const cellPx = Math.max(2, Math.min(16, Math.round(spacingPx * 1.5)));
    this.ensureGrid(cellPx);
    const { gw, gh, density, scratch } = this;
    density.fill(0);

    // Splat, in grid units (with the guard cell).
    const { ox, oy, sx, sy } = t;
    const inv = 1 / cellPx;
    const splat = (vx: number, vy: number) => {
      const gx = vx * inv - 0.5 + 1;
      const gy = vy * inv - 0.5 + 1;
      const i0 = Math.floor(gx);
      const j0 = Math.floor(gy);
      if (i0 < 0 || j0 < 0 || i0 >= gw - 1 || j0 >= gh - 1) return;
      const fx = gx - i0;
      const fy = gy - j0;
      const k = j0 * gw + i0;
      density[k] += (1 - fx) * (1 - fy);
      density[k + 1] += fx * (1 - fy);
      density[k + gw] += (1 - fx) * fy;
      density[k + gw + 1] += fx * fy;
    };
    const { x, y, count } = frame;
    const tank = options.tank;
    const margin = (3 * cellPx) / sx; // metres
    const W = tank?.width ?? Infinity;
    for (let i = 0; i < count; i++) {
      const px = x[i];
      const py = y[i];
      splat(ox + px * sx, oy - py * sy);
      if (!tank) continue;
      if (px < margin) splat(ox - px * sx, oy - py * sy);
      else if (px > W - margin) splat(ox + (2 * W - px) * sx, oy - py * sy);
      if (py < margin) splat(ox + px * sx, oy + py * sy);
    }

    // Blur: box [1 1 1]/3 along x then y, twice.
    for (let pass = 0; pass < 2; pass++) {
      for (let j = 0; j < gh; j++) {
        const row = j * gw;
        scratch[row] = (density[row] + density[row + 1]) / 3;
        for (let i = 1; i < gw - 1; i++) scratch[row + i] = (density[row + i - 1] + density[row + i] + density[row + i + 1]) / 3;
        scratch[row + gw - 1] = (density[row + gw - 2] + density[row + gw - 1]) / 3;
      }
      for (let i = 0; i < gw; i++) density[i] = (scratch[i] + scratch[i + gw]) / 3;
      for (let k = gw; k < gw * (gh - 1); k++) density[k] = (scratch[k - gw] + scratch[k] + scratch[k + gw]) / 3;
      for (let k = gw * (gh - 1); k < gw * gh; k++) density[k] = (scratch[k - gw] + scratch[k]) / 3;
    }

    // Normalise to r = ρ/ρ₀: particles a cell at rest = ρ₀ · (cell side in metres)².
    const cellMetres = cellPx / sx;
    const norm = 1 / (rest * cellMetres * cellMetres);
    for (let k = 0; k < density.length; k++) density[k] *= norm;
    return { cellPx, gw, gh, ratio: density };
  }

  /** Side of a spray droplet in view pixels for a density grid of `cellPx`-pixel cells. */
  static sprayDot(cellPx: number): number {
    return cellPx >= 6 ? 2 : 1;
  }

  /**
   * Spray: the particles where the density is too low to make surface (r < ½ at the particle). Writes the top-left
   * pixel of each droplet (view px, x then y) into `out` (room for 2 × frame.count) and returns how many there are.
   * Call right after `densityField` for the same frame.
   */
  sprayDroplets(frame: ParticleFrame, t: TankToView, out: Float32Array | Int32Array): number {
    const { gw, density, colIndex, colFrac, cellPx } = this;
    const width = this.viewWidth;
    const height = this.viewHeight;
    const dot = LookRenderer.sprayDot(cellPx);
    const { ox, oy, sx, sy } = t;
    const { x, y, count } = frame;
    let n = 0;
    for (let i = 0; i < count; i++) {
      const px = Math.round(ox + x[i] * sx - dot / 2);
      const py = Math.round(oy - y[i] * sy - dot / 2);
      if (px < 0 || py < 0 || px + dot > width || py + dot > height) continue;
      const k = colIndex[py] * gw + colIndex[px];
      if (density[k] > 0.4) continue;
      const fx = colFrac[px];
      const fy = colFrac[py];
      const top = density[k] + (density[k + 1] - density[k]) * fx;
      const bottom = density[k + gw] + (density[k + gw + 1] - density[k + gw]) * fx;
      if (top + (bottom - top) * fy >= 0.5) continue;
      out[2 * n] = px;
      out[2 * n + 1] = py;
      n++;
    }
    return n;
  }

  /**
   * The density field, coloured: every pixel from the bilinearly sampled ratio r = ρ/ρ₀, liquid where r > ½ (the
   * same iso-level as the solver's liquid area), anti-aliased over about a pixel, with a light edge line along
   * r = ½; then the spray droplets. (The player's fragment shader, src/components/player/gpuLooks.ts, mirrors this.)
   */
  private drawSurface(frame: ParticleFrame, t: TankToView, options: LookOptions) {
    const { cellPx, gw, gh, ratio: density } = this.densityField(frame, t, options);
    const quiet = this.quiet;

    // A quad (cells k, k+1, k+gw, k+gw+1) is quiet when none of its corners comes near the iso-level.
    const low = 0.5 - 0.5 / (2.5 * cellPx) * 3;
    for (let j = 0; j < gh - 1; j++) {
      for (let i = 0; i < gw - 1; i++) {
        const k = j * gw + i;
        quiet[k] = density[k] < low && density[k + 1] < low && density[k + gw] < low && density[k + gw + 1] < low ? 1 : 0;
      }
    }

    // Colour. Near the surface r changes by about 1/(2.5·cellPx) a pixel (the blurred edge spans ~2.5 cells), so
    // (r − ½)·2.5·cellPx approximates the signed distance to the surface in pixels.
    const { width, height, pixels } = this.image;
    const toPx = 2.5 * cellPx;
    const deepPx = 6 * cellPx;
    const { colIndex, colFrac } = this;
    const [fr, fg, fb] = SURFACE_FILL;
    const [dr, dg, db] = SURFACE_DEEP;
    const [er, eg, eb] = SURFACE_EDGE;
    for (let py = 0; py < height; py++) {
      const j = colIndex[py];
      const fy = colFrac[py];
      const rowK = j * gw;
      const rowP = py * width;
      for (let px = 0; px < width; px++) {
        const i = colIndex[px];
        const k = rowK + i;
        if (quiet[k]) continue;
        const fx = colFrac[px];
        const top = density[k] + (density[k + 1] - density[k]) * fx;
        const bottom = density[k + gw] + (density[k + gw + 1] - density[k + gw]) * fx;
        const r = top + (bottom - top) * fy;
        const dist = (r - 0.5) * toPx;
        if (dist < -1.5) continue;
        // Coverage of the liquid (anti-aliased over a pixel) and of a 2-px edge line centred on the surface.
        const cover = dist + 0.5 < 0 ? 0 : dist + 0.5 > 1 ? 1 : dist + 0.5;
        const edgeRaw = 1.5 - Math.abs(dist);
        const edge = edgeRaw < 0 ? 0 : edgeRaw > 1 ? 1 : edgeRaw;
        const depth = dist <= 0 ? 0 : dist >= deepPx ? 1 : dist / deepPx;
        const fillA = cover * (0.58 + 0.22 * depth);
        const a = edge * 0.95 + fillA * (1 - edge * 0.95);
        if (a <= 0.002) continue;
        // Premultiplied "edge over fill".
        const wf = fillA * (1 - edge * 0.95);
        const we = edge * 0.95;
        const cr = we * er + wf * (fr + (dr - fr) * depth);
        const cg = we * eg + wf * (fg + (dg - fg) * depth);
        const cb = we * eb + wf * (fb + (db - fb) * depth);
        pixels[rowP + px] = (((a * 255 + 0.5) << 24) | ((cb + 0.5) << 16) | ((cg + 0.5) << 8) | (cr + 0.5)) >>> 0;
      }
    }

    // Spray: particles where the density is too low to make surface are drawn as droplets in the edge colour.
    const spray = packPremultiplied(er, eg, eb, SPRAY_ALPHA);
    const dot = LookRenderer.sprayDot(cellPx);
    if (this.sprayScratch.length < 2 * frame.count) this.sprayScratch = new Int32Array(2 * frame.count);
    const n = this.sprayDroplets(frame, t, this.sprayScratch);
    const at = this.sprayScratch;
    for (let s = 0; s < n; s++) {
      const px = at[2 * s];
      const py = at[2 * s + 1];
      for (let dy = 0; dy < dot; dy++) for (let dx = 0; dx < dot; dx++) pixels[(py + dy) * width + px + dx] = spray;
    }
  }
}
