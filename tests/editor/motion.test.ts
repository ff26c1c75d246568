// The Inspector's prop motion (src/lib/editor/motion.ts): every change it makes leaves a scene the shared schema
// accepts, switching keyed ↔ free loses nothing, and its problems are in words exactly when the schema refuses the prop.
import { describe, expect, it } from 'vitest';
import { startingScene, makeItem, type EditorDoc } from '../../src/lib/editor/document';
import { addItem } from '../../src/lib/editor/commands';
import { parseScene, type Prop } from '../../src/lib/scene/schema';
import { densityHint, motionProblems, withDensity, withLaunch, withMotion, withRelease, FIRST_FREE_DENSITY } from '../../src/lib/editor/motion';

function docWithProp(): EditorDoc {
  const d = startingScene({ firstFrame: 1001, lastFrame: 1048, frameRate: '24', plateWidth: 0, plateHeight: 0, metresPerPixel: null });
  return addItem('props', makeItem(d, 'props', { type: 'rect', x: 0.7, y: 0.6, width: 0.1, height: 0.1 })).apply(d);
}
const withProp = (d: EditorDoc, p: Prop): EditorDoc => ({ ...d, props: [p] });
const parses = (d: EditorDoc) => parseScene(d).ok;

describe('prop motion in the Inspector', () => {
  const doc = docWithProp();
  const keyed = doc.props[0];

  it('makes a prop free with a density the schema accepts, and keyed again without losing it', () => {
    expect(keyed.motion).toBe('keyed');
    const free = withMotion(keyed, 'free');
    expect(free.motion).toBe('free');
    expect(free.density).toBe(FIRST_FREE_DENSITY);
    expect(parses(withProp(doc, free))).toBe(true);
    const heavy = withDensity(free, 2400);
    const back = withMotion(heavy, 'keyed');
    expect(back.density).toBe(2400);
    expect(withMotion(back, 'free').density).toBe(2400);
    expect(parses(withProp(doc, back))).toBe(true);
  });

  it('drops the start speed and spin when a release frame is set (they come from the keys) and keeps them otherwise', () => {
    const launched = withLaunch(withMotion(keyed, 'free'), [1.5, 2], 90);
    expect(launched.velocity).toEqual([1.5, 2]);
    expect(launched.spin).toBe(90);
    expect(parses(withProp(doc, launched))).toBe(true);
    const released = withRelease(launched, 1010);
    expect(released.releaseFrame).toBe(1010);
    expect(released.velocity).toBeUndefined();
    expect(released.spin).toBeUndefined();
    expect(parses(withProp(doc, released))).toBe(true);
    // the schema refuses speed and a release frame together: the helper is what keeps the scene valid
    expect(parses(withProp(doc, { ...launched, releaseFrame: 1010 }))).toBe(false);
    const unreleased = withRelease(released, null);
    expect(unreleased.releaseFrame).toBeUndefined();
    expect(parses(withProp(doc, unreleased))).toBe(true);
    // zero speed and spin are left out of the document
    const still = withLaunch(launched, [0, 0], 0);
    expect('velocity' in still || 'spin' in still).toBe(false);
  });

  it('names a problem in words exactly when the schema refuses the prop', () => {
    const free = withMotion(keyed, 'free');
    const cases: Prop[] = [
      keyed,
      free,
      { ...free, density: undefined },
      withDensity(free, 0.5),
      withDensity(free, 20001),
      withDensity(free, 20000),
      withRelease(free, 1020),
      { ...withRelease(free, 1020), keys: [] },
      { ...withRelease(free, 1020), spin: 10 },
      { ...keyed, keys: [] },
    ];
    for (const p of cases) {
      const problems = motionProblems(p, doc.timing);
      expect(problems.length === 0, JSON.stringify({ p, problems })).toBe(parses(withProp(doc, p)));
      for (const m of problems) {
        expect(m).not.toMatch(/[a-z][A-Z]|\w\.\d|props\./); // no camelCase field names, no dotted paths
        expect(m).toMatch(/^[A-Z].*\.$/); // a sentence
      }
    }
    // a release frame outside the shot's frames is a problem the schema does not catch, but the panel names it
    expect(motionProblems(withRelease(free, 990), doc.timing).join(' ')).toMatch(/within the scene's frames, 1001 to 1048/);
  });

  it("hints what the density does: the share under the surface at rest is ρ / 1000 (Archimedes' principle)", () => {
    // Archimedes: a floating body displaces its own weight, so submerged share = ρ_body / ρ_water (ρ_water = 1000 kg/m³)
    expect(densityHint(250)).toMatch(/Floats: at rest about 25 % of it/);
    expect(densityHint(750)).toMatch(/about 75 %/);
    expect(densityHint(1000)).toMatch(/neither floats up nor sinks/);
    expect(densityHint(7850)).toMatch(/^Sinks/);
    expect(densityHint(undefined)).toMatch(/Water is 1,000 kg\/m³/);
  });
});
