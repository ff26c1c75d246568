// A bake's health verdict, from its per-frame stats: did liquid go missing, did particles move faster than
// anything in the scene can push them, did the step count run away, did a number stop being finite.
// The bounds below are limits of this solver (what a bake that works stays within), not physics values.
import { z } from 'zod';
import type { Scene } from '../scene/schema';
import { shapeBounds, shapeCentroid, type Shape } from '../scene/shapes';
import type { FrameStats } from './solver';

export const HEALTH_CODES = ['liquid-lost', 'speed-runaway', 'substeps-runaway', 'speed-not-finite'] as const;
export type HealthCode = (typeof HEALTH_CODES)[number];

export interface HealthFinding {
  code: HealthCode;
  /** One plain sentence an artist can read. */
  words: string;
  /** The measured figure (its unit is in `words`). */
  value: number;
  /** The limit it went past. */
  bound: number;
}

export interface BakeHealth {
  healthy: boolean;
  findings: HealthFinding[];
}

/** Share of the largest particle count that may go missing before the bake counts as having lost liquid. */
export const LIQUID_LOSS_LIMIT = 0.1;
/**
 * Particles may move this many times faster than the fastest driver (spout, prop, pour, or a fall from the
 * tank's top). A splash throws thin sheets faster than what hit the water (a jet from a slammed surface can
 * reach a few times the impact speed), so 1× would flag healthy splashes; a blow-up grows speeds by orders of
 * magnitude within a few frames (1,600 m/s from 16 m/s in 13 frames, in the blow-up the solver issue reported),
 * so 5× still catches it within a frame or two. 5× is the bound the stability acceptance sets ("no particle faster
 * than 5 × the prop's impact speed"); the box-crash fixture (tests/fixtures/scenes/box-crash.json) peaks at 53 m/s
 * against a driver speed of 14.5 m/s (3.6 ×, measured on solver build tidemark-flip/2) and reads healthy.
 */
export const SPEED_FACTOR = 5;
/**
 * stepFrame has no cap on substeps: the CFL condition adds as many as the fastest speed asks for. A bake that
 * needs more than this many times its scene's own substeps per frame is being driven by runaway speeds.
 */
export const SUBSTEP_FACTOR = 50;

function fmt(x: number, digits = 1): string {
  return x.toLocaleString('en-GB', { maximumFractionDigits: digits });
}

/** Largest distance from the shape's centroid to its bounding box corner, m (how far a spin moves its edge). */
function reach(shape: Shape): number {
  const b = shapeBounds(shape);
  const [cx, cy] = shapeCentroid(shape);
  return Math.hypot(Math.max(cx - b.minX, b.maxX - cx), Math.max(cy - b.minY, b.maxY - cy));
}

/**
 * The fastest speed the scene's drivers and gravity can give liquid, m/s: spouts, pours' starting velocity,
 * keyed props (between consecutive keys, translation plus rotation at the prop's reach), free props' starting
 * velocity and spin, and a fall through the tank's full height, √(2·g·height).
 */
export function driverSpeed(scene: Scene): number {
  const fps = scene.timing.fps;
  let m = 0;
  for (const s of scene.spouts) m = Math.max(m, Math.hypot(s.velocity[0], s.velocity[1]));
  for (const p of scene.pours) m = Math.max(m, Math.hypot(p.velocity[0], p.velocity[1]));
  for (const p of scene.props) {
    const r = reach(p.shape);
    for (let k = 1; k < p.keys.length; k++) {
      const a = p.keys[k - 1], b = p.keys[k];
      const frames = b.frame - a.frame;
      const move = Math.hypot(b.dx - a.dx, b.dy - a.dy) + (Math.abs(b.angle - a.angle) * Math.PI / 180) * r;
      m = Math.max(m, (move / frames) * fps);
    }
    if (p.motion === 'free') {
      const v = p.velocity ?? [0, 0];
      m = Math.max(m, Math.hypot(v[0], v[1]) + (Math.abs(p.spin ?? 0) * Math.PI / 180) * r);
    }
  }
  const g = Math.hypot(scene.physics.gravity[0], scene.physics.gravity[1]);
  return Math.max(m, Math.sqrt(2 * g * scene.tank.height));
}

/** The health verdict of a bake of `scene` from its frame stats (in frame order). */
export function bakeHealth(scene: Scene, frames: readonly FrameStats[]): BakeHealth {
  const findings: HealthFinding[] = [];

  // Liquid lost. With drains, leaving the tank is what the artist asked for, so the count may fall freely.
  if (scene.drains.length === 0) {
    let most = 0, worst = 0;
    for (const f of frames) {
      if (f.count > most) most = f.count;
      if (most > 0) worst = Math.max(worst, (most - f.count) / most);
    }
    if (worst > LIQUID_LOSS_LIMIT) {
      findings.push({
        code: 'liquid-lost', value: worst, bound: LIQUID_LOSS_LIMIT,
        words: `Liquid lost: ${fmt(worst * 100, 0)} % of the particles left the tank (more than ${fmt(LIQUID_LOSS_LIMIT * 100, 0)} % means the bake went wrong).`,
      });
    }
  }

  let fastest = 0, notFinite = -1;
  for (const f of frames) {
    if (!Number.isFinite(f.maxSpeed)) { if (notFinite < 0) notFinite = f.frame; }
    else if (f.maxSpeed > fastest) fastest = f.maxSpeed;
  }
  if (notFinite >= 0) {
    findings.push({
      code: 'speed-not-finite', value: notFinite, bound: 0,
      words: `The solver lost track of the liquid's speed at frame ${notFinite} (it stopped being a number).`,
    });
  }
  const speedBound = SPEED_FACTOR * driverSpeed(scene);
  if (fastest > speedBound) {
    findings.push({
      code: 'speed-runaway', value: fastest, bound: speedBound,
      words: `Liquid reached ${fmt(fastest)} m/s, more than ${fmt(speedBound)} m/s that the scene's spouts, props and gravity can explain.`,
    });
  }

  const substepBound = SUBSTEP_FACTOR * scene.timing.substeps;
  const most = frames.reduce((m, f) => Math.max(m, f.substeps), 0);
  if (most > substepBound) {
    findings.push({
      code: 'substeps-runaway', value: most, bound: substepBound,
      words: `A frame needed ${fmt(most, 0)} steps (more than ${fmt(substepBound, 0)}): speeds ran away and the bake slowed to a crawl.`,
    });
  }

  return { healthy: findings.length === 0, findings };
}

const healthSchema = z.object({
  healthy: z.boolean(),
  findings: z.array(z.object({ code: z.enum(HEALTH_CODES), words: z.string(), value: z.number(), bound: z.number() })),
});

/** The verdict stored in a clip's meta, or null for a bake stored before verdicts existed (or unreadable). */
export function healthOf(meta: unknown): BakeHealth | null {
  const r = healthSchema.safeParse((meta as { health?: unknown } | null | undefined)?.health);
  return r.success ? r.data : null;
}
