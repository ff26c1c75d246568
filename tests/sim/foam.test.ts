// Foam and spray (src/lib/sim/diffuse.ts, after Ihmsen, Akinci, Gissler & Teschner 2012, "Unified spray, foam and
// bubbles for particle-based fluids"): deterministic, read-only beside the liquid, none in still water, some in a
// splash, scaled and turned off by the scene's look.foam. The expectations are properties of the method (no
// potential above its threshold → no diffuse particle) and of our own design (a read-only stage), not recorded values.
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { createSolver } from '../../src/lib/sim/solver';
import { bakeChecksum } from '../../src/lib/sim/bake';
import { parseScene } from '../../src/lib/scene/schema';
import { sha256Hex } from '../../src/lib/scene/hash';
import { breakupFactor, FOAM, SPRAY } from '../../src/lib/sim/diffuse';
import { sceneFrom } from './helpers/scenes';

const FRAMES = 14;

function splashDoc(foam?: number) {
  const doc = JSON.parse(readFileSync(new URL('../fixtures/scenes/harbour-splash.json', import.meta.url), 'utf8'));
  doc.tank.cellSize = 1 / 64;
  if (foam !== undefined) doc.look = { foam };
  return doc;
}

/** Steps the scene; returns per frame the diffuse count, foam count and the bytes of the diffuse arrays. */
function bakeDiffuse(doc: unknown, frames = FRAMES) {
  const sim = createSolver(sceneFrom(doc));
  const out: { count: number; foam: number; spray: number; bytes: Uint8Array }[] = [];
  for (let f = 0; f < frames; f++) {
    sim.stepFrame();
    const d = sim.diffuse;
    let foam = 0, spray = 0;
    for (let i = 0; i < d.count; i++) { if (d.kind[i] === FOAM) foam++; else if (d.kind[i] === SPRAY) spray++; }
    const bytes = new Uint8Array(17 * d.count);
    const f32 = new Float32Array(bytes.buffer, 0, 4 * d.count);
    for (let i = 0; i < d.count; i++) { f32[4 * i] = d.x[i]; f32[4 * i + 1] = d.y[i]; f32[4 * i + 2] = d.u[i]; f32[4 * i + 3] = d.v[i]; }
    bytes.set(d.kind, 16 * d.count);
    out.push({ count: d.count, foam, spray, bytes });
  }
  return { sim, out };
}

const total = (r: ReturnType<typeof bakeDiffuse>) => r.out.reduce((s, f) => s + f.count, 0);

describe('foam and spray', () => {
  it('a foam bake is bit-identical run to run', () => {
    const a = bakeDiffuse(splashDoc()), b = bakeDiffuse(splashDoc());
    expect(total(a)).toBeGreaterThan(0);
    const sum = (r: typeof a) => sha256Hex(Uint8Array.from(r.out.flatMap((f) => Array.from(f.bytes))));
    expect(sum(b)).toBe(sum(a));
    for (let f = 0; f < FRAMES; f++) expect(b.out[f].count).toBe(a.out[f].count);
  });

  it('a splash makes foam and spray; still water makes none', () => {
    const splash = bakeDiffuse(splashDoc());
    expect(splash.out.some((f) => f.foam > 0)).toBe(true);
    expect(splash.out.some((f) => f.spray > 0)).toBe(true);
    // a pool at rest: every particle is far below the kinetic-energy threshold, so the paper's Φk is 0
    const still = bakeDiffuse({
      version: 2,
      tank: { width: 1, height: 0.5, cellSize: 1 / 64, sides: { left: true, right: true, bottom: true, top: true } },
      timing: { fps: 24, startFrame: 1, endFrame: 48, substeps: 2 },
      pours: [{ id: 'pool', shape: { type: 'rect', x: 0, y: 0, width: 1, height: 0.25 } }],
    }, 24);
    expect(still.out.map((f) => f.count)).toEqual(new Array(24).fill(0));
  });

  it('is read-only: the liquid bakes the same frames with foam on, doubled or off', () => {
    const on = bakeChecksum(sceneFrom(splashDoc()), 8);
    expect(bakeChecksum(sceneFrom(splashDoc(0)), 8)).toBe(on);
    expect(bakeChecksum(sceneFrom(splashDoc(2)), 8)).toBe(on);
  });

  it('look.foam 0 turns it off and 2 makes more than the default', () => {
    const off = bakeDiffuse(splashDoc(0));
    expect(total(off)).toBe(0);
    expect(Object.keys(off.sim.stepFrame().stageMs)).not.toContain('foam and spray');
    expect(total(bakeDiffuse(splashDoc(2)))).toBeGreaterThan(total(bakeDiffuse(splashDoc(1))));
  });

  it('a viscous liquid breaks up less: thick paint in the same splash throws no foam or spray, water keeps all', () => {
    // Ohnesorge number Oh = ν·√(ρ/(σ·R)) at the kernel radius, σ = 0.072 N/m (water–air, from memory):
    // water ν = 1e-6 m²/s → Oh ≈ 1e-3 (factor 1); ν = 1e-2 (thick paint) → Oh ≈ 9 (0); in between log-linear.
    const R = 0.0165;
    expect(breakupFactor(1e-6, R)).toBe(1);
    expect(breakupFactor(1e-2, R)).toBe(0);
    const mid = breakupFactor(0.1 / Math.sqrt(1000 / (0.072 * R)) * Math.sqrt(10), R); // Oh = 10^−0.5
    expect(mid).toBeCloseTo(0.5, 6);
    const water = splashDoc();
    const paint = splashDoc();
    paint.version = 2;
    paint.liquids = (paint.liquids ?? [{ id: 'water', name: 'Water', colour: '#3A8FB7' }]).map((l: Record<string, unknown>) => ({ ...l, viscosity: 1e-2 }));
    for (const key of ['pours', 'spouts']) for (const o of paint[key] ?? []) if (o.liquid === undefined) o.liquid = paint.liquids[0].id;
    expect(total(bakeDiffuse(water))).toBeGreaterThan(0);
    expect(total(bakeDiffuse(paint))).toBe(0);
  });

  it('look.foam outside 0 … 2 is refused, naming the field', () => {
    const r = parseScene(splashDoc(3));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(JSON.stringify(r.errors)).toContain('look.foam');
  });
});
