// The clip's optional foam and spray section (format.ts): every particle comes back within the clip's stated bound
// with its kind; a clip without the section decodes with no diffuse particles; a bake of a splash
// writes the solver's foam and spray into its clip.
import { readFileSync } from 'node:fs';
import { describe, it, expect } from 'vitest';
import { ClipWriter } from '../../src/lib/clip/encode';
import { ClipReader } from '../../src/lib/clip/decode';
import { diffuseErrorBound } from '../../src/lib/clip/format';
import { bakeScene } from '../../src/lib/bake/bake';
import { parseScene } from '../../src/lib/scene';
import { mulberry32 } from '../../src/lib/sim/prng';

const options = { startFrame: 1, endFrame: 12, fps: 24, tankWidth: 1.6, tankHeight: 0.9, particleCapacity: 10, solverBuild: 'test', sceneHash: 'd' };
const liquid = { x: [0.1, 0.2], y: [0.1, 0.1], u: [0, 0], v: [0, 0] };

function diffuseFrames() {
  const r = mulberry32(7);
  return Array.from({ length: 12 }, (_, f) => {
    const count = f === 3 ? 0 : 50 + 13 * f;
    const x = Float32Array.from({ length: count }, () => r() * 1.6);
    const y = Float32Array.from({ length: count }, () => r() * 0.9);
    x[0] = 0; y[0] = 0.9; // the tank's corners stay inside the u16 range
    const kind = Uint8Array.from({ length: count }, () => (r() < 0.4 ? 0 : 1));
    return { count, x, y, kind };
  });
}

describe('clip foam and spray section', () => {
  it('round trip: every particle back within the stated bound with its kind', async () => {
    const frames = diffuseFrames();
    const w = new ClipWriter({ ...options, diffuse: true });
    for (const d of frames) w.addFrame(2, liquid.x, liquid.y, liquid.u, liquid.v, { props: [], diffuse: d });
    const reader = await ClipReader.fromBytes(w.finish());
    const bound = diffuseErrorBound(reader.header)!;
    expect(bound).toBeGreaterThan(0);
    expect(bound).toBeLessThanOrEqual(1.6 / 65536 / 2 + 1e-12);
    // the section stores particles in its own order: match each written particle to a decoded one of its kind
    const key = (x: number, y: number, k: number) => `${k}:${Math.floor(x / (2 * bound))}:${Math.floor(y / (2 * bound))}`;
    for (let f = 0; f < frames.length; f++) {
      const got = await reader.frameAt(f + 1);
      expect(got.count).toBe(2);
      expect(got.diffuse.count).toBe(frames[f].count);
      const byStep = new Map<string, number[]>();
      for (let i = 0; i < got.diffuse.count; i++) {
        const k = key(got.diffuse.x[i], got.diffuse.y[i], got.diffuse.kind[i]);
        (byStep.get(k) ?? byStep.set(k, []).get(k)!).push(i);
      }
      let worst = 0;
      for (let i = 0; i < frames[f].count; i++) {
        const k = key(frames[f].x[i], frames[f].y[i], frames[f].kind[i]);
        const hit = byStep.get(k)?.pop();
        expect(hit, `particle ${i} of frame ${f} came back`).toBeDefined();
        worst = Math.max(worst, Math.abs(got.diffuse.x[hit!] - frames[f].x[i]), Math.abs(got.diffuse.y[hit!] - frames[f].y[i]));
      }
      // plus the float32 rounding of the decoded value (one ulp at 1.6 m is 1.2e-7 m)
      expect(worst).toBeLessThanOrEqual(bound + 2.4e-7);
    }
  });

  it('a clip without the section decodes with no diffuse particles', async () => {
    const w = new ClipWriter(options);
    for (let f = 0; f < 12; f++) w.addFrame(2, liquid.x, liquid.y, liquid.u, liquid.v, { props: [] });
    const reader = await ClipReader.fromBytes(w.finish());
    expect(reader.header.diffuse).toBeUndefined();
    expect(diffuseErrorBound(reader.header)).toBeNull();
    const got = await reader.frameAt(5);
    expect(got.diffuse.count).toBe(0);
    expect(got.count).toBe(2);
  });

  it('a baked splash carries foam and spray; look.foam 0 bakes none', async () => {
    const doc = JSON.parse(readFileSync(new URL('../fixtures/scenes/harbour-splash.json', import.meta.url), 'utf8'));
    doc.tank.cellSize = 1 / 48;
    doc.timing.endFrame = 1012;
    const counts = async (foam: number) => {
      const parsed = parseScene({ ...doc, look: { foam } });
      if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors));
      const baked = (await bakeScene(parsed.scene, 'h'))!;
      const reader = await ClipReader.fromBytes(baked.clip);
      const out: number[] = [];
      for (let f = 1001; f <= 1012; f++) out.push((await reader.frameAt(f)).diffuse.count);
      return out;
    };
    expect((await counts(1)).some((c) => c > 0)).toBe(true);
    expect(await counts(0)).toEqual(new Array(12).fill(0));
  });
});
