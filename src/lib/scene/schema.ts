// The scene document, version 2: one zod schema, its defaults and limits, and `parseScene`,
// which answers either the parsed scene or errors that name the path of each bad field.
// Version 1 documents (no liquids, every prop keyed) are migrated on read: see migrateV1.
// Units: metres, seconds, degrees; y up; origin at the tank's lower-left inner corner.
import { z } from 'zod';
import { shapeArea, polygonSignedArea } from './shapes';

/** Limits that keep one bake inside memory. */
export const SCENE_LIMITS = {
  maxCellsPerSide: 2000,
  maxParticles: 2_000_000,
  maxPolygonPoints: 1000,
  maxSubsteps: 200,
} as const;

/**
 * Pressure solvers (src/lib/sim/pressure.ts): over-relaxed Gauss–Seidel; conjugate gradient preconditioned
 * with MIC(0); conjugate gradient preconditioned with a multigrid V-cycle (McAdams, Sifakis & Teran 2010).
 */
export const PRESSURE_SOLVERS = ['gauss-seidel', 'pcg-mic0', 'pcg-multigrid'] as const;
export type PressureSolverName = (typeof PRESSURE_SOLVERS)[number];

/**
 * Default pressure tolerance: relative residual ‖b − A p‖₂ / ‖b‖₂ the solve must reach.
 * Chosen by measurement (src/cli/bench-sim.ts): 50 over-relaxed Gauss–Seidel sweeps (ω = 1.9) reach a
 * median of 0.07–0.11 per step (worst 0.3–0.5) on the reference dam break; CG + MIC(0) reaches 1e-2,
 * about ten times stricter, in about 13 iterations, in less CPU time than the 50 sweeps on the 1 m tank
 * and about the same on the 2 m tank.
 */
export const DEFAULT_PRESSURE_TOLERANCE = 1e-2;
/**
 * Default solver, chosen by measured speed at equal residual (see src/cli/bench-sim.ts). pcg-multigrid
 * (2026-12, a loaded 2-core machine, default tolerance, CPU s over 240 steps): 14.6 vs 15.1 on the 1 m dam
 * break, 94.9 vs 86.7 on the 2 m one; its per-solve lead on larger grids (bench-pressure.ts) is not yet a
 * lead over the whole step there, so MIC(0) stays the default.
 */
export const DEFAULT_PRESSURE_SOLVER: PressureSolverName = 'pcg-mic0';

const finite = z.number({ invalid_type_error: 'must be a number' }).finite('must be a finite number');
const positive = finite.positive('must be greater than 0');
const vec2 = z.tuple([finite, finite], { invalid_type_error: 'must be a pair [x, y]' });
const id = z.string().min(1, 'must not be empty').max(64, 'must be at most 64 characters');
const frameNumber = z.number().int('must be a whole frame number');

const rectShape = z.object({ type: z.literal('rect'), x: finite, y: finite, width: positive, height: positive }).strict();
const circleShape = z.object({ type: z.literal('circle'), x: finite, y: finite, radius: positive }).strict();
const polygonShape = z
  .object({
    type: z.literal('polygon'),
    points: z
      .array(vec2)
      .min(3, 'needs at least 3 points')
      .max(SCENE_LIMITS.maxPolygonPoints, `at most ${SCENE_LIMITS.maxPolygonPoints} points`)
      .refine((pts) => Math.abs(polygonSignedArea(pts)) > 0, 'polygon has zero area'),
  })
  .strict();

export const shapeSchema = z.discriminatedUnion('type', [rectShape, circleShape, polygonShape], {
  errorMap: (issue, ctx) =>
    issue.code === 'invalid_union_discriminator' ? { message: "type must be 'rect', 'circle' or 'polygon'" } : { message: ctx.defaultError },
});

const sidesSchema = z
  .object({ left: z.boolean().default(true), right: z.boolean().default(true), bottom: z.boolean().default(true), top: z.boolean().default(true) })
  .strict();

const tankSchema = z
  .object({
    width: positive,
    height: positive,
    cellSize: positive,
    sides: sidesSchema.default({}),
  })
  .strict();

const timingSchema = z
  .object({
    fps: positive.max(1000, 'must be at most 1000'),
    startFrame: frameNumber,
    endFrame: frameNumber,
    substeps: z.number().int('must be a whole number').min(1, 'must be at least 1').max(SCENE_LIMITS.maxSubsteps, `must be at most ${SCENE_LIMITS.maxSubsteps}`).default(5),
  })
  .strict();

const physicsSchema = z
  .object({
    gravity: vec2.default([0, -9.81]),
    flipRatio: finite.min(0, 'must be between 0 and 1').max(1, 'must be between 0 and 1').default(0.9),
    pressureIterations: z.number().int('must be a whole number').min(1, 'must be at least 1').max(10000, 'must be at most 10000').default(50),
    overRelaxation: finite.gt(0, 'must be in (0, 2)').lt(2, 'must be in (0, 2)').default(1.9),
    separationIterations: z.number().int('must be a whole number').min(0, 'must be at least 0').max(20, 'must be at most 20').default(2),
    // At most 2: the correction removes the fraction k of the density error each DRIFT_TIME, e ← (1 − k)·e, which
    // overshoots for k > 1 and grows without bound for k > 2 (the bake blows up; measured at 10).
    driftCorrection: finite.min(0, 'must be at least 0').max(2, 'must be at most 2').default(1.0),
    particlesPerCell: z
      .number()
      .int('must be a whole number')
      .refine((n) => [1, 4, 9, 16].includes(n), 'must be 1, 4, 9 or 16 (a square sub-grid per cell)')
      .default(4),
    particleRadius: finite.gt(0, 'must be greater than 0').max(0.5, 'must be at most 0.5 (a fraction of cellSize)').default(0.3),
    // At most 10 cells per step: beyond that particles jump over cells between transfers and fast liquid left the tank
    // (measured: a 12 m/s spout at CFL 100 lost 87 % of its liquid; at 10 it keeps it).
    cfl: positive.max(10, 'must be at most 10').default(1.0),
    seed: z.number().int('must be a whole number').min(0, 'must be at least 0').max(0xffffffff, 'must fit in 32 bits').default(1),
    pressureSolver: z.enum(PRESSURE_SOLVERS, { errorMap: () => ({ message: `must be one of ${PRESSURE_SOLVERS.join(', ')}` }) }).default(DEFAULT_PRESSURE_SOLVER),
    pressureTolerance: finite.gt(0, 'must be greater than 0').lt(1, 'must be less than 1').default(DEFAULT_PRESSURE_TOLERANCE),
  })
  .strict();

/** Current scene document version; version 1 documents are migrated on read. */
export const SCENE_VERSION = 2;

/**
 * Kinematic viscosity range, m²/s: 0 (inviscid) up to 1 (far thicker than syrup; beyond it the implicit
 * solve's matrix is dominated by the viscous term at any cell size we offer and nothing visible changes).
 */
export const VISCOSITY_RANGE = { min: 0, max: 1 } as const;
/** Free prop density range, kg/m³ (cork-like foam … denser than lead is never needed for previs). */
export const PROP_DENSITY_RANGE = { min: 1, max: 20000 } as const;

/** The liquid a scene has when it declares none (and every version 1 scene). */
export const DEFAULT_LIQUID = { id: 'water', name: 'Water', colour: '#3A8FB7', viscosity: 1e-6 } as const;

const colour = z.string({ invalid_type_error: 'must be a colour #RRGGBB' }).regex(/^#[0-9A-Fa-f]{6}$/, 'must be a colour #RRGGBB');

/** Fill colour of a prop that names none: a warm amber that stands out from blue liquid and most plates. */
export const DEFAULT_PROP_COLOUR = '#E3A83C';
/** How walls are drawn over the plate: an outline, filled, or not at all (the plate already shows them). */
export const WALL_STYLES = ['outline', 'fill', 'hidden'] as const;
export type WallStyle = (typeof WALL_STYLES)[number];
/** Range of look.foam: 0 turns foam and spray off, 1 is the default amount, 2 twice as much. */
export const FOAM_RANGE = { min: 0, max: 2 } as const;
/**
 * How the scene is drawn: `walls` defaults to 'outline' (never changes the bake); `foam` scales the foam and
 * spray the bake computes beside the liquid (sim/diffuse.ts; default 1, 0 = none; the liquid is unchanged).
 */
const lookSchema = z
  .object({
    walls: z.enum(WALL_STYLES, { errorMap: () => ({ message: "must be 'outline', 'fill' or 'hidden'" }) }).default('outline'),
    foam: finite
      .min(FOAM_RANGE.min, `must be between ${FOAM_RANGE.min} and ${FOAM_RANGE.max}`)
      .max(FOAM_RANGE.max, `must be between ${FOAM_RANGE.min} and ${FOAM_RANGE.max}`)
      .optional(),
  })
  .strict();

const liquidSchema = z
  .object({
    id,
    name: z.string().min(1, 'must not be empty').max(80, 'must be at most 80 characters'),
    colour,
    viscosity: finite
      .min(VISCOSITY_RANGE.min, `must be between ${VISCOSITY_RANGE.min} and ${VISCOSITY_RANGE.max} m²/s`)
      .max(VISCOSITY_RANGE.max, `must be between ${VISCOSITY_RANGE.min} and ${VISCOSITY_RANGE.max} m²/s`),
  })
  .strict();

/** `liquid` on pours and spouts: an id from `liquids`; filled with the first liquid's id when omitted. */
const liquidRef = id.optional();

const pourSchema = z.object({ id, liquid: liquidRef, shape: shapeSchema, velocity: vec2.default([0, 0]) }).strict();
const spoutSchema = z
  .object({ id, liquid: liquidRef, shape: shapeSchema, velocity: vec2, startFrame: frameNumber, endFrame: frameNumber })
  .strict()
  .refine((s) => s.endFrame >= s.startFrame, { message: 'endFrame must not be before startFrame', path: ['endFrame'] });
const wallSchema = z.object({ id, shape: shapeSchema }).strict();
const keySchema = z.object({ frame: finite, dx: finite.default(0), dy: finite.default(0), angle: finite.default(0) }).strict();
export const PROP_MOTIONS = ['keyed', 'free'] as const;
export type PropMotion = (typeof PROP_MOTIONS)[number];
/**
 * A prop follows its keys (`keyed`) or is a rigid body (`free`) of `density` kg/m³ that starts with
 * `velocity` (m/s) and `spin` (deg/s, counter-clockwise) at the start frame, or — with `releaseFrame` — follows its
 * keys up to that frame and is then free with the velocity the keys had there.
 */
const propSchema = z
  .object({
    id, shape: shapeSchema,
    /** Fill colour the player and exports draw the prop in (default DEFAULT_PROP_COLOUR); its rim with a picture. */
    colour: colour.optional(),
    /**
     * The prop drawn as a picture instead of its fill colour: the id of one of the studio's prop pictures (an
     * uploaded PNG or WebP with alpha, src/lib/server/prop-pictures.ts), fitted to the bounds of the drawn shape.
     * Omitted: the fill colour. Not part of the bake (sceneHash leaves it out).
     */
    picture: z
      .number({ invalid_type_error: 'must be the id of a prop picture' })
      .int('must be the id of a prop picture')
      .positive('must be the id of a prop picture')
      .optional(),
    motion: z.enum(PROP_MOTIONS, { errorMap: () => ({ message: "must be 'keyed' or 'free'" }) }).default('keyed'),
    keys: z.array(keySchema).max(10000, 'at most 10000 keys').default([]),
    density: finite
      .min(PROP_DENSITY_RANGE.min, `must be between ${PROP_DENSITY_RANGE.min} and ${PROP_DENSITY_RANGE.max} kg/m³`)
      .max(PROP_DENSITY_RANGE.max, `must be between ${PROP_DENSITY_RANGE.min} and ${PROP_DENSITY_RANGE.max} kg/m³`)
      .optional(),
    velocity: vec2.optional(),
    spin: finite.optional(),
    releaseFrame: frameNumber.optional(),
  })
  .strict()
  .superRefine((p, ctx) => {
    const issue = (path: (string | number)[], message: string) => ctx.addIssue({ code: z.ZodIssueCode.custom, path, message });
    // A keyed prop may keep density, velocity, spin and releaseFrame (unused while keyed), so switching
    // motion back and forth in the editor loses nothing.
    if (p.motion === 'keyed') {
      if (p.keys.length === 0) issue(['keys'], 'needs at least one key');
    } else {
      if (p.density === undefined) issue(['density'], 'is required for a free prop');
      if (p.releaseFrame !== undefined) {
        if (p.keys.length === 0) issue(['keys'], 'needs at least one key when the prop has a release frame');
        for (const f of ['velocity', 'spin'] as const) {
          if (p[f] !== undefined) issue([f], 'comes from the keys when the prop has a release frame');
        }
      }
    }
    for (let k = 1; k < p.keys.length; k++) {
      if (!(p.keys[k].frame > p.keys[k - 1].frame)) {
        ctx.addIssue({ code: z.ZodIssueCode.custom, path: ['keys', k, 'frame'], message: 'keys must be in increasing frame order' });
      }
    }
  });
const drainSchema = z.object({ id, shape: shapeSchema }).strict();

const sceneObject = z
  .object({
    version: z.literal(SCENE_VERSION, { errorMap: () => ({ message: 'must be 1 or 2 (this reader knows scene versions 1 and 2)' }) }),
    liquids: z.array(liquidSchema).min(1, 'needs at least one liquid').max(64, 'at most 64 liquids').default([{ ...DEFAULT_LIQUID }]),
    tank: tankSchema,
    timing: timingSchema.default({ fps: 24, startFrame: 1001, endFrame: 1048, substeps: 5 }),
    physics: physicsSchema.default({}),
    pours: z.array(pourSchema).default([]),
    spouts: z.array(spoutSchema).default([]),
    walls: z.array(wallSchema).default([]),
    props: z.array(propSchema).default([]),
    drains: z.array(drainSchema).default([]),
    look: lookSchema.optional(),
  })
  .strict();

/**
 * How a tank side of `length` m lies on cells of `cellSize` m: `cover` cells cover it (the last one partly
 * outside when the length is not a whole number of cells), `whole` of them lie entirely inside. A length
 * within 1e-6 (relative) of a whole number of cells counts as whole, so typed values such as 0.3 at 1/64
 * that are whole up to rounding get no sliver cell.
 */
export function cellFit(length: number, cellSize: number): { cover: number; whole: number } {
  const n = length / cellSize, r = Math.round(n);
  if (Math.abs(n - r) <= 1e-6 * Math.max(1, n)) return { cover: r, whole: r };
  return { cover: Math.ceil(n), whole: Math.floor(n) };
}

/**
 * Cells per side of the grid covering the tank interior (the solver adds a one-cell border). A tank need not
 * be a whole number of cells: the last column (row) then reaches past the tank's edge, and on a closed side
 * the solver makes that partial cell solid (see FlipState), so the liquid's wall is the last whole cell's face,
 * less than one cell inside the drawn edge.
 */
export function tankCells(tank: { width: number; height: number; cellSize: number }): { nx: number; ny: number } {
  return { nx: cellFit(tank.width, tank.cellSize).cover, ny: cellFit(tank.height, tank.cellSize).cover };
}

/** Upper estimate of the particles a scene can hold at once: pours plus every spout's emission. */
export function estimateParticles(scene: z.infer<typeof sceneObject>): number {
  const h = scene.tank.cellSize, ppc = scene.physics.particlesPerCell;
  const perArea = ppc / (h * h);
  let n = 0;
  for (const p of scene.pours) n += shapeArea(p.shape) * perArea;
  for (const s of scene.spouts) n += spoutEmissionEstimate(s, scene.timing.fps, h, ppc);
  return Math.ceil(n);
}

/**
 * Particles one spout can emit over its frame range: a refill of its area plus the flux
 * density·|velocity|·width over its duration (width = the shape's bounding-box diagonal), with 25 % margin.
 */
export function spoutEmissionEstimate(
  s: { shape: z.infer<typeof shapeSchema>; velocity: [number, number]; startFrame: number; endFrame: number },
  fps: number, cellSize: number, particlesPerCell: number,
): number {
  const perArea = particlesPerCell / (cellSize * cellSize);
  const area = shapeArea(s.shape);
  let w: number;
  if (s.shape.type === 'circle') w = 2 * s.shape.radius;
  else if (s.shape.type === 'rect') w = Math.hypot(s.shape.width, s.shape.height);
  else {
    let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
    for (const p of s.shape.points) { minX = Math.min(minX, p[0]); maxX = Math.max(maxX, p[0]); minY = Math.min(minY, p[1]); maxY = Math.max(maxY, p[1]); }
    w = Math.hypot(maxX - minX, maxY - minY);
  }
  const duration = (s.endFrame - s.startFrame + 1) / fps;
  const speed = Math.hypot(s.velocity[0], s.velocity[1]);
  return 1.25 * (area * perArea + perArea * speed * (w + cellSize) * duration) + 4 * particlesPerCell;
}

const refinedScene = sceneObject.superRefine((s, ctx) => {
  // Any tank size is accepted (see tankCells); it must hold at least 2 whole cells each way.
  const { nx, ny } = tankCells(s.tank);
  const wholeX = cellFit(s.tank.width, s.tank.cellSize).whole, wholeY = cellFit(s.tank.height, s.tank.cellSize).whole;
  if (wholeX < 2 || wholeY < 2) {
    ctx.addIssue({ code: z.ZodIssueCode.custom, path: ['tank', 'cellSize'], message: `tank must be at least 2 × 2 cells (is ${(s.tank.width / s.tank.cellSize).toFixed(2)} × ${(s.tank.height / s.tank.cellSize).toFixed(2)})` });
  }
  if (nx > SCENE_LIMITS.maxCellsPerSide || ny > SCENE_LIMITS.maxCellsPerSide) {
    ctx.addIssue({
      code: z.ZodIssueCode.custom, path: ['tank', 'cellSize'],
      message: `tank would be ${nx} × ${ny} cells; at most ${SCENE_LIMITS.maxCellsPerSide} × ${SCENE_LIMITS.maxCellsPerSide}`,
    });
  }
  if (s.timing.endFrame < s.timing.startFrame) {
    ctx.addIssue({ code: z.ZodIssueCode.custom, path: ['timing', 'endFrame'], message: 'endFrame must not be before startFrame' });
  }
  const n = estimateParticles(s);
  if (n > SCENE_LIMITS.maxParticles) {
    ctx.addIssue({
      code: z.ZodIssueCode.custom, path: s.spouts.length > 0 ? ['spouts'] : ['pours'],
      message: `pours and spouts would need about ${n.toLocaleString('en-US')} particles; at most ${SCENE_LIMITS.maxParticles.toLocaleString('en-US')}`,
    });
  }
  const liquidIds = new Map<string, number>();
  s.liquids.forEach((l, i) => {
    if (liquidIds.has(l.id)) ctx.addIssue({ code: z.ZodIssueCode.custom, path: ['liquids', i, 'id'], message: `id '${l.id}' is already used by liquids.${liquidIds.get(l.id)}` });
    else liquidIds.set(l.id, i);
  });
  for (const group of ['pours', 'spouts'] as const) {
    s[group].forEach((item, i) => {
      if (item.liquid !== undefined && !liquidIds.has(item.liquid)) {
        ctx.addIssue({
          code: z.ZodIssueCode.custom, path: [group, i, 'liquid'],
          message: `no liquid '${item.liquid}' in liquids (${[...liquidIds.keys()].map((k) => `'${k}'`).join(', ')})`,
        });
      }
    });
  }
  const seen = new Map<string, string>();
  for (const group of ['pours', 'spouts', 'walls', 'props', 'drains'] as const) {
    s[group].forEach((item, i) => {
      const prev = seen.get(item.id);
      if (prev !== undefined) {
        ctx.addIssue({ code: z.ZodIssueCode.custom, path: [group, i, 'id'], message: `id '${item.id}' is already used by ${prev}` });
      } else seen.set(item.id, `${group}.${i}`);
    });
  }
});

/** Fills each pour's and spout's `liquid` with the first liquid's id when omitted. */
export const sceneSchema = refinedScene.transform((s) => {
  const first = s.liquids[0].id;
  return {
    ...s,
    pours: s.pours.map((p) => ({ ...p, liquid: p.liquid ?? first })),
    spouts: s.spouts.map((p) => ({ ...p, liquid: p.liquid ?? first })),
  };
});

/** The parsed scene with every default filled in. */
export type Scene = z.infer<typeof sceneSchema>;
/** The scene as written by a user (defaults optional); version 1 documents are accepted too (see migrateV1). */
export type SceneInput = Omit<z.input<typeof sceneSchema>, 'version'> & { version: 1 | 2 };
export type Liquid = Scene['liquids'][number];
export type Pour = Scene['pours'][number];
export type ShapeDoc = z.infer<typeof shapeSchema>;
export type Prop = Scene['props'][number];
export type Spout = Scene['spouts'][number];
export type PropKey = Prop['keys'][number];

export interface SceneError { path: string; message: string }
export type ParseResult = { ok: true; scene: Scene } | { ok: false; errors: SceneError[] };

/** Dotted path with numeric indices, e.g. `pours.0.shape.radius` (the form react-hook-form uses). */
function pathString(path: (string | number)[]): string {
  return path.length === 0 ? '(document)' : path.join('.');
}

/**
 * Parses and validates a scene document (a JSON string or an already-parsed value).
 * Returns `{ ok: true, scene }` with defaults filled in, or `{ ok: false, errors }` naming each bad field's path.
 */
export function parseScene(input: unknown): ParseResult {
  let value = input;
  if (typeof input === 'string') {
    try {
      value = JSON.parse(input);
    } catch (e) {
      return { ok: false, errors: [{ path: '(document)', message: `not valid JSON: ${(e as Error).message}` }] };
    }
  }
  const migrated = migrateV1(value);
  if (!migrated.ok) return migrated;
  const r = sceneSchema.safeParse(migrated.value);
  if (r.success) return { ok: true, scene: r.data };
  const errors = r.error.issues.map((iss) => ({ path: pathString(iss.path), message: iss.message }));
  return { ok: false, errors };
}

/** Fields a version 1 document cannot have (they came with version 2). */
const V2_ONLY = { top: ['liquids'], pours: ['liquid'], spouts: ['liquid'], props: ['motion', 'density', 'velocity', 'spin', 'releaseFrame', 'picture'] } as const;

/**
 * Version 1 → 2 on read: a version 1 document is a version 2 document with one water liquid (DEFAULT_LIQUID)
 * that every pour and spout uses and every prop keyed, so migration only sets `version: 2` and lets the
 * defaults fill the rest. A version 1 document that already uses a version 2 field is refused at that field.
 * Anything that is not a version 1 object passes through unchanged.
 */
export function migrateV1(value: unknown): { ok: true; value: unknown } | { ok: false; errors: SceneError[] } {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) return { ok: true, value };
  const doc = value as Record<string, unknown>;
  if (doc.version !== 1) return { ok: true, value };
  const errors: SceneError[] = [];
  const v2 = 'needs scene version 2 (a version 1 document has one water liquid and keyed props only)';
  for (const f of V2_ONLY.top) if (f in doc) errors.push({ path: f, message: v2 });
  for (const group of ['pours', 'spouts', 'props'] as const) {
    const items = doc[group];
    if (!Array.isArray(items)) continue;
    items.forEach((it, i) => {
      if (it === null || typeof it !== 'object') return;
      for (const f of V2_ONLY[group]) if (f in (it as object)) errors.push({ path: `${group}.${i}.${f}`, message: v2 });
    });
  }
  if (errors.length > 0) return { ok: false, errors };
  return { ok: true, value: { ...doc, version: SCENE_VERSION } };
}

/** One line summarising parse errors, e.g. for a CLI: `physics.flipRatio: must be between 0 and 1; …`. */
export function formatSceneErrors(errors: SceneError[]): string {
  return errors.map((e) => `${e.path}: ${e.message}`).join('; ');
}
