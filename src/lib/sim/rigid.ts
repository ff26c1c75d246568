// Free props: rigid bodies two-way coupled to the liquid.
//
// Coupling method: weak (partitioned) coupling — the prop is a moving solid in the projection (its cells carry
// its rigid velocity as the boundary condition, so it pushes the liquid), and the liquid's pressure from that
// projection is integrated over the prop's boundary faces into a force and torque that move the prop in the
// next step (the pressure-integration coupling of Guendelman, Selle, Losasso & Fedkiw 2005, "Coupling water and
// smoke to thin deformable and rigid shells", SIGGRAPH 2005). Chosen over Carlson, Mucha & Turk 2004 ("Rigid fluid") because
// it needs no change to the pressure solve (a variable-density projection), which other work owns.
// A partitioned scheme is unstable for props lighter than the liquid they move (the added-mass instability,
// Förster, Wall & Ramm 2007, "Artificial added mass instabilities in sequential staggered coupling…", CMAME 196);
// it is stabilised here by adding the mass of the displaced liquid (the wetted share of ρ_water·area) to the
// prop's inertia. The added mass changes how fast a prop gets somewhere, never where it comes to rest:
// at rest the pressure force balances gravity whatever the inertia.
// Known limit (measured, tests/sim/free-props.test.ts): the force uses the projection's pressure and is bounded
// (see measureForces); props of 500–750 kg/m³ float about 0.04 m high of their Archimedes draft on a 1/64 m grid,
// and props of 250 kg/m³ are not yet stable. Sinking, free fall and contacts are right.
// Units per unit depth (the solver is 2D): mass kg/m, force N/m, moment of inertia kg·m.
// Contacts (tank sides, walls, keyed props, other free props): boundary sample points pushed out along the
// obstacle's normal, with inelastic impulses (restitution 0) and Coulomb friction, so props come to rest.
import type { Scene, Prop } from '../scene/schema';
import { shapeArea, shapeSignedDistance } from '../scene/shapes';
import { type FlipState, type PropRuntime, WATER_DENSITY } from './stages';
import { FLUID, AIR } from './pressure';

/** Friction coefficient of prop contacts (common practice (no source): wood or plastic on wet surfaces). */
const FRICTION = 0.4;
/**
 * Added-mass factor: the prop's inertia gains ADDED_MASS × the wetted share of ρ_water × its area. The
 * projection's impulsive reaction on a prop in a closed tank measured up to about 8 × ρ_water·area (a 0.4 × 0.2 m
 * box 0.3 m above the floor of a 1 m tank); the partitioned step is stable while that stays below twice the
 * inertia used (Förster et al. 2007), so 6 leaves margin. Tuned by measurement, not from a source.
 */
const ADDED_MASS = 6;
/** Speed (m/s) below which a prop in contact is stopped. */
const REST_SPEED = 1e-3;
/** Penetration (m) left uncorrected between two free props. */
const CONTACT_SLOP = 2e-4;
/** Contact iterations per substep. */
const CONTACT_PASSES = 4;

interface Body {
  prop: PropRuntime;
  doc: Prop;
  /** Mass and moment of inertia about the centroid, per unit depth. */
  m: number; I: number;
  /** Boundary sample points in drawn coordinates relative to the centroid. */
  sx: Float64Array; sy: Float64Array;
  /** Pressure force and torque from the last projection (N/m, N). */
  fx: number; fy: number; tau: number;
  /** Share of boundary faces wetted in the last projection (0…1). */
  wet: number;
  /** Touched an obstacle in this substep's contact passes. */
  touching: boolean;
}

/** Pose and velocity of a prop for FrameStats: centroid (tank m), angle (deg), velocity (m/s), spin (deg/s). */
export interface PropState { id: string; x: number; y: number; angle: number; vx: number; vy: number; spin: number }

const DEG = 180 / Math.PI;

/** Second moment of area about the centroid (m⁴ per unit depth → × density gives kg·m). */
function polarMoment(shape: Prop['shape'], cx: number, cy: number): number {
  switch (shape.type) {
    case 'rect': return (shape.width * shape.height * (shape.width ** 2 + shape.height ** 2)) / 12;
    case 'circle': return (Math.PI * shape.radius ** 4) / 2;
    case 'polygon': {
      // J = 1/12 Σ cross_i (x_i² + x_i x_{i+1} + x_{i+1}² + y_i² + y_i y_{i+1} + y_{i+1}²) about the centroid
      let j = 0;
      const pts = shape.points;
      for (let i = 0; i < pts.length; i++) {
        const ax = pts[i][0] - cx, ay = pts[i][1] - cy, bx = pts[(i + 1) % pts.length][0] - cx, by = pts[(i + 1) % pts.length][1] - cy;
        const cr = ax * by - bx * ay;
        j += cr * (ax * ax + ax * bx + bx * bx + ay * ay + ay * by + by * by);
      }
      return Math.abs(j) / 12;
    }
  }
}

/** Points along the shape's outline, relative to the centroid, spaced about half a cell. */
function boundarySamples(shape: Prop['shape'], cx: number, cy: number, h: number): { sx: Float64Array; sy: Float64Array } {
  const xs: number[] = [], ys: number[] = [];
  const edge = (ax: number, ay: number, bx: number, by: number) => {
    const n = Math.max(1, Math.ceil(Math.hypot(bx - ax, by - ay) / (0.5 * h)));
    for (let k = 0; k < n; k++) { xs.push(ax + ((bx - ax) * k) / n - cx); ys.push(ay + ((by - ay) * k) / n - cy); }
  };
  if (shape.type === 'rect') {
    const { x, y, width: w, height: hh } = shape;
    edge(x, y, x + w, y); edge(x + w, y, x + w, y + hh); edge(x + w, y + hh, x, y + hh); edge(x, y + hh, x, y);
  } else if (shape.type === 'circle') {
    const n = Math.max(16, Math.ceil((2 * Math.PI * shape.radius) / (0.5 * h)));
    for (let k = 0; k < n; k++) { const t = (2 * Math.PI * k) / n; xs.push(shape.radius * Math.cos(t) + shape.x - cx); ys.push(shape.radius * Math.sin(t) + shape.y - cy); }
  } else {
    const p = shape.points;
    for (let i = 0; i < p.length; i++) edge(p[i][0], p[i][1], p[(i + 1) % p.length][0], p[(i + 1) % p.length][1]);
  }
  return { sx: Float64Array.from(xs), sy: Float64Array.from(ys) };
}

export interface RigidBodies {
  /** Before placeSolids: releases props whose release frame has come, then moves every free prop over dt. */
  advance(dt: number, f0: number): void;
  /** After the projection: the liquid's pressure force and torque on every free prop. */
  measureForces(): void;
  /** Pose and velocity of every prop (keyed and free), in scene order. */
  states(): PropState[];
}

export function createRigidBodies(S: FlipState, scene: Scene): RigidBodies {
  const bodies: Body[] = [];
  scene.props.forEach((doc, k) => {
    if (doc.motion !== 'free') return;
    const prop = S.props[k];
    const rho = doc.density ?? WATER_DENSITY;
    const { sx, sy } = boundarySamples(doc.shape, prop.cx, prop.cy, S.h);
    bodies.push({ prop, doc, m: rho * shapeArea(doc.shape), I: rho * polarMoment(doc.shape, prop.cx, prop.cy), sx, sy, fx: 0, fy: 0, tau: 0, wet: 0, touching: false });
    if (doc.releaseFrame === undefined) {
      prop.free = true;
      prop.vx = doc.velocity?.[0] ?? 0; prop.vy = doc.velocity?.[1] ?? 0; prop.omega = (doc.spin ?? 0) / DEG;
    }
  });
  const normal = new Float64Array(2);
  const { width: W, height: H, sides } = S;

  function setAngle(p: PropRuntime, a: number): void { p.angle = a; p.cos = Math.cos(a); p.sin = Math.sin(a); }

  /** Applies an impulse (jx, jy) at world offset (rx, ry) from the centroid. */
  function impulse(b: Body, rx: number, ry: number, jx: number, jy: number, sign: number): void {
    const p = b.prop;
    p.vx += (sign * jx) / b.m; p.vy += (sign * jy) / b.m;
    p.omega += (sign * (rx * jy - ry * jx)) / b.I;
  }

  /**
   * One contact of body a at world point (px, py), pushed out by `depth` along (nx, ny) (pointing away from the
   * obstacle); the obstacle is body o (free, movable) or a solid moving with velocity (ox, oy) + ω_o × r.
   */
  function contact(a: Body, px: number, py: number, nx: number, ny: number, depth: number, o: Body | null, kin: PropRuntime | null): void {
    const pa = a.prop;
    a.touching = true;
    const rax = px - (pa.cx + pa.dx), ray = py - (pa.cy + pa.dy);
    let vx = pa.vx - pa.omega * ray, vy = pa.vy + pa.omega * rax;
    let rbx = 0, rby = 0, invB = 0;
    if (o) {
      const pb = o.prop;
      rbx = px - (pb.cx + pb.dx); rby = py - (pb.cy + pb.dy);
      vx -= pb.vx - pb.omega * rby; vy -= pb.vy + pb.omega * rbx;
    } else if (kin) {
      const wx = kin.cx + kin.dx, wy = kin.cy + kin.dy;
      vx -= kin.vx - kin.omega * (py - wy); vy -= kin.vy + kin.omega * (px - wx);
    }
    // positional correction (shared by mass with a free obstacle)
    const share = o ? o.m / (a.m + o.m) : 1;
    // a free obstacle: correct only what exceeds a small slop, so resting stacks do not push each other
    // into the floor and back every pass (common practice in sequential-impulse solvers (no source))
    if (o) depth = Math.max(0, depth - CONTACT_SLOP);
    pa.dx += nx * depth * share; pa.dy += ny * depth * share;
    if (o) { o.prop.dx -= nx * depth * (1 - share); o.prop.dy -= ny * depth * (1 - share); }
    const vn = vx * nx + vy * ny;
    if (vn >= 0) return;
    const ran = rax * ny - ray * nx;
    let k = 1 / a.m + (ran * ran) / a.I;
    if (o) { const rbn = rbx * ny - rby * nx; invB = 1 / o.m + (rbn * rbn) / o.I; k += invB; }
    const jn = -vn / k; // restitution 0: the contact stops approaching
    impulse(a, rax, ray, jn * nx, jn * ny, 1);
    if (o) impulse(o, rbx, rby, jn * nx, jn * ny, -1);
    // Coulomb friction on the tangential part (recomputed after the normal impulse)
    const tx = -ny, ty = nx;
    let vt = (pa.vx - pa.omega * ray) * tx + (pa.vy + pa.omega * rax) * ty;
    if (o) vt -= (o.prop.vx - o.prop.omega * rby) * tx + (o.prop.vy + o.prop.omega * rbx) * ty;
    else if (kin) { const wx = kin.cx + kin.dx, wy = kin.cy + kin.dy; vt -= (kin.vx - kin.omega * (py - wy)) * tx + (kin.vy + kin.omega * (px - wx)) * ty; }
    const rat = rax * ty - ray * tx;
    let kt = 1 / a.m + (rat * rat) / a.I;
    if (o) { const rbt = rbx * ty - rby * tx; kt += 1 / o.m + (rbt * rbt) / o.I; }
    let jt = -vt / kt;
    const lim = FRICTION * jn;
    jt = jt > lim ? lim : jt < -lim ? -lim : jt;
    impulse(a, rax, ray, jt * tx, jt * ty, 1);
    if (o) impulse(o, rbx, rby, jt * tx, jt * ty, -1);
  }

  /**
   * Each pass, per free prop: its deepest penetrating boundary sample picks the obstacle and normal; the prop is
   * pushed out by that depth and one impulse is applied at the mean of the samples touching the same obstacle
   * along about the same normal (a box landing flat gets no spurious spin from whichever corner came first).
   */
  function resolveContacts(): void {
    let ox: Body | null = null, okin: PropRuntime | null = null, oid = -2;
    let best = 0, bnx = 0, bny = 0;
    let sumX = 0, sumY = 0, cnt = 0;
    const ids: number[] = [];
    for (let pass = 0; pass < CONTACT_PASSES; pass++) {
      for (const a of bodies) {
        if (!a.prop.free) continue;
        const p = a.prop;
        const wx = p.cx + p.dx, wy = p.cy + p.dy;
        // obstacle ids: −1 tank side (one per normal), 0… walls, 1000… props
        const visit = (f: (px: number, py: number, id: number, nx: number, ny: number, d: number) => void) => {
          for (let s = 0; s < a.sx.length; s++) {
            const px = wx + p.cos * a.sx[s] - p.sin * a.sy[s], py = wy + p.sin * a.sx[s] + p.cos * a.sy[s];
            if (sides.bottom && py < 0) f(px, py, -1, 0, 1, -py);
            if (sides.left && px < 0) f(px, py, -1, 1, 0, -px);
            if (sides.right && px > W) f(px, py, -1, -1, 0, px - W);
            if (sides.top && py > H) f(px, py, -1, 0, -1, py - H);
            for (let w = 0; w < S.walls.length; w++) {
              const d = shapeSignedDistance(S.walls[w], px, py, normal);
              if (d < 0) f(px, py, w, normal[0], normal[1], -d);
            }
            for (let k = 0; k < S.props.length; k++) {
              const q = S.props[k];
              if (q === p) continue;
              const d = S.propDistance(q, px, py);
              if (d < 0) f(px, py, 1000 + k, S.normal[0], S.normal[1], -d);
            }
          }
        };
        // every obstacle touched (tank sides are one obstacle per normal, so a corner resolves both)
        ids.length = 0;
        visit((_px, _py, id, nx, ny) => { const key = id === -1 ? -1 - (nx > 0 ? 1 : nx < 0 ? 2 : ny > 0 ? 3 : 4) : id; if (!ids.includes(key)) ids.push(key); });
        for (const key of ids) {
          best = 0; oid = -2;
          const match = (id: number, nx: number, ny: number) => (id === -1 ? -1 - (nx > 0 ? 1 : nx < 0 ? 2 : ny > 0 ? 3 : 4) : id) === key;
          visit((_px, _py, id, nx, ny, d) => { if (match(id, nx, ny) && d > best) { best = d; bnx = nx; bny = ny; oid = id; } });
          if (oid === -2) continue;
          sumX = 0; sumY = 0; cnt = 0;
          visit((px, py, id, nx, ny) => { if (match(id, nx, ny) && nx * bnx + ny * bny > 0.8) { sumX += px; sumY += py; cnt++; } });
          okin = null; ox = null;
          if (oid >= 1000) {
            const q = S.props[oid - 1000];
            if (q.free) ox = bodies.find((bb) => bb.prop === q) ?? null; else okin = q;
          }
          contact(a, sumX / cnt, sumY / cnt, bnx, bny, best, ox, okin);
        }
      }
    }
  }

  function advance(dt: number, f0: number): void {
    const gx = S.gx, gy = S.gy;
    for (const b of bodies) {
      const p = b.prop;
      if (!p.free) {
        // keyed until the release frame; then free with the velocity its keys had (set by the last placeProp)
        if (b.doc.releaseFrame !== undefined && f0 >= b.doc.releaseFrame) p.free = true;
        else continue;
      }
      // added mass of the wetted share of the displaced liquid (stabilisation, see the file's head)
      const ma = ADDED_MASS * b.wet * WATER_DENSITY * shapeArea(b.doc.shape);
      // turning moves liquid out to the prop's reach on either side: added inertia ma·reach² (same stabilisation)
      const m = b.m + ma, I = b.I + ma * p.reach * p.reach;
      p.vx += dt * (b.m * gx + b.fx) / m;
      p.vy += dt * (b.m * gy + b.fy) / m;
      p.omega += (dt * b.tau) / I;
    }
    resolveContacts(); // velocities first: a prop resting on the floor does not move into it
    for (const b of bodies) {
      const p = b.prop;
      if (!p.free) continue;
      p.dx += p.vx * dt; p.dy += p.vy * dt;
      setAngle(p, p.angle + p.omega * dt);
    }
    resolveContacts();
    // rest: a prop in contact whose every point moves slower than 1 mm/s is stopped, so round-off in the
    // contact passes cannot grow into rocking (sleeping bodies, common practice in rigid-body engines (no source))
    for (const b of bodies) {
      const p = b.prop;
      if (p.free && b.touching && Math.hypot(p.vx, p.vy) + Math.abs(p.omega) * p.reach < REST_SPEED) { p.vx = 0; p.vy = 0; p.omega = 0; }
      b.touching = false;
    }
  }

  function measureForces(): void {
    const { nx, ny, h, type, solid, q } = S;
    const k = S.lastDt > 0 ? (WATER_DENSITY * h) / S.lastDt : 0; // p = q·ρ·h/dt (Pa)
    const pAt = (c: number, far: number): number => {
      // pressure at the face between solid cell and fluid cell c: linear from c and the cell beyond it
      const pc = q[c] * k;
      if (far < 0 || far >= S.nc) return pc;
      const t = type[far];
      if (t === FLUID) return 1.5 * pc - 0.5 * q[far] * k;
      if (t === AIR) return 1.5 * pc;
      return pc;
    };
    for (const b of bodies) {
      const p = b.prop;
      b.fx = 0; b.fy = 0; b.tau = 0;
      if (!p.free) continue;
      const wx = p.cx + p.dx, wy = p.cy + p.dy, R = p.reach;
      const i0 = Math.max(1, Math.floor((wx - R) / h) + 1), i1 = Math.min(nx - 2, Math.floor((wx + R) / h) + 1);
      const j0 = Math.max(1, Math.floor((wy - R) / h) + 1), j1 = Math.min(ny - 2, Math.floor((wy + R) / h) + 1);
      let faces = 0, wetFaces = 0;
      for (let j = j0; j <= j1; j++) {
        for (let i = i0; i <= i1; i++) {
          const c = i + nx * j;
          if (solid[c] === 0) continue;
          const cxm = (i - 0.5) * h, cym = (j - 0.5) * h;
          if (S.propDistance(p, cxm, cym) >= 0) continue; // a cell of this prop (as placeSolids rasterised it)
          for (let d = 0; d < 4; d++) {
            const ox = d === 0 ? -1 : d === 1 ? 1 : 0, oy = d === 2 ? -1 : d === 3 ? 1 : 0;
            const n = c + ox + nx * oy;
            if (solid[n] !== 0) continue;
            faces++;
            if (type[n] !== FLUID) continue;
            wetFaces++;
            const pf = pAt(n, n + ox + nx * oy);
            // the liquid in n pushes on the face towards the prop: force −(ox, oy)·p·h
            const fx = -ox * pf * h, fy = -oy * pf * h;
            const rx = cxm + 0.5 * ox * h - wx, ry = cym + 0.5 * oy * h - wy;
            b.fx += fx; b.fy += fy; b.tau += rx * fy - ry * fx;
          }
        }
      }
      b.wet = faces > 0 ? wetFaces / faces : 0;
      // bound the reaction to twice the full buoyancy ρ_w·|g|·area (and its moment): the partitioned step's
      // impulsive pressures beside a moving prop alternate in sign with magnitudes many times that
      const fMax = 2 * WATER_DENSITY * Math.hypot(S.gx, S.gy) * shapeArea(b.doc.shape), tMax = fMax * p.reach * 0.25;
      b.fx = Math.max(-fMax, Math.min(fMax, b.fx)); b.fy = Math.max(-fMax, Math.min(fMax, b.fy));
      b.tau = Math.max(-tMax, Math.min(tMax, b.tau));
    }
  }

  function states(): PropState[] {
    return scene.props.map((doc, k) => {
      const p = S.props[k];
      return { id: doc.id, x: p.cx + p.dx, y: p.cy + p.dy, angle: p.angle * DEG, vx: p.vx, vy: p.vy, spin: p.omega * DEG };
    });
  }

  return { advance, measureForces, states };
}
