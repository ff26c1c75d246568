// Words for the scene document's fields, for people: `spouts.0.endFrame` → "Spout 1 · end frame".
// Used wherever a schema path would otherwise reach a screen (save errors, the compare table, bake errors).

/** What each object group's items are called, singular. */
const GROUP_WORDS: Record<string, string> = {
  liquids: 'Liquid', pours: 'Standing liquid', spouts: 'Spout', walls: 'Wall', props: 'Prop', drains: 'Drain',
};

/** Section and field names in the trade's words (keys are the schema's names). */
const FIELD_WORDS: Record<string, string> = {
  tank: 'Tank', timing: 'Timing', physics: 'Physics', version: 'Scene format',
  // tank
  width: 'width', height: 'height', cellSize: 'cell size', sides: 'open and closed sides',
  left: 'left side', right: 'right side', bottom: 'floor', top: 'top',
  // timing
  fps: 'frame rate', startFrame: 'start frame', endFrame: 'end frame', substeps: 'substeps per frame',
  // physics
  gravity: 'gravity', flipRatio: 'FLIP / PIC blend', pressureIterations: 'pressure iterations (cap)',
  overRelaxation: 'over-relaxation', separationIterations: 'separation passes', driftCorrection: 'drift correction',
  particlesPerCell: 'particles per cell', particleRadius: 'particle radius', cfl: 'CFL limit', seed: 'seed',
  pressureSolver: 'pressure solver', pressureTolerance: 'pressure tolerance',
  // objects
  id: 'name', shape: 'shape', velocity: 'velocity', keys: 'keys', frame: 'frame', dx: 'offset across',
  dy: 'offset up', angle: 'angle', liquid: 'liquid', motion: 'motion', density: 'density',
  releaseFrame: 'release frame', spin: 'spin', name: 'name', colour: 'colour', viscosity: 'viscosity',
  // shapes
  type: 'shape type', x: 'x', y: 'y', radius: 'radius', points: 'points',
};

const titleCase = (s: string) => (s.length === 0 ? s : s[0].toUpperCase() + s.slice(1));
/** camelCase → "camel case" for a field we have no word for. */
const spaced = (s: string) => s.replace(/([a-z0-9])([A-Z])/g, '$1 $2').toLowerCase();

/**
 * A field path in words. Accepts the dotted form with indices (`spouts.0.endFrame`, from parse errors) and the
 * compare table's form with object names (`spouts[jet].velocity`). Indices count from 1 for people:
 * `spouts.0.endFrame` → "Spout 1 · end frame"; `props.1.keys.3.frame` → "Prop 2 · key 4 · frame";
 * `spouts[jet].velocity` → "Spout “jet” · velocity"; `physics.flipRatio` → "Physics · FLIP / PIC blend".
 */
export function fieldLabel(path: string): string {
  if (path === '' || path === '(document)') return 'Scene';
  const parts: string[] = [];
  const tokens = path.match(/[^.[\]]+|\[[^\]]*\]/g) ?? [];
  for (let k = 0; k < tokens.length; k++) {
    const t = tokens[k];
    const group = GROUP_WORDS[t];
    const next = tokens[k + 1];
    if (group && next !== undefined && /^\d+$/.test(next)) {
      parts.push(`${group} ${Number(next) + 1}`);
      k++;
    } else if (group && next?.startsWith('[')) {
      parts.push(`${group} “${next.slice(1, -1)}”`);
      k++;
    } else if (group) {
      parts.push(group === 'Standing liquid' ? 'Standing liquids' : `${group}s`);
    } else if (/^\d+$/.test(t)) {
      const prev = tokens[k - 1];
      if (prev === 'keys') parts[parts.length - 1] = `key ${Number(t) + 1}`;
      else if (prev === 'points') parts[parts.length - 1] = `point ${Number(t) + 1}`;
      else if (prev === 'gravity' || prev === 'velocity') parts[parts.length - 1] += t === '0' ? ' (across)' : ' (up)';
      else parts.push(`item ${Number(t) + 1}`);
    } else {
      const word = FIELD_WORDS[t] ?? spaced(t);
      parts.push(parts.length === 0 ? titleCase(word) : word);
    }
  }
  return parts.join(' · ');
}
