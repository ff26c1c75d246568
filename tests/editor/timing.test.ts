// The timing helper against ballistics: with constant gravity and no drag (Newton's second law), a body released
// with downward speed v0 has fallen h(t) = v0·t + g·t²/2 after t seconds (Newton, Principia, 1687; any mechanics text).
import { describe, it, expect } from 'vitest';
import { startingScene, makeItem, type EditorDoc } from '../../src/lib/editor/document';
import { planDrop, impactFrameOf, surfaceHeightAt } from '../../src/lib/editor/timing';
import { poseAt } from '../../src/lib/scene/keys';
import { parseScene } from '../../src/lib/scene/schema';
import { shapeBounds } from '../../src/lib/scene/shapes';

function sceneWithProp(fps: string, propY: number): { doc: EditorDoc; prop: EditorDoc['props'][number] } {
  let doc = startingScene({ firstFrame: 1001, lastFrame: 1060, frameRate: fps, plateWidth: 1920, plateHeight: 1080, metresPerPixel: 0.001 });
  doc = { ...doc, pours: [{ id: 'pool', liquid: doc.liquids[0].id, shape: { type: 'rect', x: 0, y: 0, width: 1.92, height: 0.25 }, velocity: [0, 0] }] };
  const prop = makeItem(doc, 'props', { type: 'rect', x: 0.9, y: propY, width: 0.1, height: 0.08 }) as EditorDoc['props'][number];
  return { doc: { ...doc, props: [prop] }, prop };
}

/** First frame at which a body dropped from height h with downward speed v0 has fallen h: t = (−v0 + √(v0² + 2gh))/g. */
function ballisticImpactFrame(h: number, v0: number, g: number, releaseFrame: number, fps: number): number {
  const t = (-v0 + Math.sqrt(v0 * v0 + 2 * g * h)) / g;
  return releaseFrame + Math.ceil(t * fps - 1e-9);
}

describe('timing helper', () => {
  it('reads the liquid surface under the prop from the pours', () => {
    const { doc } = sceneWithProp('24', 0.8);
    expect(surfaceHeightAt(doc, 0.95)).toBeCloseTo(0.25, 12);
    expect(surfaceHeightAt(doc, 3)).toBeNull();
  });

  for (const [rate, fps] of [['24', 24], ['25', 25], ['29.97df', 30000 / 1001]] as const) {
    it(`keep-height at ${rate} fps: the keys follow h = v0·t + g·t²/2 and hit the surface on the chosen frame`, () => {
      const { doc, prop } = sceneWithProp(rate, 0.8);
      const g = 9.81, surfaceY = 0.25, release = 1005, impact = 1016;
      const r = planDrop(doc, prop, { releaseFrame: release, impactFrame: impact, surfaceY, mode: 'keep-height' });
      const h = 0.8 - surfaceY;
      const t = (impact - release) / fps;
      expect(r.dropHeight).toBeCloseTo(h, 12);
      expect(r.releaseSpeed).toBeCloseTo(h / t - (g * t) / 2, 12); // v0 = h/t − g·t/2
      expect(r.impactSpeed).toBeCloseTo(r.releaseSpeed + g * t, 12);
      const withKeys = { ...prop, keys: r.keys };
      // every frame from release to impact on the ballistic path (keys rounded to 1 µm)
      for (let f = release; f <= impact; f++) {
        const s = (f - release) / fps;
        expect(0.8 + poseAt(withKeys.keys, f).dy).toBeCloseTo(0.8 - (r.releaseSpeed * s + (g * s * s) / 2), 5);
      }
      expect(impactFrameOf(withKeys, surfaceY, doc.timing.startFrame, doc.timing.endFrame)).toBe(impact);
      expect(ballisticImpactFrame(h, r.releaseSpeed, g, release, fps)).toBe(impact);
      expect(poseAt(withKeys.keys, doc.timing.startFrame).dy).toBe(0); // held still before release
      expect(parseScene({ ...doc, props: [withKeys] }).ok).toBe(true);
    });
  }

  it('from rest: the drop height is g·t²/2 and the prop is moved up or down to it', () => {
    const { doc, prop } = sceneWithProp('25', 0.5);
    const g = 9.81, surfaceY = 0.25, release = 1001, impact = 1013;
    const r = planDrop(doc, prop, { releaseFrame: release, impactFrame: impact, surfaceY, mode: 'from-rest' });
    const t = (impact - release) / 25;
    expect(r.releaseSpeed).toBe(0);
    expect(r.dropHeight).toBeCloseTo((g * t * t) / 2, 12); // 0.5 · 9.81 · 0.48² = 1.130 m
    const withKeys = { ...prop, keys: r.keys };
    const bottomAtRelease = shapeBounds(prop.shape).minY + poseAt(r.keys, release).dy;
    expect(bottomAtRelease - surfaceY).toBeCloseTo(r.dropHeight, 5);
    expect(impactFrameOf(withKeys, surfaceY, 1001, 1060)).toBe(impact);
    expect(ballisticImpactFrame(r.dropHeight, 0, g, release, 25)).toBe(impact);
  });

  it('refuses an impact before the release', () => {
    const { doc, prop } = sceneWithProp('24', 0.8);
    expect(() => planDrop(doc, prop, { releaseFrame: 1010, impactFrame: 1010, surfaceY: 0.25, mode: 'keep-height' })).toThrow(/after the release/);
  });
});
