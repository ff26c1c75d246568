// The health verdict of a bake. Its bounds (10 % of the liquid lost, 3 × the fastest driver's speed, 50 × the
// scene's substeps) are this solver's own limits — what a bake that works stays within — not physics values, so
// no published source applies: the broken cases below are the stats a blown-up bake actually reported (speeds
// growing to 1,600 m/s, 60 % and then all of the liquid gone, speeds that stop being numbers).
import { describe, expect, it } from 'vitest';
import { parseScene, type Scene } from '../../src/lib/scene';
import { createSolver, referenceDamBreak, type FrameStats } from '../../src/lib/sim';
import { bakeHealth, driverSpeed, healthOf, SPEED_FACTOR, SUBSTEP_FACTOR } from '../../src/lib/sim/health';

function bakeFew(scene: Scene, frames: number): FrameStats[] {
  const s = createSolver(scene, referenceDamBreak().options);
  const out: FrameStats[] = [s.stats()];
  for (let i = 0; i < frames; i++) out.push(s.stepFrame());
  return out;
}

describe('bake health', () => {
  const { scene } = referenceDamBreak();
  const frames = bakeFew(scene, 12);

  it('the reference dam break is healthy', () => {
    expect(frames.at(-1)!.maxSpeed).toBeGreaterThan(0); // the column has started to fall: the stats are real
    expect(bakeHealth(scene, frames)).toEqual({ healthy: true, findings: [] });
  });

  it('speeds far beyond the drivers are a runaway', () => {
    const broken = frames.map((f, i) => (i >= 8 ? { ...f, maxSpeed: 1600 } : f));
    const h = bakeHealth(scene, broken);
    expect(h.healthy).toBe(false);
    expect(h.findings.map((f) => f.code)).toEqual(['speed-runaway']);
    // closed tank, no drivers: only the fall through the tank's height, √(2·g·H), times the factor
    expect(h.findings[0].bound).toBeCloseTo(SPEED_FACTOR * Math.sqrt(2 * 9.81 * scene.tank.height), 9);
    expect(h.findings[0].value).toBe(1600);
    expect(h.findings[0].words).toMatch(/1,600 m\/s/);
  });

  it('a count dropping 60 % below its largest is liquid lost', () => {
    const broken = frames.map((f, i) => (i >= 6 ? { ...f, count: Math.round(f.count * 0.4) } : f));
    const h = bakeHealth(scene, broken);
    expect(h.healthy).toBe(false);
    expect(h.findings.map((f) => f.code)).toEqual(['liquid-lost']);
    expect(h.findings[0].value).toBeCloseTo(0.6, 3);
    expect(h.findings[0].words).toMatch(/^Liquid lost: 60 % of the particles left the tank/);
  });

  it('a loss under the bound, or any loss in a scene with drains, is not flagged', () => {
    const small = frames.map((f, i) => (i >= 6 ? { ...f, count: Math.round(f.count * 0.95) } : f));
    expect(bakeHealth(scene, small).healthy).toBe(true);
    const r = parseScene({ ...structuredClone(scene), drains: [{ id: 'drain-1', shape: { type: 'rect', x: 0, y: 0, width: 0.1, height: 0.1 } }] });
    if (!r.ok) throw new Error(JSON.stringify(r.errors));
    const lost = frames.map((f, i) => (i >= 6 ? { ...f, count: Math.round(f.count * 0.4) } : f));
    expect(bakeHealth(r.scene, lost).healthy).toBe(true);
  });

  it('a non-finite speed is unhealthy and names its frame', () => {
    for (const bad of [NaN, Infinity]) {
      const broken = frames.map((f, i) => (i >= 10 ? { ...f, maxSpeed: bad } : f));
      const h = bakeHealth(scene, broken);
      expect(h.healthy).toBe(false);
      expect(h.findings.map((f) => f.code)).toEqual(['speed-not-finite']);
      expect(h.findings[0].value).toBe(frames[10].frame);
    }
  });

  it('substeps beyond 50 × the scene substeps are a runaway', () => {
    const bound = SUBSTEP_FACTOR * scene.timing.substeps;
    const at = frames.map((f, i) => (i === 5 ? { ...f, substeps: bound } : f));
    expect(bakeHealth(scene, at).healthy).toBe(true);
    const over = frames.map((f, i) => (i === 5 ? { ...f, substeps: bound + 1 } : f));
    expect(bakeHealth(scene, over).findings.map((f) => f.code)).toEqual(['substeps-runaway']);
  });

  it('drivers raise the speed bound: a spout, and a keyed prop from its keys × fps', () => {
    const doc = {
      ...structuredClone(scene),
      spouts: [{ id: 's', shape: { type: 'circle', x: 0.2, y: 0.9, radius: 0.02 }, velocity: [0, -12], startFrame: 0, endFrame: 5 }],
      props: [{ id: 'p', shape: { type: 'rect', x: 0.6, y: 0.6, width: 0.1, height: 0.1 }, keys: [{ frame: 0, dx: 0, dy: 0, angle: 0 }, { frame: 2, dx: 0, dy: -0.5, angle: 0 }] }],
    };
    const r = parseScene(doc);
    if (!r.ok) throw new Error(JSON.stringify(r.errors));
    // keyed prop: 0.5 m over 2 frames at 120 fps = 30 m/s, faster than the 12 m/s spout and the ≈ 4.4 m/s fall
    expect(driverSpeed(r.scene)).toBeCloseTo(30, 9);
  });

  it('the verdict reads back from a clip meta; a meta stored before verdicts reads as none', () => {
    const h = bakeHealth(scene, frames.map((f, i) => (i >= 6 ? { ...f, count: 0 } : f)));
    expect(healthOf(JSON.parse(JSON.stringify({ solverBuild: 'x', health: h })))).toEqual(h);
    expect(healthOf({ solverBuild: 'x', frames: 10 })).toBeNull();
    expect(healthOf({ health: { healthy: 'yes' } })).toBeNull();
    expect(healthOf(null)).toBeNull();
  });
});
