// Clip format version 2: each particle's liquid comes back exactly, prop poses within the clip's stated bound,
// the look (colours, walls, props) travels in the header, and a version 1 clip (a stored fixture) still decodes.
import { readFileSync } from 'node:fs';
import { describe, it, expect } from 'vitest';
import { ClipWriter } from '../../src/lib/clip/encode';
import { ClipReader } from '../../src/lib/clip/decode';
import { positionErrorBound, propPoseErrorBound, type ClipLook, type PropPose } from '../../src/lib/clip/format';
import { clipLookOf } from '../../src/lib/clip/look';
import { bakeScene } from '../../src/lib/bake/bake';
import { parseScene } from '../../src/lib/scene';
import { createSolver } from '../../src/lib/sim';

function rng(seed: number) {
  return () => {
    seed |= 0;
    seed = (seed + 0x6d2b79f5) | 0;
    let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const look: ClipLook = {
  liquids: [{ id: 'water', colour: '#3A8FB7' }, { id: 'paint', colour: '#C8341E' }, { id: 'syrup', colour: '#B5651D' }],
  walls: [{ id: 'step', shape: { type: 'rect', x: 0, y: 0, width: 0.3, height: 0.2 } }],
  wallStyle: 'fill',
  props: [
    { id: 'can', shape: { type: 'rect', x: 0.9, y: 0.5, width: 0.066, height: 0.122 }, centroid: [0.933, 0.561], colour: '#D23C3C' },
    { id: 'ball', shape: { type: 'circle', x: 0.3, y: 0.6, radius: 0.05 }, centroid: [0.3, 0.6], colour: '#E3A83C' },
  ],
};
const options = { startFrame: 1001, endFrame: 1020, fps: 24, tankWidth: 1.6, tankHeight: 0.9, particleCapacity: 3000, solverBuild: 'test', sceneHash: 'v2', look };

/** Frames of random particles: liquid 0 on the left third, 1 in the middle, 2 on the right (a few strays mixed in). */
function makeFrames() {
  const r = rng(21);
  return Array.from({ length: 20 }, (_, f) => {
    const count = 3000 - 7 * f;
    const x = new Float64Array(count), y = new Float64Array(count), u = new Float64Array(count), v = new Float64Array(count);
    const liquid = new Uint8Array(count);
    for (let i = 0; i < count; i++) {
      x[i] = r() * 1.6;
      y[i] = r() * 0.5;
      u[i] = r() - 0.5;
      v[i] = r() - 0.5;
      liquid[i] = r() < 0.05 ? Math.floor(r() * 3) : Math.min(2, Math.floor(x[i] / (1.6 / 3)));
    }
    // Poses that are not on the step grid, with angles past a full turn and below zero.
    const props: PropPose[] = [
      { x: 0.933 + 0.0123456 * f, y: 0.561 - 0.0098765 * f, angle: 37.77777 * f },
      { x: 0.3 + r() * 1e-3, y: 0.6 - r(), angle: -r() * 720 },
    ];
    return { count, x, y, u, v, liquid, props };
  });
}

/** Per bin of the clip, how many particles of each liquid it holds. */
function liquidsPerBin(binSize: number, n: number, x: ArrayLike<number>, y: ArrayLike<number>, liquid: ArrayLike<number>) {
  const m = new Map<string, number>();
  for (let i = 0; i < n; i++) {
    const key = `${Math.floor(x[i] / binSize)},${Math.floor(y[i] / binSize)},${liquid[i]}`;
    m.set(key, (m.get(key) ?? 0) + 1);
  }
  return m;
}

describe('clip format version 2', () => {
  const frames = makeFrames();
  const writer = new ClipWriter(options);
  for (const f of frames) writer.addFrame(f.count, f.x, f.y, f.u, f.v, { liquid: f.liquid, props: f.props });
  const bytes = writer.finish();

  it('keeps the liquid of every particle exactly: each bin holds as many particles of each liquid as before', async () => {
    const reader = await ClipReader.fromBytes(bytes);
    expect(reader.header.formatVersion).toBe(2);
    const bin = reader.header.binSize;
    for (const k of [0, 5, 8, 19]) {
      const src = frames[k];
      const got = await reader.frameAt(1001 + k);
      expect(got.count).toBe(src.count);
      // Decoded positions are bin-exact (inside the bin they were written from), so the per-bin liquid tally matches.
      expect(liquidsPerBin(bin, got.count, got.x, got.y, got.liquid)).toEqual(liquidsPerBin(bin, src.count, src.x, src.y, src.liquid));
      const tally = [0, 0, 0];
      for (const l of got.liquid) tally[l]++;
      expect(tally.every((c) => c > 0)).toBe(true);
    }
  });

  it('keeps prop poses within the bound the header states', async () => {
    const reader = await ClipReader.fromBytes(bytes);
    const bound = propPoseErrorBound(reader.header)!;
    expect(bound.position).toBeLessThanOrEqual(positionErrorBound(reader.header)); // no coarser than the particles
    let worstPos = 0, worstAngle = 0;
    for (let k = 0; k < frames.length; k++) {
      const got = await reader.frameAt(1001 + k);
      expect(got.props).toHaveLength(2);
      got.props.forEach((p, j) => {
        const want = frames[k].props[j];
        worstPos = Math.max(worstPos, Math.abs(p.x - want.x), Math.abs(p.y - want.y));
        worstAngle = Math.max(worstAngle, Math.abs(p.angle - want.angle));
      });
    }
    // Allow float64 rounding of (step × k) on top of half a step.
    expect(worstPos).toBeLessThanOrEqual(bound.position * (1 + 1e-9));
    expect(worstAngle).toBeLessThanOrEqual(bound.angle * (1 + 1e-9));
    expect(worstPos).toBeGreaterThan(0); // the poses were off the grid: the check measured something
  });

  it('carries the look in the header', async () => {
    const reader = await ClipReader.fromBytes(bytes);
    expect(reader.header.look).toEqual(look);
  });

  it('refuses a liquid the clip does not list and a frame without its prop poses', () => {
    const w = new ClipWriter(options);
    const f = frames[0];
    expect(() => w.addFrame(f.count, f.x, f.y, f.u, f.v, { liquid: f.liquid })).toThrow(/0 prop poses/);
    const bad = f.liquid.slice();
    bad[17] = 3;
    expect(() => w.addFrame(f.count, f.x, f.y, f.u, f.v, { liquid: bad, props: f.props })).toThrow(/liquid 3/);
  });

  it('stores no liquid plane for a one-liquid clip', () => {
    const one = { ...options, look: { ...look, liquids: [look.liquids[0]] } };
    const size = (o: typeof options, withLiquid: boolean) => {
      const w = new ClipWriter(o);
      for (const f of frames) w.addFrame(f.count, f.x, f.y, f.u, f.v, { liquid: withLiquid ? f.liquid.map(() => 0) : undefined, props: f.props });
      return w.finish().length;
    };
    expect(size(one, true)).toBe(size(one, false));
    expect(size(options, true)).toBeGreaterThan(size(one, true));
  });
});

describe('version 1 clips', () => {
  it('still decode: the stored fixture (written by the version 1 writer) gives back its frames, liquid 0, no props', async () => {
    // The fixture's frames: mulberry32 seed 3, 10 frames of 400 − 10·f particles, x·1.6, y·0.5 (see tests/fixtures/clip).
    const r = rng(3);
    const reader = await ClipReader.fromBytes(new Uint8Array(readFileSync(new URL('../fixtures/clip/v1-random-10f.tdmclip', import.meta.url))));
    expect(reader.header.formatVersion).toBe(1);
    const bound = positionErrorBound(reader.header);
    for (let f = 0; f < 10; f++) {
      const n = 400 - f * 10;
      const sx: number[] = [], sy: number[] = [];
      for (let i = 0; i < n; i++) {
        sx.push(r() * 1.6);
        sy.push(r() * 0.5);
        r();
        r();
      }
      const got = await reader.frameAt(1001 + f);
      expect(got.count).toBe(n);
      expect(got.props).toEqual([]);
      expect(got.liquid.every((l) => l === 0)).toBe(true);
      for (let j = 0; j < got.count; j += 13) {
        let best = Infinity;
        for (let i = 0; i < n; i++) best = Math.min(best, Math.max(Math.abs(sx[i] - got.x[j]), Math.abs(sy[i] - got.y[j])));
        expect(best).toBeLessThanOrEqual(bound + 1e-6);
      }
    }
  });
});

describe('the bake writes version 2', () => {
  it('with the scene liquids, walls and props, and the solver’s prop poses and particle liquids', async () => {
    const parsed = parseScene({
      version: 2,
      liquids: [
        { id: 'water', name: 'Water', colour: '#3A8FB7', viscosity: 1e-6 },
        { id: 'paint', name: 'Paint', colour: '#C8341E', viscosity: 1e-6 },
      ],
      tank: { width: 0.5, height: 0.4, cellSize: 0.025 },
      timing: { fps: 24, startFrame: 1, endFrame: 4, substeps: 1 },
      pours: [
        { id: 'a', liquid: 'water', shape: { type: 'rect', x: 0, y: 0, width: 0.2, height: 0.15 } },
        { id: 'b', liquid: 'paint', shape: { type: 'rect', x: 0.3, y: 0, width: 0.2, height: 0.15 } },
      ],
      walls: [{ id: 'w', shape: { type: 'rect', x: 0.22, y: 0, width: 0.06, height: 0.1 } }],
      props: [{ id: 'box', colour: '#11AA22', shape: { type: 'rect', x: 0.2, y: 0.25, width: 0.1, height: 0.05 }, motion: 'free', density: 500 }],
      look: { walls: 'hidden' },
    });
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors));
    const result = await bakeScene(parsed.scene, 'h');
    const reader = await ClipReader.fromBytes(result!.clip);
    expect(reader.header.look).toEqual(clipLookOf(parsed.scene));
    expect(reader.header.look!.wallStyle).toBe('hidden');
    expect(reader.header.look!.props[0].colour).toBe('#11AA22');
    // The same solver run again gives the poses and per-liquid counts the clip must hold.
    const sim = createSolver(parsed.scene);
    for (let f = 1; f <= 4; f++) {
      const s = f === 1 ? sim.stats() : sim.stepFrame();
      const got = await reader.frameAt(f);
      const counts = [0, 0];
      for (const l of got.liquid) counts[l]++;
      expect(counts).toEqual(s.liquidCounts);
      expect(Math.abs(got.props[0].x - s.props[0].x)).toBeLessThanOrEqual(propPoseErrorBound(reader.header)!.position * 1.0001);
      expect(Math.abs(got.props[0].angle - s.props[0].angle)).toBeLessThanOrEqual(propPoseErrorBound(reader.header)!.angle * 1.0001);
    }
    expect(reader.header.look!.props[0].centroid).toEqual([0.25, 0.275]);
  });
});
