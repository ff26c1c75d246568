// The render looks. "speed": particles as dots coloured by speed. "surface": a smooth liquid surface from the particle
// density (splat → blur → threshold at half the rest density), each liquid in its own colour, darker with depth below
// the surface, with a lit edge line; walls and props drawn over it where the clip says they are (solids.ts). LookRenderer draws them on the CPU
// into one image a frame (exports and the editor); the player draws the same looks on the GPU from the per-frame
// inputs computed here (density field, spray droplets, dot sizes): src/components/player/gpuLooks.ts. Never a sprite
// per particle: software WebGL can't draw 50k of them at the shot's fps (PITFALLS.md). Free of React and the DOM.
import { createImage, packPremultiplied, rampColour, type PixelImage } from './image';
import type { TankToView } from './view';
import type { ClipLook, PropPose } from '../clip/format';
import { DEFAULT_LIQUID } from '../scene/schema';
import { blendOver, drawSolids, hexColour, outlineBounds, outlinePairs, solidOutlines, type PropImage } from './solids';
import { pointInPolygon } from '../scene/shapes';

export const RENDER_LOOKS = ['surface', 'speed'] as const;
export type RenderLook = (typeof RENDER_LOOKS)[number];

/** What each look is called on its button or in a list: it says what the look shows. */
export const LOOK_LABELS: Record<RenderLook, string> = { surface: 'Liquid in its colours', speed: 'Particle speed' };
/** One line under the view on what the look shows. */
export const LOOK_DESCRIPTIONS: Record<RenderLook, string> = {
  surface: 'Each liquid in its own colour, darker with depth below its surface, with a lit edge; walls and props where they are.',
  speed: 'Every particle as a dot, coloured from slow (deep blue) to fast (coral).',
};

/** One frame of particles: positions in metres (tank coordinates, y up), speeds in m/s. */
export interface ParticleFrame {
  count: number;
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  speed: ArrayLike<number>;
  maxSpeed: number;
  /** Liquid of each particle (index into the scene look's liquids); omitted: all liquid 0. */
  liquid?: ArrayLike<number>;
  /** Pose of each prop of the scene look (omitted: props are not drawn). */
  props?: readonly PropPose[];
  /** Foam and spray of the bake (clip format's diffuse section): positions (m) and kind (0 spray, 1 foam). */
  diffuse?: { count: number; x: ArrayLike<number>; y: ArrayLike<number>; kind: ArrayLike<number> };
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
  /** The clip's drawing facts: liquid colours, walls and props (omitted: one liquid in the default colour, no solids). */
  scene?: ClipLook;
  /** Per prop of `scene.props`, its picture when it has one (drawn inside its outline instead of its fill colour). */
  propImages?: readonly (PropImage | null | undefined)[];
}

/** Speed ramp, slow → fast: deep blue, cyan, pale yellow, coral. Stops are [position, r, g, b]. */
export const SPEED_RAMP = [
  [0, 28, 72, 190],
  [0.35, 30, 190, 225],
  [0.7, 250, 240, 160],
  [1, 240, 96, 62],
] as const;

const SPEED_ALPHA = 0.92;

/**
 * The surface look's shading, shared by the CPU look and the player's fragment shader. A liquid of colour c at depth
 * d below its surface (m, down its column) is shaded s = 1 − exp(−d / ATTENUATION_DEPTH) (light fading with depth,
 * the Beer–Lambert form; the depth scale is a look choice, not a measured absorption): fill = lit·(1 − DARKEN·s) with
 * lit = c lifted toward white by LIFT·(1 − s) near the surface, alpha COVER_ALPHA + DEEP_ALPHA·s; the edge line is c
 * lifted toward white by EDGE_LIFT.
 */
export const SURFACE_SHADING = { ATTENUATION_DEPTH: 0.2, DARKEN: 0.55, LIFT: 0.15, COVER_ALPHA: 0.62, DEEP_ALPHA: 0.3, EDGE_LIFT: 0.7 } as const;
const SH = SURFACE_SHADING;
/** Density ratio below which a cell is clear air (ends a depth run; between AIR and ½ is the blurred surface). */
const AIR = 0.25;
/** Cells along a row over which a liquid cell takes its neighbours' depth below the surface (see densityField). */
const DEPTH_REACH = 12;

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
  /**
   * Per cell, 4 bytes: the liquid colour there (r, g, b: the particles' colours, density-weighted) and the depth shade
   * s · 255 (SURFACE_SHADING). Reused between frames like `ratio`.
   */
  tint: Uint8Array;
}

/** Colours of the scene's liquids, [r, g, b] 0–255, in order (the default liquid's without a scene look). */
export function liquidColours(options: LookOptions): [number, number, number][] {
  const liquids = options.scene?.liquids;
  return liquids?.length ? liquids.map((l) => hexColour(l.colour)) : [hexColour(DEFAULT_LIQUID.colour)];
}

/** A colour lifted toward white by `k` (0: itself, 1: white). */
export function lifted(c: readonly [number, number, number], k: number): [number, number, number] {
  return [c[0] + (255 - c[0]) * k, c[1] + (255 - c[1]) * k, c[2] + (255 - c[2]) * k];
}
export const SPEED_DOT_ALPHA = SPEED_ALPHA;
export const SPRAY_ALPHA = 0.85;

/**
 * Foam and spray of the surface look (our own look): foam as near-white dots a pixel larger than the liquid's spray
 * droplets, almost opaque, so crests and churned water read white; spray from the bake as smaller pale droplets;
 * bubbles under the surface as faint specks.
 */
export const DIFFUSE_LOOK = {
  FOAM: [246, 250, 252], FOAM_ALPHA: 0.92, SPRAY: [214, 234, 246], SPRAY_ALPHA: 0.8, BUBBLE: [220, 238, 248], BUBBLE_ALPHA: 0.35,
} as const;

/** Colour and alpha of a diffuse particle of `kind` (0 spray, 1 foam, 2 bubble). */
export function diffuseColour(kind: number): { rgb: readonly [number, number, number]; alpha: number } {
  const D = DIFFUSE_LOOK;
  return kind === 1 ? { rgb: D.FOAM, alpha: D.FOAM_ALPHA } : kind === 2 ? { rgb: D.BUBBLE, alpha: D.BUBBLE_ALPHA } : { rgb: D.SPRAY, alpha: D.SPRAY_ALPHA };
}

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
  private colourSums: Float32Array[] = [];
  private tint = new Uint8Array(0);
  private liquidRgb = new Float32Array(0);
  private quiet = new Uint8Array(0);
  private colIndex = new Int32Array(0);
  private colFrac = new Float32Array(0);
  private estimatedRest = 0;
  private sprayScratch = new Int32Array(0);
  private sprayWhich = new Int32Array(0);
  private solid = new Uint8Array(0);
  private shades = new Uint8Array(0);
  private shadeLutFor = 0;
  private rowScratch = new Float32Array(0);
  private diffuseScratch = new Int32Array(0);

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

  /**
   * Draws the frame in the look, then the walls and props of `options.scene` over it; returns the image (cleared
   * first: transparent where nothing is drawn).
   */
  render(look: RenderLook, frame: ParticleFrame, toView: TankToView, options: LookOptions = {}): PixelImage {
    this.image.pixels.fill(0);
    if (frame.count > 0) {
      if (look === 'speed') this.drawSpeed(frame, toView, options);
      else this.drawSurface(frame, toView, options);
    }
    if (options.scene) drawSolids(this.image, solidOutlines(options.scene, frame.props, toView, options.propImages));
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
    this.colourSums = [0, 1, 2, 3].map(() => new Float32Array(this.gw * this.gh));
    this.tint = new Uint8Array(this.gw * this.gh * 4);
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
    const { gw, gh, density } = this;
    density.fill(0);
    const colours = liquidColours(options);
    const liquid = frame.liquid;
    let mixed = false;
    if (liquid && colours.length > 1) for (let i = 1; i < frame.count; i++) if (liquid[i] !== liquid[0]) { mixed = true; break; }

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

    this.blur(density);
    const two = mixed && colours.length === 2;
    if (mixed) this.colourField(frame, t, colours);
    const [sr, sg, sb, sw] = this.colourSums;
    const [r1, g1, b1] = colours[colours.length > 1 ? 1 : 0];

    // Normalise to r = ρ/ρ₀: particles a cell at rest = ρ₀ · (cell side in metres)².
    const cellMetres = cellPx / sx;
    const norm = 1 / (rest * cellMetres * cellMetres);
    const tint = this.tint;
    const [r0, g0, b0] = mixed ? colours[0] : colours[liquid && liquid.length ? Math.min(liquid[0], colours.length - 1) : 0];
    for (let k = 0; k < density.length; k++) {
      const d = density[k];
      const w = mixed ? sw[k] : 0;
      if (w > 1e-6 && two) {
        // Two liquids: sr holds the second liquid's share of the weight, so the mean colour is c0 + (c1 − c0)·share.
        const f = sr[k] / w;
        tint[4 * k] = r0 + (r1 - r0) * f + 0.5;
        tint[4 * k + 1] = g0 + (g1 - g0) * f + 0.5;
        tint[4 * k + 2] = b0 + (b1 - b0) * f + 0.5;
      } else if (w > 1e-6) {
        tint[4 * k] = sr[k] / w + 0.5;
        tint[4 * k + 1] = sg[k] / w + 0.5;
        tint[4 * k + 2] = sb[k] / w + 0.5;
      } else {
        tint[4 * k] = r0 + 0.5;
        tint[4 * k + 1] = g0 + 0.5;
        tint[4 * k + 2] = b0 + 0.5;
      }
      density[k] = d * norm;
    }
    // Depth shade: down each column from the top, the depth below the surface the cell is under, in cells. Liquid
    // counts from r ≥ ½; only clear air (r < AIR) ends a run, so density noise just under the surface does not, and a
    // wall or prop inside the liquid counts as depth (the liquid under a floating can is as deep as beside it).
    const solid = this.solidCells(options, frame, t);
    const depth = this.scratch;
    for (let i = 0; i < gw; i++) {
      let run = 0;
      for (let j = 0, k = i; j < gh; j++, k += gw) {
        const r = density[k];
        if (r >= 0.5 || (run > 0 && solid[k])) run++;
        else if (r < AIR) run = 0;
        depth[k] = r >= 0.5 ? run : 0;
      }
    }
    // Along each row, a liquid cell takes the greatest depth of the liquid cells within DEPTH_REACH cells of it in the
    // same unbroken stretch of liquid: under an air pocket (the cavity behind a plunging prop) the liquid is as deep
    // as beside it, not a pale column down to the floor. Then smooth (box [1 1 1]/3, twice) so neighbouring columns
    // that found their surface a cell apart shade alike.
    const shadeLut = this.shadeLut(cellMetres);
    const row = this.rowScratch.length >= gw ? this.rowScratch : (this.rowScratch = new Float32Array(gw));
    for (let j = 0; j < gh; j++) {
      const base = j * gw;
      for (let i = 0; i < gw; i++) row[i] = depth[base + i];
      for (let i = 0; i < gw; i++) {
        if (row[i] <= 0) continue;
        let m = row[i];
        for (let q = i - 1; q >= 0 && q >= i - DEPTH_REACH && row[q] > 0; q--) if (row[q] > m) m = row[q];
        for (let q = i + 1; q < gw && q <= i + DEPTH_REACH && row[q] > 0; q++) if (row[q] > m) m = row[q];
        depth[base + i] = m;
      }
      for (let pass = 0; pass < 2; pass++) {
        for (let i = 0; i < gw; i++) row[i] = depth[base + i];
        for (let i = 1; i < gw - 1; i++) depth[base + i] = (row[i - 1] + row[i] + row[i + 1]) / 3;
      }
      for (let i = 0; i < gw; i++) {
        const d = depth[base + i];
        // s = 1 − exp(−(d − ½)·cell/ATTENUATION_DEPTH), looked up in quarter cells.
        tint[4 * (base + i) + 3] = d <= 0.5 ? 0 : shadeLut[Math.min(shadeLut.length - 1, ((d - 0.5) * 4) | 0)];
      }
    }
    return { cellPx, gw, gh, ratio: density, tint };
  }

  /**
   * Several liquids in the frame: the colour of each cell, the mean of the colours of the particles around it. Each
   * particle adds its liquid's colour and a weight of 1 to its nearest cell, then one blur pass: colour changes
   * over a cell or two, which is all the eye reads at a boundary between liquids (and a quarter of the bilinear
   * splat's work). Fills colourSums: r, g, b sums and weights (two liquids: the second's count and the weights).
   */
  private colourField(frame: ParticleFrame, t: TankToView, colours: [number, number, number][]) {
    const { gw, gh, cellPx } = this;
    const [sr, sg, sb, sw] = this.colourSums;
    sr.fill(0); sw.fill(0);
    if (colours.length !== 2) { sg.fill(0); sb.fill(0); }
    if (this.liquidRgb.length < 3 * colours.length) this.liquidRgb = new Float32Array(3 * colours.length);
    colours.forEach((c, k) => this.liquidRgb.set(c, 3 * k));
    const rgb = this.liquidRgb;
    const { ox, oy, sx, sy } = t;
    const inv = 1 / cellPx;
    const { x, y, count } = frame;
    const liquid = frame.liquid!;
    const top = colours.length - 1;
    if (top === 1) {
      // Two liquids (the usual mix): the weight and the second liquid's count are enough (two blurred grids, not four).
      for (let i = 0; i < count; i++) {
        const ci = Math.floor((ox + x[i] * sx) * inv) + 1;
        const cj = Math.floor((oy - y[i] * sy) * inv) + 1;
        if (ci < 0 || cj < 0 || ci >= gw || cj >= gh) continue;
        const k = cj * gw + ci;
        sw[k] += 1;
        if (liquid[i] === 1) sr[k] += 1;
      }
      this.blur(sr, 1);
      this.blur(sw, 1);
      return;
    }
    for (let i = 0; i < count; i++) {
      // Nearest cell: cell k is centred on pixel (k − 1 + ½)·cellPx.
      const ci = Math.floor((ox + x[i] * sx) * inv) + 1;
      const cj = Math.floor((oy - y[i] * sy) * inv) + 1;
      if (ci < 0 || cj < 0 || ci >= gw || cj >= gh) continue;
      const k = cj * gw + ci;
      const l = 3 * (liquid[i] > top ? 0 : liquid[i]);
      sr[k] += rgb[l]; sg[k] += rgb[l + 1]; sb[k] += rgb[l + 2]; sw[k] += 1;
    }
    for (const a of this.colourSums) this.blur(a, 1);
  }

  /** s·255 for depths of 0, ¼, ½, … cells below the surface up to where s reaches 254.5/255, for this cell size. */
  private shadeLut(cellMetres: number): Uint8Array {
    if (this.shadeLutFor === cellMetres) return this.shades;
    const perQuarter = cellMetres / SH.ATTENUATION_DEPTH / 4;
    const n = Math.min(65536, Math.ceil(Math.log(510) / perQuarter) + 2);
    this.shades = new Uint8Array(n);
    for (let q = 0; q < n; q++) this.shades[q] = 255 * (1 - Math.exp(-q * perQuarter)) + 0.5;
    this.shadeLutFor = cellMetres;
    return this.shades;
  }

  /** 1 for grid cells whose centre lies inside a wall or a prop at its pose (the scene look's solids), else 0. */
  private solidCells(options: LookOptions, frame: ParticleFrame, t: TankToView): Uint8Array {
    const { gw, gh, cellPx } = this;
    if (this.solid.length !== gw * gh) this.solid = new Uint8Array(gw * gh);
    const solid = this.solid;
    solid.fill(0);
    if (!options.scene) return solid;
    // Every solid, hidden walls included: they still hold liquid back.
    const look = { ...options.scene, wallStyle: 'outline' as const };
    for (const s of solidOutlines(look, frame.props, t)) {
      const { minX, minY, maxX, maxY } = outlineBounds(s.points);
      const pairs = outlinePairs(s.points);
      // Cell (i, j) is centred on view pixel ((i − ½)·cellPx, (j − ½)·cellPx).
      const i0 = Math.max(0, Math.floor(minX / cellPx)), i1 = Math.min(gw - 1, Math.ceil(maxX / cellPx) + 1);
      const j0 = Math.max(0, Math.floor(minY / cellPx)), j1 = Math.min(gh - 1, Math.ceil(maxY / cellPx) + 1);
      for (let j = j0; j <= j1; j++) {
        const cy = (j - 0.5) * cellPx;
        for (let i = i0; i <= i1; i++) {
          if (pointInPolygon(pairs, (i - 0.5) * cellPx, cy)) solid[j * gw + i] = 1;
        }
      }
    }
    return solid;
  }

  /** Blurs a grid in place: box [1 1 1]/3 along x then y, `passes` times (twice ≈ a Gaussian). */
  private blur(a: Float32Array, passes = 2) {
    const { gw, gh, scratch } = this;
    for (let pass = 0; pass < passes; pass++) {
      for (let j = 0; j < gh; j++) {
        const row = j * gw;
        scratch[row] = (a[row] + a[row + 1]) / 3;
        for (let i = 1; i < gw - 1; i++) scratch[row + i] = (a[row + i - 1] + a[row + i] + a[row + i + 1]) / 3;
        scratch[row + gw - 1] = (a[row + gw - 2] + a[row + gw - 1]) / 3;
      }
      for (let i = 0; i < gw; i++) a[i] = (scratch[i] + scratch[i + gw]) / 3;
      for (let k = gw; k < gw * (gh - 1); k++) a[k] = (scratch[k - gw] + scratch[k] + scratch[k + gw]) / 3;
      for (let k = gw * (gh - 1); k < gw * gh; k++) a[k] = (scratch[k - gw] + scratch[k]) / 3;
    }
  }

  /** Side of a spray droplet in view pixels for a density grid of `cellPx`-pixel cells. */
  static sprayDot(cellPx: number): number {
    return cellPx >= 6 ? 2 : 1;
  }

  /**
   * Spray: the particles where the density is too low to make surface (r < ½ at the particle). Writes the top-left
   * pixel of each droplet (view px, x then y) into `out` (room for 2 × frame.count), and its particle's index into
   * `which` when given; returns how many there are. Call right after `densityField` for the same frame.
   */
  sprayDroplets(frame: ParticleFrame, t: TankToView, out: Float32Array | Int32Array, which?: Int32Array): number {
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
      if (which) which[n] = i;
      n++;
    }
    return n;
  }

  /**
   * Foam and spray dots of the frame's diffuse particles: per dot its top-left view pixel x, y, its side (px) and its
   * kind, four entries each, into `out` (room for 4 × diffuse count); returns how many. Call after `densityField`.
   */
  diffuseDots(frame: ParticleFrame, t: TankToView, out: Int32Array): number {
    const d = frame.diffuse;
    if (!d) return 0;
    const spray = LookRenderer.sprayDot(this.cellPx || 4);
    const width = this.viewWidth, height = this.viewHeight;
    const { ox, oy, sx, sy } = t;
    let n = 0;
    for (let i = 0; i < d.count; i++) {
      const kind = d.kind[i] === 1 || d.kind[i] === 2 ? d.kind[i] : 0;
      const side = kind === 1 ? spray + 1 : spray;
      const px = Math.round(ox + d.x[i] * sx - side / 2);
      const py = Math.round(oy - d.y[i] * sy - side / 2);
      if (px < 0 || py < 0 || px + side > width || py + side > height) continue;
      out[4 * n] = px; out[4 * n + 1] = py; out[4 * n + 2] = side; out[4 * n + 3] = kind;
      n++;
    }
    return n;
  }

  /**
   * The density field, coloured: every pixel from the bilinearly sampled ratio r = ρ/ρ₀, liquid where r > ½ (the
   * same iso-level as the solver's liquid area), anti-aliased over about a pixel, in the liquid's colour shaded by its
   * depth (SURFACE_SHADING), with a lit edge line along r = ½; then the spray droplets, each in its liquid's edge
   * colour. (The player's fragment shader, src/components/player/gpuLooks.ts, mirrors this.)
   */
  private drawSurface(frame: ParticleFrame, t: TankToView, options: LookOptions) {
    const { cellPx, gw, gh, ratio: density, tint } = this.densityField(frame, t, options);
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
    const { colIndex, colFrac } = this;
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
        // The cell's colour and depth shade, bilinear like r.
        const w00 = (1 - fx) * (1 - fy), w10 = fx * (1 - fy), w01 = (1 - fx) * fy, w11 = fx * fy;
        const q00 = 4 * k, q10 = q00 + 4, q01 = 4 * (k + gw), q11 = q01 + 4;
        const br = w00 * tint[q00] + w10 * tint[q10] + w01 * tint[q01] + w11 * tint[q11];
        const bg = w00 * tint[q00 + 1] + w10 * tint[q10 + 1] + w01 * tint[q01 + 1] + w11 * tint[q11 + 1];
        const bb = w00 * tint[q00 + 2] + w10 * tint[q10 + 2] + w01 * tint[q01 + 2] + w11 * tint[q11 + 2];
        const shade = (w00 * tint[q00 + 3] + w10 * tint[q10 + 3] + w01 * tint[q01 + 3] + w11 * tint[q11 + 3]) / 255;
        const fillA = cover * (SH.COVER_ALPHA + SH.DEEP_ALPHA * shade);
        const we = edge * 0.95;
        const wf = fillA * (1 - we);
        const a = we + wf;
        if (a <= 0.002) continue;
        // Premultiplied "edge over fill": fill = (c lifted near the surface)·(1 − DARKEN·s), edge = c lifted.
        const lift = SH.LIFT * (1 - shade);
        const dark = 1 - SH.DARKEN * shade;
        const cr = we * (br + (255 - br) * SH.EDGE_LIFT) + wf * (br + (255 - br) * lift) * dark;
        const cg = we * (bg + (255 - bg) * SH.EDGE_LIFT) + wf * (bg + (255 - bg) * lift) * dark;
        const cb = we * (bb + (255 - bb) * SH.EDGE_LIFT) + wf * (bb + (255 - bb) * lift) * dark;
        pixels[rowP + px] = (((a * 255 + 0.5) << 24) | ((cb + 0.5) << 16) | ((cg + 0.5) << 8) | (cr + 0.5)) >>> 0;
      }
    }

    // Spray: particles where the density is too low to make surface, drawn as droplets in their liquid's edge colour.
    const sprayWords = liquidColours(options).map((c) => {
      const [r, g, b] = lifted(c, SH.EDGE_LIFT);
      return packPremultiplied(r, g, b, SPRAY_ALPHA);
    });
    const dot = LookRenderer.sprayDot(cellPx);
    if (this.sprayScratch.length < 2 * frame.count) {
      this.sprayScratch = new Int32Array(2 * frame.count);
      this.sprayWhich = new Int32Array(frame.count);
    }
    const n = this.sprayDroplets(frame, t, this.sprayScratch, this.sprayWhich);
    const at = this.sprayScratch;
    const liquid = frame.liquid;
    for (let s = 0; s < n; s++) {
      const px = at[2 * s];
      const py = at[2 * s + 1];
      const spray = sprayWords[liquid ? Math.min(liquid[this.sprayWhich[s]], sprayWords.length - 1) : 0];
      for (let dy = 0; dy < dot; dy++) for (let dx = 0; dx < dot; dx++) pixels[(py + dy) * width + px + dx] = spray;
    }

    // Foam and spray of the bake, over the liquid and its droplets.
    const dn = frame.diffuse?.count ?? 0;
    if (dn === 0) return;
    if (this.diffuseScratch.length < 4 * dn) this.diffuseScratch = new Int32Array(4 * dn);
    const m = this.diffuseDots(frame, t, this.diffuseScratch);
    const dd = this.diffuseScratch;
    const colours = [0, 1, 2].map(diffuseColour);
    for (let s = 0; s < m; s++) {
      const px = dd[4 * s], py = dd[4 * s + 1], side = dd[4 * s + 2];
      const { rgb: [r, g, b], alpha: a } = colours[dd[4 * s + 3]];
      for (let dy = 0; dy < side; dy++) for (let dx = 0; dx < side; dx++) blendOver(pixels, (py + dy) * width + px + dx, r, g, b, a);
    }
  }
}
