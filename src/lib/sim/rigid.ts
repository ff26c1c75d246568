// Free props: rigid bodies two-way coupled to the liquid.
//
// Coupling method: strong (monolithic) coupling in the pressure projection, the rigid-body case of Batty,
// Bertails & Bridson 2007 ("A fast variational framework for accurate solid–fluid coupling", SIGGRAPH 2007;
// also Bridson, "Fluid Simulation for Computer Graphics", 2nd ed., 2015, ch. 8). The prop's cells carry its
// rigid velocity V = (vx, vy, ω) on their faces; the pressure that makes the liquid divergence-free also
// accelerates the prop, in the same solve: (A + k·B·M⁻¹·Bᵀ)·q = −D*, where row c of B sums, over the
// prop's faces beside liquid cell c, the face's direction into the prop times (1, 0, −r_y) or (0, 1, r_x)
// (r from the centroid), k = ρ_water·h² and M = diag(m, m, I). After the solve V ← V* + k·M⁻¹·Bᵀ·q.
// Being implicit, it is stable for props of any density (the partitioned scheme it replaces needed an
// artificial added mass, six times the displaced liquid, to stay stable: the added-mass instability of
// Förster, Wall & Ramm 2007, CMAME 196; it slowed every prop and made props lighter than 500 kg/m³ bob for
// seconds).
// The liquid cell beside a wetted face holds its pressure at its centre, a distance δ (0 < δ ≤ h along the
// face's axis) from the prop's outline, and no liquid velocity of the grid covers the layer between: it moves
// with the prop's face. So that layer's mass (ρ_water·h·δ per wetted face, along the face's axis, with its
// weight) is the prop's too. A floating prop then balances p(centre)·w = (m + ρ·δ·w)·g, i.e. the pressure at
// its true outline p − ρ·g·δ carries its weight: Archimedes' draft, continuous in the prop's position (a
// rasterised outline alone gives a buoyancy in steps of ρ·g·h·w, and a prop rests on a step's edge jittering
// at several cm/s).
// Two more pushes of the liquid reach the prop as impulses taken before the projection (jx, jy, jw), each the
// opposite of what the liquid gained, so liquid + prop momentum is kept (Newton's third law): the collision
// stage's push on particles that a prop overtook (stages.ts collide), and the viscous stress on the prop's faces
// (viscosity.ts reaction: the no-slip faces of Batty & Bridson 2008 hold the prop's velocity, and the momentum
// the liquid takes from them is the drag the prop feels).
// Units per unit depth (the solver is 2D): mass kg/m, force N/m, moment of inertia kg·m.
// Contacts (tank sides, walls, keyed props, other free props): boundary sample points pushed out along the
// obstacle's normal, with inelastic impulses (restitution 0) and Coulomb friction, so props come to rest.
import type { Scene, Prop } from '../scene/schema';
import { shapeArea, shapeSignedDistance } from '../scene/shapes';
import { type FlipState, type PropRuntime, WATER_DENSITY } from './stages';
import { FLUID, type Coupling } from './pressure';

/** Friction coefficient of prop contacts (common practice (no source): wood or plastic on wet surfaces). */
const FRICTION = 0.4;
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
  /**
   * Coupling of the current projection: liquid cells beside the prop and their rows of B (see the file's
   * head); the inverse masses along x, y and of rotation, the wetted faces' half-cells included.
   */
  cells: number[]; bx: number[]; by: number[]; bw: number[];
  imx: number; imy: number; iI: number;
  /** Moment of those layers' weight about the centroid (N per unit depth), applied with the next step's gravity. */
  tg: number;
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
  /** Before placeSolids: releases props whose release frame has come, moves every free prop over dt, then gravity. */
  advance(dt: number, f0: number): void;
  /** Before the projection (after the free surface): the coupling rows of every free prop. */
  prepareCoupling(): void;
  /** The coupling term of the projection's matrix; its finish() gives the props their new velocities. */
  readonly coupling: Coupling;
  /** After the viscous stage: its stress on every free prop (taken with prepareCoupling). */
  viscousDrag(reactionU: Float64Array, reactionV: Float64Array): void;
  /** After the projection: contacts stop what the liquid pushed into an obstacle; props at rest are stopped. */
  settle(): void;
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
    bodies.push({ prop, doc, m: rho * shapeArea(doc.shape), I: rho * polarMoment(doc.shape, prop.cx, prop.cy), sx, sy, cells: [], bx: [], by: [], bw: [], imx: 0, imy: 0, iI: 0, tg: 0, touching: false });
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

  function stopResting(): void {
    // rest: a prop in contact whose every point moves slower than 1 mm/s is stopped, so round-off in the
    // contact passes cannot grow into rocking (sleeping bodies, common practice in rigid-body engines (no source))
    for (const b of bodies) {
      const p = b.prop;
      if (p.free && b.touching && Math.hypot(p.vx, p.vy) + Math.abs(p.omega) * p.reach < REST_SPEED) { p.vx = 0; p.vy = 0; p.omega = 0; }
      b.touching = false;
    }
  }

  function advance(dt: number, f0: number): void {
    for (const b of bodies) {
      const p = b.prop;
      // keyed until the release frame; then free with the velocity its keys had (set by the last placeProp)
      if (!p.free && b.doc.releaseFrame !== undefined && f0 >= b.doc.releaseFrame) p.free = true;
    }
    // position first (the velocity the last projection and its contacts gave), as the particles move:
    // a floating prop at rest stays where it is
    for (const b of bodies) {
      const p = b.prop;
      if (!p.free) continue;
      p.dx += p.vx * dt; p.dy += p.vy * dt;
      setAngle(p, p.angle + p.omega * dt);
    }
    resolveContacts();
    stopResting();
    // gravity; the projection then adds the liquid's push (coupling) and settle() the contacts
    for (const b of bodies) {
      const p = b.prop;
      if (!p.free) continue;
      p.vx += dt * S.gx; p.vy += dt * S.gy;
      p.omega += dt * b.tg * b.iI;
    }
  }

  function settle(): void {
    // twice the passes: this step's gravity and push are new here, and a stack needs them to reach its base
    resolveContacts();
    resolveContacts();
    stopResting();
  }

  // cell → index in the coupling list of the body being built (−1: none)
  const slot = new Int32Array(S.nc).fill(-1);
  const bodyCells: number[][] = bodies.map(() => []);

  /** The grid cells of a placed prop: solid cells whose centre lies inside it (as placeSolids rasterised it). */
  function ownCells(p: PropRuntime, out: number[]): void {
    const { nx, ny, h, solid } = S;
    const wx = p.cx + p.dx, wy = p.cy + p.dy, R = p.reach;
    const i0 = Math.max(1, Math.floor((wx - R) / h) + 1), i1 = Math.min(nx - 2, Math.floor((wx + R) / h) + 1);
    const j0 = Math.max(1, Math.floor((wy - R) / h) + 1), j1 = Math.min(ny - 2, Math.floor((wy + R) / h) + 1);
    out.length = 0;
    for (let j = j0; j <= j1; j++) {
      for (let i = i0; i <= i1; i++) {
        const c = i + nx * j;
        if (solid[c] !== 0 && S.propDistance(p, (i - 0.5) * h, (j - 0.5) * h) < 0) out.push(c);
      }
    }
  }

  /**
   * The viscous stage's stress on each free prop (viscosity.ts reactionU/V, per unit density): added, with its
   * moment, to the impulse the prop takes before the projection (prepareCoupling). Each face of the prop's cells counts once.
   */
  const mine = new Uint8Array(S.nc);
  function viscousDrag(ru: Float64Array, rv: Float64Array): void {
    const { nx, h } = S;
    bodies.forEach((b, bi) => {
      const p = b.prop;
      if (!p.free) return;
      const own = bodyCells[bi];
      ownCells(p, own);
      for (const c of own) mine[c] = 1;
      const wx = p.cx + p.dx, wy = p.cy + p.dy;
      let jx = 0, jy = 0, jw = 0;
      for (const c of own) {
        const i = c % nx, j = (c - i) / nx;
        // left and bottom faces always; right and top faces when the neighbour is not the prop's (else counted there)
        const faces = [c, mine[c + 1] ? -1 : c + 1];
        for (const f of faces) if (f >= 0 && ru[f] !== 0) { jx += ru[f]; jw -= ((j - 0.5) * h - wy) * ru[f]; }
        const vf = [c, mine[c + nx] ? -1 : c + nx];
        for (const f of vf) if (f >= 0 && rv[f] !== 0) { jy += rv[f]; jw += ((i - 0.5) * h - wx) * rv[f]; }
      }
      for (const c of own) mine[c] = 0;
      p.jx += WATER_DENSITY * jx; p.jy += WATER_DENSITY * jy; p.jw += WATER_DENSITY * jw;
    });
  }

  /** The faces of a free prop's cells beside liquid or air take its rigid velocity at their centre. */
  function writeFaces(p: PropRuntime, own: number[]): void {
    const { nx, h, gu, gv, solid } = S;
    const wx = p.cx + p.dx, wy = p.cy + p.dy;
    for (const c of own) {
      const i = c % nx, j = (c - i) / nx;
      const su = p.vx - p.omega * ((j - 0.5) * h - wy), sv = p.vy + p.omega * ((i - 0.5) * h - wx);
      if (solid[c - 1] === 0) gu[c] = su;
      if (solid[c + 1] === 0) gu[c + 1] = su;
      if (solid[c - nx] === 0) gv[c] = sv;
      if (solid[c + nx] === 0) gv[c + nx] = sv;
    }
  }

  function prepareCoupling(): void {
    const { nx, h, type } = S;
    const layer = WATER_DENSITY * h; // kg/m per metre of liquid between a liquid cell's centre and the prop
    bodies.forEach((b, bi) => {
      const p = b.prop;
      b.cells.length = 0; b.bx.length = 0; b.by.length = 0; b.bw.length = 0;
      const own = bodyCells[bi];
      own.length = 0;
      let mx = b.m, my = b.m, ii = b.I, tg = 0;
      if (p.free) {
        const wx = p.cx + p.dx, wy = p.cy + p.dy;
        ownCells(p, own);
        // this substep's impulses from the collision and viscous stages (the opposite of what the liquid gained
        // there), with the prop's faces, so the projection solves against the velocity the prop now has
        if (p.jx !== 0 || p.jy !== 0 || p.jw !== 0) {
          p.vx += p.jx / b.m; p.vy += p.jy / b.m; p.omega += p.jw / b.I;
          writeFaces(p, own);
        }
        for (const c of own) {
          const i = c % nx, j = (c - i) / nx;
          const rx = (i - 0.5) * h - wx, ry = (j - 0.5) * h - wy;
          for (let d = 0; d < 4; d++) {
            const ox = d === 0 ? -1 : d === 1 ? 1 : 0, oy = d === 2 ? -1 : d === 3 ? 1 : 0;
            const n = c + ox + nx * oy;
            if (type[n] !== FLUID) continue;
            // the face's direction from liquid cell n into the prop is −(ox, oy)
            let k = slot[n];
            if (k < 0) { k = b.cells.length; slot[n] = k; b.cells.push(n); b.bx.push(0); b.by.push(0); b.bw.push(0); }
            // the liquid between n's centre and the prop's outline moves with the prop (see the file's head)
            const dl = S.propDistance(p, rx + wx + ox * h, ry + wy + oy * h);
            const ml = layer * (dl < 0 ? 0 : dl > h ? h : dl);
            if (ox !== 0) { b.bx[k] -= ox; b.bw[k] += ox * ry; mx += ml; ii += ml * ry * ry; tg -= ry * ml * S.gx; }
            else { b.by[k] -= oy; b.bw[k] -= oy * rx; my += ml; ii += ml * rx * rx; tg += rx * ml * S.gy; }
          }
        }
        for (const c of b.cells) slot[c] = -1;
      }
      p.jx = 0; p.jy = 0; p.jw = 0;
      b.imx = 1 / mx; b.imy = 1 / my; b.iI = 1 / ii; b.tg = tg;
    });
  }

  const coupling: Coupling = {
    apply(x, out, sign) {
      const k = WATER_DENSITY * S.h * S.h;
      let xCx = 0;
      for (const b of bodies) {
        const n = b.cells.length;
        if (n === 0) continue;
        let sx = 0, sy = 0, sw = 0;
        for (let i = 0; i < n; i++) { const xc = x[b.cells[i]]; sx += b.bx[i] * xc; sy += b.by[i] * xc; sw += b.bw[i] * xc; }
        const tx = k * b.imx * sx, ty = k * b.imy * sy, tw = k * b.iI * sw;
        for (let i = 0; i < n; i++) out[b.cells[i]] += sign * (b.bx[i] * tx + b.by[i] * ty + b.bw[i] * tw);
        xCx += sx * tx + sy * ty + sw * tw;
      }
      return xCx;
    },
    finish(q) {
      const k = WATER_DENSITY * S.h * S.h;
      bodies.forEach((b, bi) => {
        const p = b.prop;
        if (!p.free) return;
        let sx = 0, sy = 0, sw = 0;
        for (let i = 0; i < b.cells.length; i++) { const qc = q[b.cells[i]]; sx += b.bx[i] * qc; sy += b.by[i] * qc; sw += b.bw[i] * qc; }
        p.vx += k * b.imx * sx; p.vy += k * b.imy * sy; p.omega += k * b.iI * sw;
        // the prop's faces beside liquid or air carry its new velocity (the liquid was solved against it)
        writeFaces(p, bodyCells[bi]);
      });
    },
  };

  function states(): PropState[] {
    return scene.props.map((doc, k) => {
      const p = S.props[k];
      return { id: doc.id, x: p.cx + p.dx, y: p.cy + p.dy, angle: p.angle * DEG, vx: p.vx, vy: p.vy, spin: p.omega * DEG };
    });
  }

  return { advance, prepareCoupling, viscousDrag, coupling, settle, states };
}
