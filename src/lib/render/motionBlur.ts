// Motion blur for exports: a shutter open for θ/360 of each frame interval, centred on the frame. A clip keeps
// positions, not particle identities (DEVELOPERS.md, clip format), so the liquid's sub-frame positions cannot be
// interpolated per particle. What the clip does give:
//  - props: every prop's pose per frame, so a prop is drawn at poses interpolated over the open shutter and the
//    pictures averaged (true motion blur, up to the linear interpolation between baked frames);
//  - liquid, foam and spray near it: a motion field estimated from the change of the look's density field between
//    the neighbouring baked frames — the normal flow of optical-flow estimation (Horn & Schunck 1981, "Determining
//    optical flow", Artificial Intelligence 17: the brightness-constancy equation ρ_t + m·∇ρ = 0 gives only the
//    component m = −ρ_t ∇ρ / |∇ρ|² along the gradient). That is the motion of the liquid's edges across the picture;
//    motion along an edge or inside uniform liquid leaves no trace (and needs no blur). The splash picture is then
//    smeared along that field over the shutter interval (a vector blur, gathered along each pixel's motion).
// Spray far from any liquid has no motion estimate and stays sharp. Free of the DOM (the passes run it in Node too).
import type { PropPose } from '../clip/format';
import { createImage, type PixelImage } from './image';
import type { DensityField, LookOptions, ParticleFrame, RenderLook } from './looks';
import { shapeBounds } from '../scene/shapes';
import { drawSolids, solidOutlines } from './solids';
import type { TankToView } from './view';

/** Shutter angles the export panel offers, degrees (0: no motion blur). */
export const SHUTTER_ANGLES = [0, 90, 180, 270, 360] as const;

/** The panel's words for a shutter angle. */
export function shutterLabel(angleDegrees: number): string {
  if (angleDegrees <= 0) return 'Off: every frame sharp';
  const share = angleDegrees === 90 ? 'a quarter' : angleDegrees === 180 ? 'half' : angleDegrees === 270 ? 'three quarters' : angleDegrees === 360 ? 'all' : `${Math.round((angleDegrees / 360) * 100)} %`;
  return `${angleDegrees}° shutter: open ${share} of each frame${angleDegrees === 180 ? ' (the film habit)' : ''}`;
}

/** Fraction of a frame interval the shutter is open: θ / 360. */
export function shutterFraction(angleDegrees: number): number {
  return Math.max(0, Math.min(1, angleDegrees / 360));
}

/** Box-blur radius (cells) of the density fields before the motion is read: three passes ≈ a Gaussian of σ ≈ 3.5 cells. */
const FLOW_SMOOTH_RADIUS = 3;
const FLOW_SMOOTH_PASSES = 3;
/**
 * Largest motion read, cells per frame. The normal flow of a smoothed edge is faithful while the displacement is
 * within the edge's width (about 2.5 σ ≈ 9 cells here); beyond that it saturates, so longer estimates are noise.
 */
const FLOW_MAX_CELLS = 8;
/** Regularisation of |∇ρ|² (ρ/ρ₀ per cell, squared): where the field is flat the motion fades to 0 instead of noise. */
const FLOW_EPS2 = 1e-4;
/** Most samples along one pixel's motion, and most prop poses over the shutter. */
const MAX_SAMPLES = 16;

/** The estimated motion of the picture, view px per frame, on the density field's grid (cell centres as DensityField). */
export interface MotionField {
  cellPx: number;
  gw: number;
  gh: number;
  mx: Float32Array;
  my: Float32Array;
}

/** Separable box blur of radius r (running sums, edge values repeated), `passes` times, in place. */
function boxBlur(a: Float32Array, gw: number, gh: number, r: number, passes: number, scratch: Float32Array, line: Float32Array) {
  const w = 1 / (2 * r + 1);
  // one line (row or column) of n values at `start`, `stride` apart: padded into `line`, then summed along it
  const run = (src: Float32Array, dst: Float32Array, start: number, stride: number, n: number) => {
    const first = src[start], last = src[start + (n - 1) * stride];
    for (let k = 0; k < r; k++) { line[k] = first; line[r + n + k] = last; }
    for (let k = 0, q = start; k < n; k++, q += stride) line[r + k] = src[q];
    let sum = 0;
    for (let k = 0; k < 2 * r + 1; k++) sum += line[k];
    for (let k = 0, q = start; k < n; k++, q += stride) {
      dst[q] = sum * w;
      if (k + 1 < n) sum += line[k + 2 * r + 1] - line[k];
    }
  };
  for (let pass = 0; pass < passes; pass++) {
    for (let j = 0; j < gh; j++) run(a, scratch, j * gw, 1, gw);
    for (let i = 0; i < gw; i++) run(scratch, a, i, gw, gh);
  }
}

/** Per view column (or row): the grid cell index left of (above) the pixel centre and the fraction past it. */
function pixelCells(n: number, cells: number, cellPx: number): { index: Int32Array; frac: Float32Array } {
  const index = new Int32Array(n), frac = new Float32Array(n);
  for (let p = 0; p < n; p++) {
    // cell (i, j) is centred on view pixel ((i − ½)·cellPx): pixel centre p + ½ sits at grid (p + ½)/cellPx + ½
    const g = (p + 0.5) / cellPx + 0.5;
    const i = Math.max(0, Math.min(cells - 2, Math.floor(g)));
    index[p] = i;
    frac[p] = Math.max(0, Math.min(1, g - i));
  }
  return { index, frac };
}

/**
 * Cells whose quad (k, k + 1, k + gw, k + gw + 1) has a corner moving at least half a pixel over the open shutter:
 * pixels elsewhere are copied as they are.
 */
function movingQuads(motion: MotionField, fraction: number): Uint8Array {
  const { gw, gh, mx, my } = motion;
  const corner = new Uint8Array(gw * gh), quad = new Uint8Array(gw * gh);
  const min2 = 0.25 / (fraction * fraction);
  for (let k = 0; k < gw * gh; k++) corner[k] = mx[k] * mx[k] + my[k] * my[k] >= min2 ? 1 : 0;
  for (let j = 0; j < gh - 1; j++) for (let i = 0, k = j * gw; i < gw - 1; i++, k++) quad[k] = corner[k] | corner[k + 1] | corner[k + gw] | corner[k + gw + 1];
  return quad;
}

/**
 * The normal flow between two density fields of the same grid, `frames` frames apart (2 for the frames either side of
 * the one drawn, 1 at the ends of the bake): m = −ρ_t ∇ρ / (|∇ρ|² + ε), with ρ the mean of the two smoothed fields.
 * Returns view px per frame.
 */
export function normalFlow(before: Float32Array, after: Float32Array, gw: number, gh: number, cellPx: number, frames: number, out?: MotionField): MotionField {
  const n = gw * gh;
  const a = Float32Array.from(before), b = Float32Array.from(after), scratch = new Float32Array(n);
  const line = new Float32Array(Math.max(gw, gh) + 2 * FLOW_SMOOTH_RADIUS);
  boxBlur(a, gw, gh, FLOW_SMOOTH_RADIUS, FLOW_SMOOTH_PASSES, scratch, line);
  boxBlur(b, gw, gh, FLOW_SMOOTH_RADIUS, FLOW_SMOOTH_PASSES, scratch, line);
  const field = out && out.gw === gw && out.gh === gh ? out : { cellPx, gw, gh, mx: new Float32Array(n), my: new Float32Array(n) };
  field.cellPx = cellPx;
  const { mx, my } = field;
  mx.fill(0); my.fill(0);
  const maxCells2 = FLOW_MAX_CELLS * FLOW_MAX_CELLS;
  for (let j = 1; j < gh - 1; j++) {
    for (let i = 1, k = j * gw + 1; i < gw - 1; i++, k++) {
      const rt = (b[k] - a[k]) / frames;
      if (rt === 0) continue;
      const gx = 0.25 * (a[k + 1] + b[k + 1] - a[k - 1] - b[k - 1]);
      const gy = 0.25 * (a[k + gw] + b[k + gw] - a[k - gw] - b[k - gw]);
      const q = -rt / (gx * gx + gy * gy + FLOW_EPS2);
      let ux = q * gx, uy = q * gy;
      const m2 = ux * ux + uy * uy;
      if (m2 > maxCells2) { const s = FLOW_MAX_CELLS / Math.sqrt(m2); ux *= s; uy *= s; }
      mx[k] = ux * cellPx; my[k] = uy * cellPx;
    }
  }
  return field;
}

/**
 * Smears a premultiplied picture along the motion field over the open shutter: each pixel becomes the mean of the
 * picture at p + τ·s·m(p) for τ across [−½, ½] (s the shutter fraction, m the motion there in px per frame, read
 * bilinearly from the grid). Writes into `out` (same size) and returns it; pixels that barely move are copied.
 */
export function vectorBlur(src: PixelImage, motion: MotionField, fraction: number, out: PixelImage): PixelImage {
  const { width, height, pixels } = src;
  const dst = out.pixels;
  dst.set(pixels);
  smear(width, height, motion, fraction, (p, lx, ly, px, py) => {
    const samples = Math.min(MAX_SAMPLES, Math.ceil(Math.sqrt(lx * lx + ly * ly)) + 1);
    let r = 0, g = 0, b = 0, a = 0;
    for (let s = 0; s < samples; s++) {
      const t = s / (samples - 1) - 0.5;
      const qx = Math.round(px + t * lx), qy = Math.round(py + t * ly);
      if (qx < 0 || qy < 0 || qx >= width || qy >= height) continue; // outside the picture: transparent
      const c = pixels[qy * width + qx];
      r += c & 255; g += (c >> 8) & 255; b += (c >> 16) & 255; a += c >>> 24;
    }
    const n = 1 / samples;
    dst[p] = (((a * n + 0.5) << 24) | ((b * n + 0.5) << 16) | ((g * n + 0.5) << 8) | (r * n + 0.5)) >>> 0;
  });
  return out;
}

/** The same smear for a one-channel picture (the matte pass's coverage, 0–255). */
export function vectorBlurGrey(src: Uint8Array, width: number, height: number, motion: MotionField, fraction: number, out: Uint8Array): Uint8Array {
  out.set(src);
  smear(width, height, motion, fraction, (p, lx, ly, px, py) => {
    const samples = Math.min(MAX_SAMPLES, Math.ceil(Math.sqrt(lx * lx + ly * ly)) + 1);
    let v = 0;
    for (let s = 0; s < samples; s++) {
      const t = s / (samples - 1) - 0.5;
      const qx = Math.round(px + t * lx), qy = Math.round(py + t * ly);
      if (qx >= 0 && qy >= 0 && qx < width && qy < height) v += src[qy * width + qx];
    }
    out[p] = Math.round(v / samples);
  });
  return out;
}

/** Calls `at(p, lx, ly, px, py)` for every pixel that moves at least half a pixel over the shutter (l = s·m there). */
function smear(width: number, height: number, motion: MotionField, fraction: number, at: (p: number, lx: number, ly: number, px: number, py: number) => void) {
  const { cellPx, gw, gh, mx, my } = motion;
  const cols = pixelCells(width, gw, cellPx), rows = pixelCells(height, gh, cellPx);
  const quad = movingQuads(motion, fraction);
  for (let py = 0; py < height; py++) {
    const j = rows.index[py], fy = rows.frac[py];
    for (let px = 0, p = py * width; px < width; px++, p++) {
      const k = j * gw + cols.index[px];
      if (quad[k] === 0) continue;
      const fx = cols.frac[px];
      const w00 = (1 - fx) * (1 - fy), w10 = fx * (1 - fy), w01 = (1 - fx) * fy, w11 = fx * fy;
      const lx = fraction * (w00 * mx[k] + w10 * mx[k + 1] + w01 * mx[k + gw] + w11 * mx[k + gw + 1]);
      const ly = fraction * (w00 * my[k] + w10 * my[k + 1] + w01 * my[k + gw] + w11 * my[k + gw + 1]);
      if (lx * lx + ly * ly < 0.25) continue;
      at(p, lx, ly, px, py);
    }
  }
}

/** A prop's pose at τ frames from `cur` (|τ| ≤ ½), interpolated linearly towards the pose of the frame on that side. */
export function poseAt(cur: PropPose, prev: PropPose | undefined, next: PropPose | undefined, tau: number): PropPose {
  const other = tau >= 0 ? next : prev;
  if (!other) return cur;
  const k = Math.abs(tau);
  return { x: cur.x + (other.x - cur.x) * k, y: cur.y + (other.y - cur.y) * k, angle: cur.angle + (other.angle - cur.angle) * k };
}

/** The three frames a blurred frame is made from: the one drawn and its baked neighbours (null outside the bake). */
export interface FrameNeighbours {
  prev: ParticleFrame | null;
  cur: ParticleFrame;
  next: ParticleFrame | null;
}

/** The parts of a look renderer the shutter needs (LookRenderer in looks.ts). */
export interface ShutterLook {
  render(look: RenderLook, frame: ParticleFrame, toView: TankToView, options?: LookOptions): PixelImage;
  densityField(frame: ParticleFrame, t: TankToView, options?: LookOptions): DensityField;
}

/**
 * Draws frames with the shutter open for a fraction of the frame interval: liquid (with its foam and spray) smeared
 * along its estimated motion, props averaged over their poses across the shutter, walls sharp.
 */
export class ShutterRenderer {
  private liquid: PixelImage;
  private blurred: PixelImage;
  private solids: PixelImage;
  private sums: Float32Array;
  private motion: MotionField | undefined;
  private current: MotionField | null = null;
  private greyOut: Uint8Array;

  constructor(private looks: ShutterLook, readonly width: number, readonly height: number, readonly fraction: number) {
    this.liquid = createImage(width, height);
    this.blurred = createImage(width, height);
    this.solids = createImage(width, height);
    this.sums = new Float32Array(4 * width * height);
    this.greyOut = new Uint8Array(width * height);
  }

  /** The liquid's estimated motion at the frame drawn, view px per frame (zero everywhere when it has no neighbour). */
  motionAt(frames: FrameNeighbours, toView: TankToView, options: LookOptions): MotionField | null {
    const { prev, cur, next } = frames;
    const before = prev && prev.count > 0 ? prev : cur, after = next && next.count > 0 ? next : cur;
    this.current = null;
    if (before === after || cur.count === 0) return null;
    const a = this.looks.densityField(before, toView, options);
    const first = Float32Array.from(a.ratio);
    const b = this.looks.densityField(after, toView, options);
    if (b.gw !== a.gw || b.gh !== a.gh) return null;
    this.motion = normalFlow(first, b.ratio, b.gw, b.gh, b.cellPx, before === prev && after === next ? 2 : 1, this.motion);
    return (this.current = this.motion);
  }

  /** The frame in `look` with motion blur, premultiplied RGBA (reused between calls: read it before the next). */
  render(look: RenderLook, frames: FrameNeighbours, toView: TankToView, options: LookOptions): PixelImage {
    const { cur } = frames;
    const motion = this.motionAt(frames, toView, options);
    // the liquid alone (the look without solids), copied because the look reuses its image
    const liquidOnly = this.looks.render(look, cur, toView, { ...options, scene: undefined });
    this.liquid.pixels.set(liquidOnly.pixels);
    const out = motion ? vectorBlur(this.liquid, motion, this.fraction, this.blurred) : (this.blurred.pixels.set(this.liquid.pixels), this.blurred);
    if (options.scene) this.drawSolidsOverShutter(out, frames, toView, options);
    return out;
  }

  /** The matte pass's coverage smeared like the liquid (coverage of the frame drawn, 0–255). */
  blurCoverage(coverage: Uint8Array, motion: MotionField | null): Uint8Array {
    if (!motion) return coverage;
    return vectorBlurGrey(coverage, this.width, this.height, motion, this.fraction, this.greyOut);
  }

  /** The motion field of the last render (null when that frame had none). */
  get lastMotion(): MotionField | null {
    return this.current;
  }

  /** Walls and props over `out`: props drawn at poses across the shutter [−s/2, s/2] and averaged, walls once. */
  private drawSolidsOverShutter(out: PixelImage, frames: FrameNeighbours, toView: TankToView, options: LookOptions) {
    const scene = options.scene!;
    const { cur, prev, next } = frames;
    const poses = cur.props;
    // how far (px) a prop's farthest point moves over the open shutter: sets the number of poses drawn
    let travel = 0;
    if (poses) {
      scene.props.forEach((p, k) => {
        const a = poseAt(poses[k], prev?.props?.[k], next?.props?.[k], -0.5 * this.fraction);
        const b = poseAt(poses[k], prev?.props?.[k], next?.props?.[k], 0.5 * this.fraction);
        const b0 = shapeBounds(p.shape), reach = Math.hypot(b0.maxX - b0.minX, b0.maxY - b0.minY); // ≥ any point's distance from the centroid
        const turn = (Math.abs(b.angle - a.angle) * Math.PI) / 180;
        travel = Math.max(travel, (Math.hypot(b.x - a.x, b.y - a.y) + turn * reach) * toView.sx);
      });
    }
    const samples = poses && travel >= 0.5 ? Math.min(MAX_SAMPLES, Math.ceil(travel) + 1) : 1;
    if (samples === 1) {
      drawSolids(out, solidOutlines(scene, poses, toView, options.propImages));
      return;
    }
    // walls are still: drawn once, under the averaged props (as the look draws walls before props)
    const wallsOnly = { ...scene, props: [] };
    drawSolids(out, solidOutlines(wallsOnly, [], toView));
    const { sums, solids } = this;
    sums.fill(0);
    const noWalls = { ...scene, wallStyle: 'hidden' as const };
    for (let s = 0; s < samples; s++) {
      const tau = (s / (samples - 1) - 0.5) * this.fraction;
      const at = scene.props.map((_, k) => poseAt(poses![k], prev?.props?.[k], next?.props?.[k], tau));
      solids.pixels.fill(0);
      drawSolids(solids, solidOutlines(noWalls, at, toView, options.propImages));
      const d = solids.data;
      for (let i = 0; i < d.length; i += 4) {
        if (d[i + 3] === 0) continue;
        sums[i] += d[i]; sums[i + 1] += d[i + 1]; sums[i + 2] += d[i + 2]; sums[i + 3] += d[i + 3];
      }
    }
    // the mean of the premultiplied samples, "over" the liquid
    const o = out.data, n = 1 / samples;
    for (let i = 0; i < o.length; i += 4) {
      const a = sums[i + 3] * n;
      if (a === 0) continue;
      const k = 1 - a / 255;
      o[i] = Math.round(sums[i] * n + o[i] * k);
      o[i + 1] = Math.round(sums[i + 1] * n + o[i + 1] * k);
      o[i + 2] = Math.round(sums[i + 2] * n + o[i + 2] * k);
      o[i + 3] = Math.round(a + o[i + 3] * k);
    }
  }
}
