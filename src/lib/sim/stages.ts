// The FLIP step as named stages over flat typed arrays (Zhu & Bridson 2005, "Animating sand as a fluid";
// FLIP from Brackbill & Ruppel 1986). Each stage is a plain function of the solver state.
// Coordinates: particles in tank metres (origin at the tank's inner lower-left corner, y up).
// Grid: MAC, nx × ny cells including a one-cell border; cell (i, j) covers x ∈ [(i−1)h, i·h],
// y ∈ [(j−1)h, j·h]; u[c] lives on its left face, v[c] on its bottom face, c = i + nx·j.
import type { Scene, ShapeDoc } from '../scene/schema';
import { tankCells, cellFit, spoutEmissionEstimate, SCENE_LIMITS } from '../scene/schema';
import { shapeSignedDistance, pointInShape, shapeBounds, shapeCentroid } from '../scene/shapes';
import { type Key, type Pose } from '../scene/keys';
import { propPoseInto, type PropLike } from '../scene/pose';
import { mulberry32 } from './prng';
import { FLUID as FLUID_CELL, AIR as AIR_CELL, SOLID as SOLID_CELL, solvePoisson, type ProjectionGrid } from './pressure';
import { Bilinear, U_FACES, V_FACES, CENTRES } from './kernel';

// Module-local copies of imported constants read in per-particle and per-cell loops: tsx (the bench, the CLI and
// the bake worker) runs this code as CommonJS, where every read of an imported binding is a getter call that
// V8 does not inline (about 15 % of a step when read inside the loops).
const FLUID = FLUID_CELL, AIR = AIR_CELL, SOLID = SOLID_CELL;
const UFX = U_FACES[0], UFY = U_FACES[1], VFX = V_FACES[0], VFY = V_FACES[1], CX = CENTRES[0], CY = CENTRES[1];

/** Density of water, kg/m³ (handbook value at about 20 °C is 998; 1000 is the customary round value). */
export const WATER_DENSITY = 1000;

export interface SolverOptions {
  /** Seeding jitter as a fraction of the sub-cell spacing (0 = regular layout). Default 0.5. */
  seedingJitter?: number;
  /** Spatial-hash cell size as a multiple of the contact distance 2r (must be > 1). Default 1.1. */
  hashCellFactor?: number;
  /**
   * Check the state after every stage (validate.ts) and throw at the first broken invariant. Slow; for
   * debugging. Default: on when the environment variable TIDEMARK_VALIDATE is 1.
   */
  validate?: boolean;
}

export interface PropRuntime {
  shape: ShapeDoc;
  keys: Key[];
  /** The scene's prop (motion, release frame) for the shared pose function. */
  doc: PropLike;
  cx: number; cy: number; // drawn centroid (m)
  reach: number; // max distance from centroid to the drawn bounds' corners (m)
  // placement at the end of the current step: world = R·(drawn − c) + c + d
  dx: number; dy: number; cos: number; sin: number; angle: number;
  // rigid velocity over the current step: translation (m/s) and angular velocity (rad/s)
  vx: number; vy: number; omega: number;
  /** True once a free prop is released: rigid.ts moves it, its keys no longer do. */
  free: boolean;
  /**
   * Impulse (N·s per unit depth) and its moment about the centroid (N·s·m) that this substep's collision stage
   * gave the particles it pushed out of the prop, with the opposite sign: what they give the prop (rigid.ts).
   */
  jx: number; jy: number; jw: number;
}

interface SpoutRuntime {
  vx: number; vy: number;
  /** Index into scene.liquids of what it emits. */
  liquid: number;
  startFrame: number; endFrame: number;
  cells: Int32Array; // grid cells holding emission samples
  sampleStart: Int32Array; // per cell, offset into sx/sy (length cells+1)
  sx: Float64Array; sy: Float64Array;
}

/** All solver state: allocated once in the constructor, reused by every step. */
export class FlipState implements ProjectionGrid {
  // constants
  readonly h: number; readonly invH: number;
  readonly nx: number; readonly ny: number; readonly nc: number;
  /**
   * Extent of the liquid's room, m: particles stay in [0, width] × [0, height] (closed sides clamp, open sides
   * remove beyond). The tank's own size when it is a whole number of cells; otherwise see the constructor.
   */
  readonly width: number; readonly height: number;
  /** A closed right side (top side) whose last grid column (row) is only partly inside the tank: made solid. */
  private readonly partialRight: boolean; private readonly partialTop: boolean;
  readonly radius: number; readonly ppc: number;
  readonly gx: number; readonly gy: number;
  readonly flipRatio: number; readonly drift: number;
  readonly sides: { left: boolean; right: boolean; bottom: boolean; top: boolean };
  // particles (structure of arrays, capacity `cap`, first `n` valid)
  readonly cap: number;
  n = 0;
  x: Float32Array; y: Float32Array; u: Float32Array; v: Float32Array; ids: Int32Array;
  /** Per particle: index into scene.liquids of its liquid (kept in the order of x/y/u/v; never changes). */
  liquid: Uint8Array;
  private x2: Float32Array; private y2: Float32Array; private u2: Float32Array; private v2: Float32Array; private ids2: Int32Array;
  private liquid2: Uint8Array;
  /** Number of liquids of the scene. */
  readonly liquidCount: number;
  readonly key: Int32Array;
  nextId = 0;
  // spatial hash (padded by one empty column on the right and one empty row on top)
  readonly hs: number; readonly invHs: number; readonly hnx: number; readonly hny: number;
  readonly hstart: Int32Array; readonly hcursor: Int32Array;
  // grid (ProjectionGrid uses u/v names for the grid velocities)
  readonly gu: Float64Array; readonly gv: Float64Array;
  readonly wu: Float64Array; readonly wv: Float64Array;
  readonly prevU: Float64Array; readonly prevV: Float64Array;
  readonly dens: Float64Array;
  readonly open: Float64Array;
  /** Free surface (surface.ts): signed distance at cell centres (m) and the projection's face weights. */
  readonly phi: Float64Array; readonly faceU: Float64Array; readonly faceV: Float64Array;
  readonly type: Uint8Array;
  readonly solid: Uint8Array; readonly staticSolid: Uint8Array;
  /**
   * Open share of each cell (1 − the part its walls and props cover, from the outline's distance at the cell
   * centre: clamp(½ + φ/h, 0, 1)) and, folded like the density (foldSolidDensity), the share of ρ₀ a cell's
   * density reads when the liquid around it is at rest: the free surface and the drift correction compare
   * with ρ₀ × restShare (see depositDensity). 1 away from solids.
   */
  readonly staticOpen: Float64Array; readonly openShare: Float64Array; readonly restShare: Float64Array;
  /** True when some cell's restShare differs from 1 (a wall or prop). */
  hasShares = false;
  readonly solidU: Float64Array; readonly solidV: Float64Array;
  readonly nearSolid: Uint8Array; readonly staticNearSolid: Uint8Array;
  readonly drainCell: Uint8Array;
  /** Drift correction: divergence target per cell (m/s) and its displacement potential (warm start). */
  readonly driftTarget: Float64Array; readonly driftPotential: Float64Array;
  /** Per face: the position correction's displacement velocity (m/s; gridToParticles). */
  readonly dispU: Float64Array; readonly dispV: Float64Array;
  readonly fluid: Int32Array; fluidCount = 0;
  readonly q: Float64Array; readonly res: Float64Array; readonly zv: Float64Array;
  readonly dir: Float64Array; readonly adir: Float64Array; readonly precon: Float64Array; readonly diag: Float64Array;
  lastIterations = 0;
  restDensity = 0;
  lastDt = 0;
  maxSpeed = 0;
  // scene objects
  readonly walls: ShapeDoc[];
  readonly props: PropRuntime[];
  readonly drains: ShapeDoc[];
  readonly spouts: SpoutRuntime[];
  readonly spoutOf: Int32Array; // per cell: 1 + spout index while active, else 0
  readonly cellCount: Int32Array;
  emissionDropped = 0;
  private readonly rand: () => number;
  private readonly jitter: number;
  private readonly pose: Pose = { dx: 0, dy: 0, angle: 0 };
  readonly normal = new Float64Array(2);
  /** The bilinear kernel of every particle ↔ grid transfer (kernel.ts). */
  readonly kernel: Bilinear;

  constructor(scene: Scene, opts: SolverOptions = {}) {
    const { tank, physics } = scene;
    this.h = tank.cellSize; this.invH = 1 / this.h;
    const cells = tankCells(tank);
    this.nx = cells.nx + 2; this.ny = cells.ny + 2; this.nc = this.nx * this.ny;
    this.kernel = new Bilinear(this.nx, this.ny, this.invH);
    // A tank that is not a whole number of cells (0.6 m at 1/256 m): the grid covers it (tankCells rounds up)
    // and the last column (row), partly beyond the tank's edge, is solid on a closed side, so the wall the
    // pressure, density and particles all see is the last whole cell's face, less than one cell inside the
    // drawn edge (like every wall, which is rasterised by cell centres). On an open side that cell stays open
    // and particles leave at the drawn edge. Whole-cell tanks are unchanged.
    const fitX = cellFit(tank.width, this.h), fitY = cellFit(tank.height, this.h);
    this.partialRight = tank.sides.right && fitX.whole < fitX.cover;
    this.partialTop = tank.sides.top && fitY.whole < fitY.cover;
    this.width = fitX.whole === fitX.cover ? cells.nx * this.h : this.partialRight ? fitX.whole * this.h : tank.width;
    this.height = fitY.whole === fitY.cover ? cells.ny * this.h : this.partialTop ? fitY.whole * this.h : tank.height;
    this.radius = physics.particleRadius * this.h;
    this.ppc = physics.particlesPerCell;
    this.gx = physics.gravity[0]; this.gy = physics.gravity[1];
    this.flipRatio = physics.flipRatio; this.drift = physics.driftCorrection;
    this.sides = { ...tank.sides };
    this.rand = mulberry32(physics.seed);
    this.jitter = opts.seedingJitter ?? 0.5;

    const nc = this.nc;
    const f64 = () => new Float64Array(nc);
    this.gu = f64(); this.gv = f64(); this.wu = f64(); this.wv = f64(); this.prevU = f64(); this.prevV = f64();
    this.dens = f64(); this.open = f64(); this.solidU = f64(); this.solidV = f64();
    this.driftTarget = f64(); this.driftPotential = f64(); this.dispU = f64(); this.dispV = f64();
    this.phi = f64(); this.faceU = f64(); this.faceV = f64();
    this.staticOpen = f64(); this.openShare = f64(); this.restShare = f64();
    this.q = f64(); this.res = f64(); this.zv = f64(); this.dir = f64(); this.adir = f64(); this.precon = f64(); this.diag = f64();
    this.type = new Uint8Array(nc); this.solid = new Uint8Array(nc); this.staticSolid = new Uint8Array(nc);
    this.nearSolid = new Uint8Array(nc); this.staticNearSolid = new Uint8Array(nc); this.drainCell = new Uint8Array(nc);
    this.fluid = new Int32Array(nc); this.spoutOf = new Int32Array(nc); this.cellCount = new Int32Array(nc);

    this.walls = scene.walls.map((w) => w.shape);
    this.drains = scene.drains.map((d) => d.shape);
    this.props = scene.props.map((p) => {
      const [cx, cy] = shapeCentroid(p.shape);
      const b = shapeBounds(p.shape);
      const reach = Math.max(Math.hypot(b.minX - cx, b.minY - cy), Math.hypot(b.maxX - cx, b.minY - cy),
        Math.hypot(b.minX - cx, b.maxY - cy), Math.hypot(b.maxX - cx, b.maxY - cy));
      return { shape: p.shape, keys: p.keys, doc: p, cx, cy, reach, dx: 0, dy: 0, cos: 1, sin: 0, angle: 0, vx: 0, vy: 0, omega: 0, free: false, jx: 0, jy: 0, jw: 0 };
    });
    this.buildStaticSolids();
    const startFrame = scene.timing.startFrame;
    for (const p of this.props) this.placeProp(p, startFrame, startFrame, 1);
    this.liquidCount = scene.liquids.length;
    this.spouts = scene.spouts.map((s) => this.buildSpout(s, liquidIndex(scene, s.liquid)));

    // hash: cell size ≥ 2r so every contact lies in the 3×3 block of hash cells
    this.hs = Math.max(2 * this.radius * Math.max(1.0001, opts.hashCellFactor ?? 1.1), 1e-9);
    this.invHs = 1 / this.hs;
    this.hnx = Math.ceil((this.width + 2 * this.h) / this.hs) + 2;
    this.hny = Math.ceil((this.height + 2 * this.h) / this.hs) + 2;
    this.hstart = new Int32Array(this.hnx * this.hny + 1);
    this.hcursor = new Int32Array(this.hnx * this.hny);

    // capacity: pours + every spout's emission over its frame range, bounded
    const seeds = this.seedPours(scene, true);
    let cap = seeds;
    for (const s of scene.spouts) cap += Math.ceil(spoutEmissionEstimate(s, scene.timing.fps, this.h, this.ppc));
    this.cap = Math.max(1, Math.min(cap, Math.max(seeds, SCENE_LIMITS.maxParticles)));
    const f32 = () => new Float32Array(this.cap);
    this.x = f32(); this.y = f32(); this.u = f32(); this.v = f32(); this.ids = new Int32Array(this.cap);
    this.x2 = f32(); this.y2 = f32(); this.u2 = f32(); this.v2 = f32(); this.ids2 = new Int32Array(this.cap);
    this.liquid = new Uint8Array(this.cap); this.liquid2 = new Uint8Array(this.cap);
    this.key = new Int32Array(this.cap);
    this.seedPours(scene, false);
  }

  /** Grid cell index of tank point (x, y), clamped to the grid. */
  cellOf(x: number, y: number): number {
    let i = Math.floor(x * this.invH) + 1, j = Math.floor(y * this.invH) + 1;
    i = i < 0 ? 0 : i > this.nx - 1 ? this.nx - 1 : i;
    j = j < 0 ? 0 : j > this.ny - 1 ? this.ny - 1 : j;
    return i + this.nx * j;
  }

  /** Border cells on closed sides and cells whose centre lies in a wall are solid; near-solid marks cells to test. */
  private buildStaticSolids(): void {
    const { nx, ny, h, staticSolid, staticNearSolid, drainCell, sides } = this;
    for (let j = 0; j < ny; j++) {
      for (let i = 0; i < nx; i++) {
        const c = i + nx * j;
        let s = 0;
        if (i === 0 && sides.left) s = 1;
        if (i === nx - 1 && sides.right) s = 1;
        if (j === 0 && sides.bottom) s = 1;
        if (j === ny - 1 && sides.top) s = 1;
        if ((i === nx - 2 && this.partialRight) || (j === ny - 2 && this.partialTop)) s = 1;
        const cx = (i - 0.5) * h, cy = (j - 0.5) * h;
        let open = s === 1 ? 0 : 1;
        for (const w of this.walls) {
          if (pointInShape(w, cx, cy)) s = 1;
          open = Math.min(open, openShareAt(shapeSignedDistance(w, cx, cy, this.normal), h));
        }
        staticSolid[c] = s;
        this.staticOpen[c] = open;
      }
    }
    const margin = this.radius + 1.5 * h;
    const mark = (arr: Uint8Array, shape: ShapeDoc) => {
      const b = shapeBounds(shape);
      this.markBox(arr, b.minX - margin, b.minY - margin, b.maxX + margin, b.maxY + margin);
    };
    for (const w of this.walls) mark(staticNearSolid, w);
    for (const d of this.drains) mark(drainCell, d);
    this.solid.set(staticSolid);
    this.nearSolid.set(staticNearSolid);
    this.openShare.set(this.staticOpen);
    this.hasShares = this.walls.length > 0 || this.props.length > 0;
    updateRestShare(this);
  }

  /** Sets arr[c] = 1 for every cell overlapping the box (tank metres). */
  markBox(arr: Uint8Array, x0: number, y0: number, x1: number, y1: number): void {
    const { nx, ny, invH } = this;
    const i0 = Math.max(0, Math.floor(x0 * invH) + 1), i1 = Math.min(nx - 1, Math.floor(x1 * invH) + 1);
    const j0 = Math.max(0, Math.floor(y0 * invH) + 1), j1 = Math.min(ny - 1, Math.floor(y1 * invH) + 1);
    for (let j = j0; j <= j1; j++) for (let i = i0; i <= i1; i++) arr[i + nx * j] = 1;
  }

  /** Places a prop at the pose of frame f1 and sets its rigid velocity from the pose change over dt seconds since f0. */
  placeProp(p: PropRuntime, f0: number, f1: number, dt: number): void {
    if (p.free) return; // a released free prop keeps the pose rigid.ts gave it
    const pose = this.pose;
    propPoseInto(p.doc, f0, pose);
    const dx0 = pose.dx, dy0 = pose.dy, a0 = (pose.angle * Math.PI) / 180;
    propPoseInto(p.doc, f1, pose);
    const a1 = (pose.angle * Math.PI) / 180;
    p.dx = pose.dx; p.dy = pose.dy; p.angle = a1; p.cos = Math.cos(a1); p.sin = Math.sin(a1);
    p.vx = (pose.dx - dx0) / dt; p.vy = (pose.dy - dy0) / dt; p.omega = (a1 - a0) / dt;
  }

  /** Signed distance (m) from world point to a placed prop; writes the world outward normal into this.normal. */
  propDistance(p: PropRuntime, x: number, y: number): number {
    const rx = x - p.cx - p.dx, ry = y - p.cy - p.dy;
    // drawn = Rᵀ·(world − c − d) + c
    const lx = p.cos * rx + p.sin * ry + p.cx, ly = -p.sin * rx + p.cos * ry + p.cy;
    const n = this.normal;
    const d = shapeSignedDistance(p.shape, lx, ly, n);
    const nx = n[0], ny = n[1];
    n[0] = p.cos * nx - p.sin * ny; n[1] = p.sin * nx + p.cos * ny;
    return d;
  }

  /** True when world point (x, y) is inside any wall or placed prop. */
  insideSolidShape(x: number, y: number): boolean {
    for (const w of this.walls) if (pointInShape(w, x, y)) return true;
    for (const p of this.props) if (this.propDistance(p, x, y) < 0) return true;
    return false;
  }

  /** Seeds the pours on a k×k sub-grid per cell (jittered); with countOnly, only counts. Returns the count. */
  private seedPours(scene: Scene, countOnly: boolean): number {
    const { h, ppc } = this;
    const k = Math.round(Math.sqrt(ppc)), sub = h / k;
    const nxIn = this.nx - 2, nyIn = this.ny - 2;
    let n = 0;
    if (scene.pours.length === 0) return 0;
    const bounds = scene.pours.map((p) => shapeBounds(p.shape));
    const pourLiquid = scene.pours.map((p) => liquidIndex(scene, p.liquid));
    for (let j = 0; j < nyIn; j++) {
      for (let i = 0; i < nxIn; i++) {
        for (let b = 0; b < k; b++) {
          for (let a = 0; a < k; a++) {
            const px = i * h + (a + 0.5) * sub, py = j * h + (b + 0.5) * sub;
            if (px > this.width || py > this.height) continue; // in a partial cell beyond the liquid's room
            let which = -1;
            for (let s = 0; s < scene.pours.length; s++) {
              const bb = bounds[s];
              if (px < bb.minX || px > bb.maxX || py < bb.minY || py > bb.maxY) continue;
              if (pointInShape(scene.pours[s].shape, px, py)) { which = s; break; }
            }
            if (which < 0 || this.insideSolidShape(px, py)) continue;
            if (!countOnly) {
              const jx = (this.rand() - 0.5) * this.jitter * sub, jy = (this.rand() - 0.5) * this.jitter * sub;
              const vel = scene.pours[which].velocity;
              this.x[n] = px + jx; this.y[n] = py + jy; this.u[n] = vel[0]; this.v[n] = vel[1];
              this.ids[n] = this.nextId++;
              this.liquid[n] = pourLiquid[which];
            }
            n++;
          }
        }
      }
    }
    if (!countOnly) this.n = n;
    return n;
  }

  /** Emission samples of a spout: sub-grid points inside its shape and the tank, outside walls, grouped by cell. */
  private buildSpout(s: Scene['spouts'][number], liquid: number): SpoutRuntime {
    const { h, ppc } = this;
    const k = Math.round(Math.sqrt(ppc)), sub = h / k;
    const b = shapeBounds(s.shape);
    const cells: number[] = [], starts: number[] = [], sx: number[] = [], sy: number[] = [];
    const i0 = Math.max(0, Math.floor(b.minX / h)), i1 = Math.min(this.nx - 3, Math.floor(b.maxX / h));
    const j0 = Math.max(0, Math.floor(b.minY / h)), j1 = Math.min(this.ny - 3, Math.floor(b.maxY / h));
    for (let j = j0; j <= j1; j++) {
      for (let i = i0; i <= i1; i++) {
        const before = sx.length;
        for (let bb = 0; bb < k; bb++) for (let a = 0; a < k; a++) {
          const px = i * h + (a + 0.5) * sub, py = j * h + (bb + 0.5) * sub;
          if (px > this.width || py > this.height) continue; // in a partial cell beyond the liquid's room
          if (pointInShape(s.shape, px, py) && !this.walls.some((w) => pointInShape(w, px, py))) { sx.push(px); sy.push(py); }
        }
        if (sx.length > before) { cells.push(i + 1 + this.nx * (j + 1)); starts.push(before); }
      }
    }
    starts.push(sx.length);
    return {
      vx: s.velocity[0], vy: s.velocity[1], liquid, startFrame: s.startFrame, endFrame: s.endFrame,
      cells: Int32Array.from(cells), sampleStart: Int32Array.from(starts), sx: Float64Array.from(sx), sy: Float64Array.from(sy),
    };
  }

  /** Reorders particle arrays by hash cell (stable counting sort); afterwards hash cell c holds particles [hstart[c], hstart[c+1]). */
  sortByHashCell(): void {
    const { n, hnx, hny, invHs, h, hstart, hcursor, key } = this;
    const x = this.x, y = this.y;
    const hnc = hnx * hny, maxI = hnx - 2, maxJ = hny - 2;
    hstart.fill(0);
    // key = hash cell of the particle, with the grid's origin at (−h, −h)
    for (let p = 0; p < n; p++) {
      let i = Math.floor((x[p] + h) * invHs), j = Math.floor((y[p] + h) * invHs);
      i = i < 0 ? 0 : i > maxI ? maxI : i;
      j = j < 0 ? 0 : j > maxJ ? maxJ : j;
      const c = i + hnx * j;
      key[p] = c;
      hstart[c + 1]++;
    }
    for (let c = 0; c < hnc; c++) { hstart[c + 1] += hstart[c]; hcursor[c] = hstart[c]; }
    const u = this.u, v = this.v, ids = this.ids, liq = this.liquid;
    const x2 = this.x2, y2 = this.y2, u2 = this.u2, v2 = this.v2, ids2 = this.ids2, liq2 = this.liquid2;
    for (let p = 0; p < n; p++) {
      const d = hcursor[key[p]]++;
      x2[d] = x[p]; y2[d] = y[p]; u2[d] = u[p]; v2[d] = v[p]; ids2[d] = ids[p]; liq2[d] = liq[p];
    }
    this.x = x2; this.y = y2; this.u = u2; this.v = v2; this.ids = ids2; this.liquid = liq2;
    this.x2 = x; this.y2 = y; this.u2 = u; this.v2 = v; this.ids2 = ids; this.liquid2 = liq;
  }

  /** Removes particle p by moving the last particle into its slot. */
  removeAt(p: number): void {
    const last = --this.n;
    this.x[p] = this.x[last]; this.y[p] = this.y[last]; this.u[p] = this.u[last]; this.v[p] = this.v[last];
    this.ids[p] = this.ids[last]; this.liquid[p] = this.liquid[last];
  }

  /** Appends a particle of liquid index `liquid`; returns false when the capacity is reached. */
  add(x: number, y: number, u: number, v: number, liquid = 0): boolean {
    if (this.n >= this.cap) { this.emissionDropped++; return false; }
    const p = this.n++;
    this.x[p] = x; this.y[p] = y; this.u[p] = u; this.v[p] = v; this.ids[p] = this.nextId++; this.liquid[p] = liquid;
    return true;
  }

  /** Particles of each liquid (index into scene.liquids), counted now. */
  liquidCounts(): number[] {
    const counts = new Array<number>(this.liquidCount).fill(0);
    const liq = this.liquid;
    for (let p = 0; p < this.n; p++) counts[liq[p]]++;
    return counts;
  }

  jitterOffset(): number { return (this.rand() - 0.5) * this.jitter; }
}

/** Index into scene.liquids of liquid id `id` (the schema guarantees it exists; 0 otherwise). */
export function liquidIndex(scene: Scene, id: string): number {
  return Math.max(0, scene.liquids.findIndex((l) => l.id === id));
}

/**
 * Stage 1 — integrate. Semi-implicit (symplectic) Euler, position first:
 *   x ← x + v·dt   with v the projected (divergence-free) velocity of the previous step,
 *   v ← v + g·dt   the external force at the new position; the projection below adds −∇p·dt/ρ.
 * Moving with the projected velocity means liquid at rest stays at rest (gravity is balanced by the
 * pressure before anything moves); a blob in free flight lags the exact path by g·t·dt/2 (first order).
 */
export function integrate(S: FlipState, dt: number): void {
  const { n, x, y, u, v } = S;
  const gdx = S.gx * dt, gdy = S.gy * dt;
  for (let p = 0; p < n; p++) {
    const up = u[p], vp = v[p];
    x[p] += up * dt; y[p] += vp * dt;
    u[p] = up + gdx; v[p] = vp + gdy;
  }
}

/**
 * Stage 2 — separate. For every pair closer than the contact distance 2r, move both particles apart along
 * the line of centres by half the overlap each: Δ = ½(2r − d)·(x_j − x_i)/d (Gauss–Seidel order, in place).
 * Particles are sorted by hash cell, so each cell's particles are contiguous; each pair is visited once:
 * j > i in the same and the right cell (one contiguous range), then the three cells of the row above
 * (another contiguous range). Hash cells are ≥ 2r, so no contact is missed at the step's start.
 */
export function separate(S: FlipState, iterations: number): void {
  const { hnx, hny, hstart } = S;
  const x = S.x, y = S.y;
  const minDist = 2 * S.radius, min2 = minDist * minDist;
  for (let it = 0; it < iterations; it++) {
    for (let cy = 0; cy < hny - 1; cy++) {
      for (let cx = 0; cx < hnx - 1; cx++) {
        const c = cx + hnx * cy;
        const a = hstart[c], b = hstart[c + 1];
        if (a === b) continue;
        const sameEnd = hstart[c + 2]; // same cell then right neighbour
        const upLo = hstart[c + hnx - (cx > 0 ? 1 : 0)], upHi = hstart[c + hnx + 2];
        for (let i = a; i < b; i++) {
          let xi = x[i], yi = y[i];
          for (let j = i + 1; j < sameEnd; j++) {
            let dx = x[j] - xi, dy = y[j] - yi;
            const d2 = dx * dx + dy * dy;
            if (d2 >= min2 || d2 === 0) continue;
            const d = Math.sqrt(d2), f = (0.5 * (minDist - d)) / d;
            dx *= f; dy *= f;
            xi -= dx; yi -= dy;
            x[j] += dx; y[j] += dy;
          }
          for (let j = upLo; j < upHi; j++) {
            let dx = x[j] - xi, dy = y[j] - yi;
            const d2 = dx * dx + dy * dy;
            if (d2 >= min2 || d2 === 0) continue;
            const d = Math.sqrt(d2), f = (0.5 * (minDist - d)) / d;
            dx *= f; dy *= f;
            xi -= dx; yi -= dy;
            x[j] += dx; y[j] += dy;
          }
          x[i] = xi; y[i] = yi;
        }
      }
    }
  }
}

/**
 * Places moving props at the pose of frame f1 and rasterises solids: solid = static solids ∪ cells whose
 * centre lies inside a placed prop; such cells carry the prop's rigid velocity v = v_T + ω × (x − x_c).
 */
export function placeSolids(S: FlipState, f0: number, f1: number, dt: number): void {
  if (S.props.length === 0) return;
  const { nx, h, solid, solidU, solidV, nearSolid } = S;
  solid.set(S.staticSolid);
  nearSolid.set(S.staticNearSolid);
  S.openShare.set(S.staticOpen);
  solidU.fill(0); solidV.fill(0);
  const margin = S.radius + 1.5 * h;
  for (const p of S.props) {
    S.placeProp(p, f0, f1, dt);
    const wx = p.cx + p.dx, wy = p.cy + p.dy, R = p.reach;
    S.markBox(nearSolid, wx - R - margin, wy - R - margin, wx + R + margin, wy + R + margin);
    const i0 = Math.max(1, Math.floor((wx - R) / h) + 1), i1 = Math.min(nx - 2, Math.floor((wx + R) / h) + 1);
    const j0 = Math.max(1, Math.floor((wy - R) / h) + 1), j1 = Math.min(S.ny - 2, Math.floor((wy + R) / h) + 1);
    for (let j = j0; j <= j1; j++) {
      for (let i = i0; i <= i1; i++) {
        const cxm = (i - 0.5) * h, cym = (j - 0.5) * h;
        const c = i + nx * j;
        const phi = S.propDistance(p, cxm, cym);
        const open = openShareAt(phi, h);
        if (open < S.openShare[c]) S.openShare[c] = open;
        if (phi >= 0) continue;
        solid[c] = 1;
        solidU[c] = p.vx - p.omega * (cym - wy);
        solidV[c] = p.vy + p.omega * (cxm - wx);
      }
    }
  }
  updateRestShare(S);
}

/**
 * Stage 3 — collide. Tank: closed sides clamp x to [r, W − r] (and y likewise) and zero that velocity
 * component; particles beyond an open side are removed. Walls and props: a particle closer than r to the
 * surface (signed distance φ < r) moves out along the normal n by r − φ, and its velocity relative to the
 * solid loses its inward normal part: (v − v_s)·n < 0 → v ← v − ((v − v_s)·n)·n. Drains remove particles.
 */
export function collide(S: FlipState): void {
  const { width: W, height: H, radius: r, sides, nearSolid, drainCell, walls, props, drains, normal } = S;
  const lo = r, hiX = W - r, hiY = H - r;
  const testShapes = walls.length + props.length > 0, testDrains = drains.length > 0;
  // mass of a particle per unit depth, kg/m: ρ_water·h²/ρ₀ (ρ₀ in particles per cell; the seeding's before it is fixed)
  const mp = (WATER_DENSITY * S.h * S.h) / (S.restDensity > 0 ? S.restDensity : S.ppc);
  const x = S.x, y = S.y, u = S.u, v = S.v;
  let p = 0;
  while (p < S.n) {
    let px = x[p], py = y[p];
    let remove = false;
    if (px < lo) { if (sides.left) { px = lo; u[p] = 0; } else if (px < 0) remove = true; }
    else if (px > hiX) { if (sides.right) { px = hiX; u[p] = 0; } else if (px > W) remove = true; }
    if (py < lo) { if (sides.bottom) { py = lo; v[p] = 0; } else if (py < 0) remove = true; }
    else if (py > hiY) { if (sides.top) { py = hiY; v[p] = 0; } else if (py > H) remove = true; }
    if (!remove && (testShapes || testDrains)) {
      const c = S.cellOf(px, py);
      if (testShapes && nearSolid[c] !== 0) {
        for (let w = 0; w < walls.length; w++) {
          const phi = shapeSignedDistance(walls[w], px, py, normal);
          if (phi < r) {
            const nx = normal[0], ny = normal[1];
            px += (r - phi) * nx; py += (r - phi) * ny;
            const vn = u[p] * nx + v[p] * ny;
            if (vn < 0) { u[p] -= vn * nx; v[p] -= vn * ny; }
          }
        }
        for (let k = 0; k < props.length; k++) {
          const pr = props[k];
          const phi = S.propDistance(pr, px, py);
          if (phi < r) {
            const nx = normal[0], ny = normal[1];
            px += (r - phi) * nx; py += (r - phi) * ny;
            const wx = pr.cx + pr.dx, wy = pr.cy + pr.dy;
            const sx = pr.vx - pr.omega * (py - wy), sy = pr.vy + pr.omega * (px - wx);
            const vn = (u[p] - sx) * nx + (v[p] - sy) * ny;
            if (vn < 0) {
              u[p] -= vn * nx; v[p] -= vn * ny;
              // Newton's third law: the particle's momentum change −vn·n·m_p is taken from a free prop
              if (pr.free) { const jx = vn * nx * mp, jy = vn * ny * mp; pr.jx += jx; pr.jy += jy; pr.jw += (px - wx) * jy - (py - wy) * jx; }
            }
          }
        }
        // a solid may have pushed the particle through a closed side: clamp again
        if (sides.left && px < lo) px = lo;
        if (sides.right && px > hiX) px = hiX;
        if (sides.bottom && py < lo) py = lo;
        if (sides.top && py > hiY) py = hiY;
      }
      if (testDrains && drainCell[c] !== 0) {
        for (let d = 0; d < drains.length; d++) if (pointInShape(drains[d], px, py)) { remove = true; break; }
      }
    }
    if (!(px >= -S.h && px <= W + S.h && py >= -S.h && py <= H + S.h)) remove = true; // also catches NaN
    if (remove) { S.removeAt(p); continue; }
    x[p] = px; y[p] = py;
    p++;
  }
}

/**
 * Stage 4 — emit. While a spout is active (frameNow ∈ [startFrame, endFrame + 1)), particles in its cells
 * take its velocity, and each cell is refilled to its number of inside sub-grid samples (jittered), so the
 * spout delivers about density·|v|·width per second.
 */
export function emit(S: FlipState, frameNow: number): void {
  if (S.spouts.length === 0) return;
  const { spoutOf, cellCount, h } = S;
  let any = false;
  for (let s = 0; s < S.spouts.length; s++) {
    const sp = S.spouts[s];
    const active = frameNow >= sp.startFrame && frameNow < sp.endFrame + 1;
    for (let k = 0; k < sp.cells.length; k++) {
      const c = sp.cells[k];
      spoutOf[c] = active ? s + 1 : 0;
      cellCount[c] = 0;
    }
    any = any || active;
  }
  if (!any) return;
  const n = S.n, x = S.x, y = S.y, u = S.u, v = S.v;
  for (let p = 0; p < n; p++) {
    const c = S.cellOf(x[p], y[p]);
    const s = spoutOf[c];
    if (s === 0) continue;
    cellCount[c]++;
    const sp = S.spouts[s - 1];
    u[p] = sp.vx; v[p] = sp.vy;
  }
  const sub = h / Math.round(Math.sqrt(S.ppc));
  for (let s = 0; s < S.spouts.length; s++) {
    const sp = S.spouts[s];
    if (!(frameNow >= sp.startFrame && frameNow < sp.endFrame + 1)) continue;
    for (let k = 0; k < sp.cells.length; k++) {
      const c = sp.cells[k];
      if (spoutOf[c] !== s + 1) continue; // cell shared with an earlier spout
      const a = sp.sampleStart[k], b = sp.sampleStart[k + 1];
      for (let m = a + cellCount[c]; m < b; m++) {
        if (!S.add(sp.sx[m] + S.jitterOffset() * sub, sp.sy[m] + S.jitterOffset() * sub, sp.vx, sp.vy, sp.liquid)) return;
      }
    }
  }
}

/**
 * Stage 5 — particle to grid. Cell types (solid / fluid where a particle lies / air), then each staggered
 * component is the bilinear-weighted average of particle velocities: u_f = Σ w_pf u_p / Σ w_pf.
 * Faces touching a solid cell take the solid's velocity. A copy is kept for the FLIP update.
 * The same pass deposits the particles' density at the cell centres (stage 6 folds it at solids), so the
 * particles are read once for both.
 */
export function particlesToGrid(S: FlipState): void {
  const { n, nx, ny, nc, type, solid, gu, gv, wu, wv, prevU, prevV, open, solidU, solidV, dens, kernel: K } = S;
  const x = S.x, y = S.y, u = S.u, v = S.v;
  for (let c = 0; c < nc; c++) {
    const s = solid[c];
    type[c] = s !== 0 ? SOLID : AIR;
    open[c] = s !== 0 ? 0 : 1;
  }
  gu.fill(0); gv.fill(0); wu.fill(0); wv.fill(0); dens.fill(0);
  for (let p = 0; p < n; p++) {
    const cell = K.at(x[p], y[p]);
    if (type[cell] === AIR) type[cell] = FLUID;
    K.splatFacesAndCentre(gu, wu, u[p], gv, wv, v[p], dens);
  }
  for (let j = 0; j < ny; j++) {
    for (let i = 0, c = nx * j; i < nx; i++, c++) {
      let uf = wu[c] > 0 ? gu[c] / wu[c] : 0;
      let vf = wv[c] > 0 ? gv[c] / wv[c] : 0;
      const sc = solid[c];
      // u face between c−1 and c; v face between c−nx and c
      const sl = i > 0 ? solid[c - 1] : sc, sb = j > 0 ? solid[c - nx] : sc;
      if (sc !== 0 || sl !== 0) uf = sc !== 0 && sl !== 0 ? 0.5 * (solidU[c] + solidU[i > 0 ? c - 1 : c]) : sc !== 0 ? solidU[c] : solidU[c - 1];
      if (sc !== 0 || sb !== 0) vf = sc !== 0 && sb !== 0 ? 0.5 * (solidV[c] + solidV[j > 0 ? c - nx : c]) : sc !== 0 ? solidV[c] : solidV[c - nx];
      gu[c] = uf; gv[c] = vf;
      prevU[c] = uf; prevV[c] = vf;
    }
  }
}

/**
 * Stage 6 — density at cell centres: ρ_c = Σ_p w_pc (bilinear, in particles per cell; deposited by stage 5,
 * folded here as depositDensity folds it); the rest density ρ₀ is fixed the first time liquid is present
 * (see estimateRestDensity), then the drift target (see driftTarget).
 */
export function densityAndDrift(S: FlipState, dt: number): void {
  foldSolidDensity(S, S.dens);
  if (S.restDensity === 0) S.restDensity = estimateRestDensity(S);
  driftTarget(S, dt);
}

/** ρ_c = Σ_p w_pc at cell centres (bilinear weights; particles per cell) into S.dens. */
export function depositDensity(S: FlipState): void {
  const { n, dens, kernel: K } = S;
  const x = S.x, y = S.y;
  dens.fill(0);
  for (let p = 0; p < n; p++) {
    K.at(x[p], y[p]);
    K.nodes(CX, CY); K.splatWeight(dens);
  }
  foldSolidDensity(S, dens);
}

/**
 * Mirror (ghost-particle) correction at solids: a particle within half a cell of a wall puts part of its
 * kernel mass on the solid cell's centre, so the liquid cell beside the wall reads low (about 7/8 of ρ₀ for
 * liquid at rest against a flat wall) and the drift correction would compress the liquid against every wall.
 * Reflecting the particle across the cell face moves exactly that weight onto the liquid cell: for a wall
 * along cell faces the image of the solid node is its face neighbour on the liquid side. So each solid cell's
 * deposit goes to its non-solid face neighbours (shared equally), or to its non-solid diagonal neighbours at
 * a corner, and the solid cell keeps none. Exact for the tank sides; cell-rasterised walls and props get the
 * same rule along their staircase outline.
 */
function foldSolidDensity(S: FlipState, dens: Float64Array): void {
  const { nx, ny, solid } = S;
  for (let j = 0; j < ny; j++) {
    for (let i = 0, c = nx * j; i < nx; i++, c++) {
      const m = dens[c];
      if (m === 0 || solid[c] === 0) continue;
      const l = i > 0 && solid[c - 1] === 0, r = i < nx - 1 && solid[c + 1] === 0;
      const b = j > 0 && solid[c - nx] === 0, t = j < ny - 1 && solid[c + nx] === 0;
      let k = (l ? 1 : 0) + (r ? 1 : 0) + (b ? 1 : 0) + (t ? 1 : 0);
      if (k > 0) {
        const share = m / k;
        if (l) dens[c - 1] += share;
        if (r) dens[c + 1] += share;
        if (b) dens[c - nx] += share;
        if (t) dens[c + nx] += share;
        dens[c] = 0;
        continue;
      }
      const lb = i > 0 && j > 0 && solid[c - 1 - nx] === 0, rb = i < nx - 1 && j > 0 && solid[c + 1 - nx] === 0;
      const lt = i > 0 && j < ny - 1 && solid[c - 1 + nx] === 0, rt = i < nx - 1 && j < ny - 1 && solid[c + 1 + nx] === 0;
      k = (lb ? 1 : 0) + (rb ? 1 : 0) + (lt ? 1 : 0) + (rt ? 1 : 0);
      if (k === 0) continue; // inside a solid block: no liquid side to mirror onto
      const share = m / k;
      if (lb) dens[c - 1 - nx] += share;
      if (rb) dens[c + 1 - nx] += share;
      if (lt) dens[c - 1 + nx] += share;
      if (rt) dens[c + 1 + nx] += share;
      dens[c] = 0;
    }
  }
}

/** Open share of a cell whose centre lies at signed distance φ (m) from a solid's outline (see FlipState.openShare). */
function openShareAt(phi: number, h: number): number {
  const f = 0.5 + phi / h;
  return f < 0 ? 0 : f > 1 ? 1 : f;
}

/**
 * restShare = openShare folded onto the non-solid cells as foldSolidDensity folds the density: liquid at rest
 * beside an outline that crosses a cell off its faces reads (½ + φ/h)·ρ₀ there (between ½ and 1½ ρ₀),
 * not ρ₀, and the free surface and drift correction must not read that as air or as compression.
 */
export function updateRestShare(S: FlipState): void {
  if (!S.hasShares) { S.restShare.fill(1); return; }
  S.restShare.set(S.openShare);
  foldSolidDensity(S, S.restShare);
  for (let c = 0; c < S.nc; c++) if (S.solid[c] === 0 && S.restShare[c] < 0.25) S.restShare[c] = 0.25;
}

/** Cell types from the current particles: solid, fluid (a particle inside) or air; what particlesToGrid marks. */
export function classifyCells(S: FlipState): void {
  const { n, nc, type, solid, kernel: K } = S;
  const x = S.x, y = S.y;
  for (let c = 0; c < nc; c++) type[c] = solid[c] !== 0 ? SOLID : AIR;
  for (let p = 0; p < n; p++) {
    const cell = K.at(x[p], y[p]);
    if (type[cell] === AIR) type[cell] = FLUID;
  }
}

/**
 * Rest density ρ₀ (particles per cell) from S.dens and S.type: the mean over fluid cells whose four
 * neighbours are fluid (all fluid cells if none); 0 when there is no liquid. The solver fixes ρ₀ at the
 * first step that has liquid (stage 6 of step 1 for poured liquid: after that step's separation, the
 * spacing the particles keep from then on), as the textbook code does.
 */
export function estimateRestDensity(S: FlipState): number {
  const { nx, ny, dens, type } = S;
  let sumIn = 0, cntIn = 0, sumAll = 0, cntAll = 0;
  for (let j = 1; j < ny - 1; j++) for (let i = 1, c = 1 + nx * j; i < nx - 1; i++, c++) {
    if (type[c] !== FLUID) continue;
    sumAll += dens[c]; cntAll++;
    if (type[c - 1] === FLUID && type[c + 1] === FLUID && type[c - nx] === FLUID && type[c + nx] === FLUID) { sumIn += dens[c]; cntIn++; }
  }
  return cntIn > 0 ? sumIn / cntIn : cntAll > 0 ? sumAll / cntAll : 0;
}

/**
 * Drift target (the density correction of Zhu & Bridson's drift, applied as a displacement):
 *   target_c = k·(ρ_c/ρ₀ − 1)·h/max(dt, DRIFT_TIME)  (m/s),
 * the velocity divergence that would remove the fraction k of the density error in DRIFT_TIME (or one longer step). Interior
 * cells are driven both ways (under-dense interior cells contract, so random particle packing does not
 * slowly inflate the liquid); cells touching air only when over-dense (the free surface is under-dense).
 * The projection does not see it: gridToParticles moves the particles by the flow it asks for over dt.
 */
/**
 * The drift correction's time scale, s: it removes the fraction k of the density error per DRIFT_TIME (or per step
 * when steps are longer). 1/240 s: ten substeps of a 24 fps shot, twice the default 5, so ordinary bakes keep their correction.
 * Why not the step itself: when the drift flow entered the grid velocity (tidemark-flip/1 and /2), the PIC/FLIP
 * transfer kept it as particle momentum, and scaled by h/dt its speed grew as 1/dt whenever the CFL condition added
 * substeps — the feedback that blew fast-impact bakes up (16 → 1,600 m/s in 13 frames on a prop crashing into a
 * pool). It no longer enters velocities (gridToParticles), and the time scale keeps the correction per second the same.
 */
export const DRIFT_TIME = 1 / 240;

export function driftTarget(S: FlipState, dt: number): void {
  const { nx, ny, dens, type, driftTarget: target, restShare } = S;
  const rest = S.restDensity;
  const k = rest > 0 ? (S.drift * S.h) / (Math.max(dt, DRIFT_TIME) * rest) : 0;
  target.fill(0);
  if (k === 0) return;
  for (let j = 1; j < ny - 1; j++) {
    for (let i = 1, c = 1 + nx * j; i < nx - 1; i++, c++) {
      if (type[c] !== FLUID) continue;
      const excess = dens[c] - rest * restShare[c];
      // interior cells (no air neighbour) are driven both ways; cells at the free surface only when over-dense
      const interior = type[c - 1] !== AIR && type[c + 1] !== AIR && type[c - nx] !== AIR && type[c + nx] !== AIR;
      target[c] = excess > 0 || interior ? k * excess : 0;
    }
  }
}

/**
 * Loosest relative residual the drift solve stops at (it uses the scene's pressure tolerance when that is
 * looser). The correction removes a fraction of a density error per DRIFT_TIME; solving its potential tighter
 * than 1 % changes no visible result, while a scene that asks its projection for 1e-6 (or the 50-sweep
 * textbook setting, whose tolerance is 1e-12) paid every substep for a drift solve run to the iteration cap:
 * 42 % of the step at that setting. Our own choice (no source): the default pressure tolerance, at which the
 * validation tests were measured.
 */
export const DRIFT_TOLERANCE = 1e-2;

/**
 * Stage 8 — the drift correction's displacement potential: A·s = drift target with the projection's own matrix
 * (solvePoisson; warm-started from the last step's s), for stage 9's position correction, to the relative
 * residual max(tolerance, DRIFT_TOLERANCE). Solved before the transfer back to the particles so that stage 9
 * reads the grid once.
 */
export function driftSolve(S: FlipState, iterations: number, tolerance: number): void {
  const s = S.driftPotential;
  const tol = tolerance > DRIFT_TOLERANCE ? tolerance : DRIFT_TOLERANCE;
  if (S.drift > 0 && S.restDensity > 0 && S.fluidCount > 0) solvePoisson(S, s, S.driftTarget, iterations, tol);
  else s.fill(0);
}

/**
 * Stage 9 — grid to particle, velocities then positions, in one pass over the particles.
 *
 * Velocities, with the PIC/FLIP blend (Zhu & Bridson 2005):
 *   v_p ← (1 − α)·v_PIC + α·(v_p + Δv_grid),  α = flipRatio,
 * with bilinear weights restricted to faces that touch liquid or solid (faces between two air cells are
 * undefined and never used). Also records the maximum particle speed (m/s).
 *
 * Positions: two displacements that move particles and never enter their velocities (so FLIP cannot keep
 * them as momentum).
 * 1. The trapezoidal position update. Stage 1 moved each particle by v_n·dt; the step's change of velocity,
 *    Δv = g·dt + Δv_grid (gravity, then the projection's change of the face velocities), is known only now.
 *    Adding ½Δv·dt gives x_{n+1} = x_n + ½(v_n + v_{n+1})·dt, the trapezoidal rule (second order; Hairer,
 *    Lubich & Wanner, Geometric Numerical Integration, 2006, §II.1), instead of x_n + v_n·dt, whose positions
 *    lag the velocities by half a step: a dam break read +1.1 % of its energy after one frame from that lag
 *    alone (K + P measured with v_{n+1} but positions of about t_{n+½}). Liquid at rest stays at rest
 *    (Δv_grid = −g·dt there), and a blob in free fall (Δv_grid = 0) follows y0 + v0·t − g·t²/2 exactly.
 * 2. The drift correction: the flow u_d = −w_f·∇s with A·s = drift target (stage 8), applied over dt as a
 *    displacement, as in the density-projection of Kugelstadt, Longva, Thuerey & Bender 2019 ("Implicit
 *    density projection for volume conserving liquids", IEEE TVCG 27).
 * Both are interpolated bilinearly over the faces the velocity transfer uses (weight 1; 0 on a solid's faces);
 * a particle with none (spray) only gets the gravity half-step ½g·dt². The particle's stencil is placed once
 * for its velocity and its displacement (the particle does not move in between).
 */
export function gridToParticles(S: FlipState, dt: number): void {
  const { n, nx, ny, type, gu, gv, wu, wv, prevU, prevV, dispU, dispV, faceU, faceV, flipRatio, driftPotential: s, kernel: K } = S;
  const x = S.x, y = S.y, u = S.u, v = S.v;
  // per face: wu = 1 if usable, gu = u·wu, prevU = (u − u_old)·wu, and the displacement velocity
  // dispU = ½(g·dt + Δv_grid) + u_d (m/s) on the inner faces (a solid's face, weight 0, holds 0: liquid
  // touching a wall neither moves into it nor gains a half-step there; the grid's outer row and column keep Δv_grid)
  const gu2 = 0.5 * S.gx * dt, gv2 = 0.5 * S.gy * dt;
  for (let j = 0; j < ny; j++) {
    for (let i = 0, c = nx * j; i < nx; i++, c++) {
      const tc = type[c];
      const okU = tc !== AIR || (i > 0 && type[c - 1] !== AIR) ? 1 : 0;
      const okV = tc !== AIR || (j > 0 && type[c - nx] !== AIR) ? 1 : 0;
      const du = okU * (gu[c] - prevU[c]), dv = okV * (gv[c] - prevV[c]);
      wu[c] = okU; prevU[c] = du; gu[c] *= okU;
      wv[c] = okV; prevV[c] = dv; gv[c] *= okV;
      if (i > 0 && j > 0) {
        dispU[c] = faceU[c] > 0 ? okU * (gu2 + 0.5 * du - faceU[c] * (s[c] - s[c - 1])) : 0;
        dispV[c] = faceV[c] > 0 ? okV * (gv2 + 0.5 * dv - faceV[c] * (s[c] - s[c - nx])) : 0;
      } else {
        dispU[c] = du; dispV[c] = dv;
      }
    }
  }
  const pic = 1 - flipRatio;
  const hx = gu2 * dt, hy = gv2 * dt; // spray: no face used, gravity's half-step only
  let max2 = 0;
  for (let p = 0; p < n; p++) {
    K.at(x[p], y[p]);
    // u: weights restricted to usable faces (wu = 0 or 1)
    K.nodes(UFX, UFY);
    let ws = K.gather(wu);
    let up = u[p], ddx = hx;
    if (ws > 0) {
      const inv = 1 / ws;
      up = pic * (K.gather(gu) * inv) + flipRatio * (up + K.gather(prevU) * inv);
      u[p] = up;
      ddx = (K.gather(dispU) / ws) * dt;
    }
    // v
    K.nodes(VFX, VFY);
    ws = K.gather(wv);
    let vp = v[p], ddy = hy;
    if (ws > 0) {
      const inv = 1 / ws;
      vp = pic * (K.gather(gv) * inv) + flipRatio * (vp + K.gather(prevV) * inv);
      v[p] = vp;
      ddy = (K.gather(dispV) / ws) * dt;
    }
    x[p] += ddx; y[p] += ddy;
    const s2 = up * up + vp * vp;
    if (s2 > max2) max2 = s2;
  }
  S.maxSpeed = Math.sqrt(max2);
}
