// Motion blur of exports (src/lib/render/motionBlur.ts): a body moving at constant velocity v, filmed with the
// shutter open for θ/360 of each frame interval 1/fps, sweeps v·(θ/360)/fps during the exposure, so its blurred
// picture is longer along the motion by that distance and no longer across it (kinematics of uniform motion;
// "180° shutter = half the frame interval" is the film habit, common practice (no source)). The liquid's motion is
// estimated from the density field (clips keep no particle identities); the props' from their baked poses.
import { describe, it, expect } from 'vitest';
import { LookRenderer, type ParticleFrame } from '../../src/lib/render/looks';
import { layoutView } from '../../src/lib/render/view';
import { ShutterRenderer, normalFlow, poseAt, shutterFraction } from '../../src/lib/render/motionBlur';
import type { ClipLook } from '../../src/lib/clip/format';
import type { PixelImage } from '../../src/lib/render/image';

const W = 960, H = 540, FPS = 25;
const TANK = { width: 1.6, height: 0.9 };
const { toView } = layoutView({ viewWidth: W, viewHeight: H, tankWidth: TANK.width, tankHeight: TANK.height, plate: null, metresPerPixel: null });
const SPACING = 1 / 128; // m between particles: 4 a cell of 1/64 m
const options = { restDensity: 1 / (SPACING * SPACING) };

/** A disc of liquid particles (radius 0.1 m) centred at (cx, cy), on a square lattice. */
function blob(cx: number, cy: number, speed: number): ParticleFrame {
  const xs: number[] = [], ys: number[] = [];
  const r = 0.1;
  for (let y = -r; y <= r; y += SPACING) for (let x = -r; x <= r; x += SPACING) if (x * x + y * y <= r * r) { xs.push(cx + x); ys.push(cy + y); }
  return { count: xs.length, x: Float32Array.from(xs), y: Float32Array.from(ys), speed: new Float32Array(xs.length).fill(speed), maxSpeed: speed };
}

/** Pixels along a row (or column) whose alpha is above 8/255: the picture's extent there. */
function extent(img: PixelImage, at: number, along: 'row' | 'column'): number {
  let first = -1, last = -1;
  const n = along === 'row' ? img.width : img.height;
  for (let k = 0; k < n; k++) {
    const p = along === 'row' ? at * img.width + k : k * img.width + at;
    if (img.data[4 * p + 3] > 8) { if (first < 0) first = k; last = k; }
  }
  return first < 0 ? 0 : last - first + 1;
}

describe('motion blur', () => {
  const looks = new LookRenderer(W, H);
  const row = Math.round(toView.oy - 0.45 * toView.sy);
  const column = Math.round(toView.ox + 0.8 * toView.sx);

  for (const [v, angle] of [[1, 180], [2, 180], [1, 90], [1, 360]] as const) {
    it(`a blob moving at ${v} m/s, ${angle}° shutter, is longer along its motion by v·(θ/360)/fps and no longer across it`, () => {
      const d = v / FPS; // m a frame
      const frames = { prev: blob(0.8 - d, 0.45, v), cur: blob(0.8, 0.45, v), next: blob(0.8 + d, 0.45, v) };
      const sharpImg = looks.render('surface', frames.cur, toView, options);
      const sharp = { along: extent(sharpImg, row, 'row'), across: extent(sharpImg, column, 'column') };
      const blurred = new ShutterRenderer(looks, W, H, shutterFraction(angle)).render('surface', frames, toView, options);
      // expected: the distance swept while the shutter is open, in view px (kinematics of uniform motion)
      const swept = v * (angle / 360) / FPS * toView.sx;
      const grown = extent(blurred, row, 'row') - sharp.along;
      // the liquid's motion is an estimate from the density field: within 25 % of the swept distance, or 2 px
      expect(Math.abs(grown - swept)).toBeLessThanOrEqual(Math.max(2, 0.25 * swept));
      expect(Math.abs(extent(blurred, column, 'column') - sharp.across)).toBeLessThanOrEqual(1);
    });
  }

  it('leaves a blob at rest exactly as the look draws it', () => {
    const still = blob(0.8, 0.45, 0);
    const sharp = Uint8Array.from(looks.render('surface', still, toView, options).data);
    const blurred = new ShutterRenderer(looks, W, H, 0.5).render('surface', { prev: still, cur: still, next: still }, toView, options);
    expect(Buffer.compare(Buffer.from(blurred.data), Buffer.from(sharp))).toBe(0);
  });

  it('reads the normal flow of a translated edge: m = −ρ_t ∇ρ / |∇ρ|² recovers the displacement', () => {
    // a smooth step ρ(x) = ½(1 + tanh((x0 − x)/w)) moved by 2 cells a frame (Horn & Schunck 1981, brightness constancy)
    const gw = 80, gh = 8, cellPx = 5, w = 6;
    const step = (x0: number) => Float32Array.from({ length: gw * gh }, (_, k) => 0.5 * (1 + Math.tanh((x0 - (k % gw)) / w)));
    const m = normalFlow(step(38), step(42), gw, gh, cellPx, 2);
    const k = 4 * gw + 40;
    expect(m.mx[k] / cellPx).toBeGreaterThan(1.8);
    expect(m.mx[k] / cellPx).toBeLessThan(2.2);
    expect(Math.abs(m.my[k])).toBeLessThan(1e-6);
  });

  it('draws a moving prop at poses across the shutter: longer along its path by the swept distance', () => {
    // a 0.1 m square prop falling at 2 m/s: its baked poses 0.08 m apart a frame
    const look: ClipLook = {
      liquids: [{ id: 'water', colour: '#3A8FB7' }], walls: [], wallStyle: 'outline',
      props: [{ id: 'box', shape: { type: 'rect', x: 0.75, y: 0.4, width: 0.1, height: 0.1 }, centroid: [0.8, 0.45], colour: '#D23C32' }],
    };
    const v = 2, d = v / FPS;
    const empty = (y: number): ParticleFrame => ({ count: 0, x: [], y: [], speed: [], maxSpeed: 0, props: [{ x: 0.8, y, angle: 0 }] });
    const frames = { prev: empty(0.45 + d), cur: empty(0.45), next: empty(0.45 - d) };
    const opts = { ...options, scene: look };
    const sharp = extent(looks.render('surface', frames.cur, toView, opts), column, 'column');
    const blurred = new ShutterRenderer(looks, W, H, 0.5).render('surface', frames, toView, opts);
    const swept = v * 0.5 / FPS * toView.sx; // 24 px
    // poses are exact (the clip's), so the only error is the sampling of poses (one per px swept) and the rim
    expect(Math.abs(extent(blurred, column, 'column') - sharp - swept)).toBeLessThanOrEqual(2);
    expect(extent(blurred, row, 'row')).toBe(extent(looks.render('surface', frames.cur, toView, opts), row, 'row'));
  });

  it('interpolates a prop pose towards the neighbouring frame on each side of the shutter', () => {
    const prev = { x: 0, y: 0, angle: 0 }, cur = { x: 1, y: 2, angle: 10 }, next = { x: 3, y: 2, angle: 30 };
    expect(poseAt(cur, prev, next, 0.25)).toEqual({ x: 1.5, y: 2, angle: 15 });
    expect(poseAt(cur, prev, next, -0.5)).toEqual({ x: 0.5, y: 1, angle: 5 });
    expect(poseAt(cur, undefined, next, -0.25)).toEqual(cur);
  });
});
