// A prop's motion as the Inspector edits it: keyed or free, a free prop's density, its speed and spin at the start,
// and an optional release frame (keyed up to it, free after it). Pure functions that return the changed prop (each
// change is one undoable command) and problems in words for the panel — never a field path.
import { PROP_DENSITY_RANGE, type Prop, type Scene } from '../scene/schema';

/** Density (kg/m³) a prop gets when first made free: floats about half under the surface (a light wood). */
export const FIRST_FREE_DENSITY = 500;

/** Density every liquid of a scene shares (kg/m³): water. */
export const LIQUID_DENSITY = 1000;

/**
 * The prop with `motion` set. Making a prop free gives it FIRST_FREE_DENSITY when it has no density yet; making it
 * keyed keeps density, speed, spin and release frame (the scene allows them on a keyed prop and ignores them), so
 * switching back and forth loses nothing.
 */
export function withMotion(prop: Prop, motion: Prop['motion']): Prop {
  if (motion === prop.motion) return prop;
  if (motion === 'keyed') return { ...prop, motion };
  return { ...prop, motion, density: prop.density ?? FIRST_FREE_DENSITY };
}

/** The prop with density `density` kg/m³. */
export function withDensity(prop: Prop, density: number): Prop {
  return { ...prop, density };
}

/**
 * The prop with a release frame (keyed up to it, free after it) or none (free from the first frame with its start
 * speed and spin). With a release frame the prop leaves with the speed its keys give it there, so its own start
 * speed and spin are dropped (the scene refuses both at once).
 */
export function withRelease(prop: Prop, releaseFrame: number | null): Prop {
  const { releaseFrame: _old, velocity, spin, ...rest } = prop;
  if (releaseFrame === null) return { ...rest, ...(velocity ? { velocity } : {}), ...(spin !== undefined ? { spin } : {}) };
  return { ...rest, releaseFrame };
}

/** The prop with its start speed (m/s, [across, up]) and spin (deg/s, counter-clockwise); zero values are left out. */
export function withLaunch(prop: Prop, velocity: [number, number], spin: number): Prop {
  const { velocity: _v, spin: _s, ...rest } = prop;
  return {
    ...rest,
    ...(velocity[0] !== 0 || velocity[1] !== 0 ? { velocity } : {}),
    ...(spin !== 0 ? { spin } : {}),
  };
}

const fmt = (n: number) => n.toLocaleString('en-GB');

/** One line on what a free prop of `density` kg/m³ does in the scene's liquids (all share 1000 kg/m³). */
export function densityHint(density: number | undefined): string {
  if (density === undefined || !Number.isFinite(density)) return `Water is ${fmt(LIQUID_DENSITY)} kg/m³: lighter floats, heavier sinks.`;
  // Archimedes: a floating body at rest displaces its own weight, so the share of it under the surface is ρ / ρ_liquid.
  if (density < LIQUID_DENSITY) return `Floats: at rest about ${Math.round((100 * density) / LIQUID_DENSITY)} % of it sits under the surface (water is ${fmt(LIQUID_DENSITY)} kg/m³).`;
  if (density === LIQUID_DENSITY) return `As dense as water (${fmt(LIQUID_DENSITY)} kg/m³): it neither floats up nor sinks.`;
  return `Sinks: heavier than water (${fmt(LIQUID_DENSITY)} kg/m³).`;
}

/** What is wrong with the prop's motion, in words for the Inspector (empty: nothing). */
export function motionProblems(prop: Prop, timing: Scene['timing']): string[] {
  const out: string[] = [];
  if (prop.motion === 'keyed') {
    if (prop.keys.length === 0) out.push('A keyed prop needs at least one key.');
    return out;
  }
  const { min, max } = PROP_DENSITY_RANGE;
  if (prop.density === undefined) out.push('A free prop needs a density.');
  else if (!(prop.density >= min && prop.density <= max)) out.push(`Density must be between ${fmt(min)} and ${fmt(max)} kg/m³.`);
  if (prop.releaseFrame !== undefined) {
    if (prop.keys.length === 0) out.push('Key the prop at least once: it follows its keys until the release frame.');
    if (prop.releaseFrame < timing.startFrame || prop.releaseFrame > timing.endFrame) {
      out.push(`The release frame must be within the scene's frames, ${timing.startFrame} to ${timing.endFrame}.`);
    }
    if (prop.velocity !== undefined || prop.spin !== undefined) {
      out.push('With a release frame the prop leaves with the speed its keys give it: clear the start speed and spin.');
    }
  }
  return out;
}
