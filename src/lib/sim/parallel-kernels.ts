// The solver stages that run on several threads (parallel.ts), as kernels over one thread's fixed share of the
// particles or grid rows. Each kernel does, for its share, exactly the arithmetic of its serial stage in
// stages.ts, in the same order, so that the threaded step gives the serial step's bytes whatever the thread
// count (tests/sim/threads.test.ts checks it). Pure TypeScript over shared typed arrays; no Node or DOM APIs.
import { Bilinear, U_FACES, V_FACES } from './kernel';
import { FLUID as FLUID_CELL, AIR as AIR_CELL, SOLID as SOLID_CELL } from './pressure';

// module-local copies of imported constants read in hot loops (see stages.ts)
const FLUID = FLUID_CELL, AIR = AIR_CELL, SOLID = SOLID_CELL;
const UFX = U_FACES[0], UFY = U_FACES[1], VFX = V_FACES[0], VFY = V_FACES[1];

/** Kernel numbers written into the control block's TASK slot. */
export const TASK = {
  detach: 1, integrate: 2, p2gClear: 3, p2gSplat: 4, p2gFinish: 5, g2pFaces: 6, g2pParticles: 7, separate: 8,
  micForward: 9, micBackward: 10,
  cgResidual: 11, cgSquares: 12, cgStart: 13, cgMatvec: 14, cgUpdate: 15, cgDot: 16, cgDirection: 17,
} as const;

/** Control block slots (Int32, shared by the team). */
export const CTRL = {
  /** Bumped by the main thread for every task. */
  gen: 0,
  /** Workers that finished the current task. */
  done: 1,
  task: 2,
  /** 0: the particle arrays are the A set (x, y, u, v), 1: the B set (x2, …); the hash sort swaps them. */
  parity: 3,
  /** Particle count of the current step. */
  n: 4,
  /** Workers attached to the current solver. */
  ready: 5,
  /** Set to 1 to end the workers' loops for good. */
  stop: 6,
  /** CG: fluid cells, and which vector is the unknown (0: q, 1: driftPotential). */
  fluidCount: 7, cgVector: 8,
  size: 12,
} as const;

/** Float64 parameters of the current task. */
export const PARAM = { dt: 0, coefficient: 1, size: 4 } as const;

/** What a thread needs to see one solver's state: shared buffers by FlipState field name, and its constants. */
export interface TeamLayout {
  threads: number;
  /** FlipState's typed arrays by field name, each on a SharedArrayBuffer (x/x2 etc. at attach time). */
  arrays: Record<string, { kind: 'f32' | 'f64' | 'i32' | 'u8'; buffer: SharedArrayBuffer }>;
  /** Team scratch: control (Int32 CTRL.size), params (Float64), touch/defer flags (u8 threads·ny), deferred particles (i32), counts, progress, partials. */
  ctrl: SharedArrayBuffer; params: SharedArrayBuffer;
  touch: SharedArrayBuffer; deferRows: SharedArrayBuffer; deferred: SharedArrayBuffer; deferredCount: SharedArrayBuffer;
  deferredStride: number;
  progress: SharedArrayBuffer; partials: SharedArrayBuffer;
  /** MIC(0) wavefront: first fluid-list entry of each grid row (ny + 1), and per-row progress and sleep flags (2·ny). */
  rowStart: SharedArrayBuffer; micProgress: SharedArrayBuffer;
  /** CG: per fluid-list entry, the term of the current dot product (f64, nc), summed by the main thread in order. */
  terms: SharedArrayBuffer;
  nx: number; ny: number; invH: number; gx: number; gy: number; flipRatio: number;
  hnx: number; hny: number; radius: number;
}

type Arr = Float32Array | Float64Array | Int32Array | Uint8Array;

function view(layout: TeamLayout, name: string): Arr {
  const a = layout.arrays[name];
  if (!a) throw new Error(`solver team: no shared array ${name}`);
  switch (a.kind) {
    case 'f32': return new Float32Array(a.buffer);
    case 'f64': return new Float64Array(a.buffer);
    case 'i32': return new Int32Array(a.buffer);
    default: return new Uint8Array(a.buffer);
  }
}

/** Hash cells a row waits for beyond the 3 it needs, once it has to wait for the row below (fewer, longer waits). */
const WAVE_SLACK = 8;

/** How long a waiting thread spins on a shared counter before it sleeps on it (loads). */
const SPINS = 2000;

/** One thread's kernels over one solver's shared state (the main thread is rank 0). */
export class TeamKernels {
  readonly ctrl: Int32Array; readonly params: Float64Array;
  private readonly K: Bilinear;
  private readonly nx: number; private readonly ny: number; private readonly nc: number;
  private readonly hnx: number; private readonly hny: number;
  private readonly gx: number; private readonly gy: number; private readonly flipRatio: number; private readonly radius: number;
  private readonly xs: Float32Array[]; private readonly ys: Float32Array[]; private readonly us: Float32Array[]; private readonly vs: Float32Array[];
  private readonly type: Uint8Array; private readonly solid: Uint8Array; private readonly open: Float64Array;
  private readonly gu: Float64Array; private readonly gv: Float64Array; private readonly wu: Float64Array; private readonly wv: Float64Array;
  private readonly prevU: Float64Array; private readonly prevV: Float64Array; private readonly dens: Float64Array;
  private readonly solidU: Float64Array; private readonly solidV: Float64Array;
  private readonly dispU: Float64Array; private readonly dispV: Float64Array; private readonly faceU: Float64Array; private readonly faceV: Float64Array;
  private readonly drift: Float64Array; private readonly hstart: Int32Array;
  private readonly touch: Uint8Array; private readonly deferRows: Uint8Array;
  private readonly deferred: Int32Array; private readonly deferredCount: Int32Array; private readonly deferredStride: number;
  private readonly progress: Int32Array; readonly partials: Float64Array;
  private readonly fluid: Int32Array; private readonly precon: Float64Array; private readonly res: Float64Array; private readonly zv: Float64Array;
  readonly rowStart: Int32Array; private readonly micProgress: Int32Array;
  private readonly q: Float64Array; private readonly dir: Float64Array; private readonly adir: Float64Array; private readonly diag: Float64Array;
  readonly terms: Float64Array;

  constructor(layout: TeamLayout, readonly rank: number) {
    this.ctrl = new Int32Array(layout.ctrl); this.params = new Float64Array(layout.params);
    this.nx = layout.nx; this.ny = layout.ny; this.nc = layout.nx * layout.ny;
    this.hnx = layout.hnx; this.hny = layout.hny;
    this.gx = layout.gx; this.gy = layout.gy; this.flipRatio = layout.flipRatio; this.radius = layout.radius;
    this.K = new Bilinear(layout.nx, layout.ny, layout.invH);
    const f32 = (n: string) => view(layout, n) as Float32Array, f64 = (n: string) => view(layout, n) as Float64Array;
    this.xs = [f32('x'), f32('x2')]; this.ys = [f32('y'), f32('y2')]; this.us = [f32('u'), f32('u2')]; this.vs = [f32('v'), f32('v2')];
    this.type = view(layout, 'type') as Uint8Array; this.solid = view(layout, 'solid') as Uint8Array; this.open = f64('open');
    this.gu = f64('gu'); this.gv = f64('gv'); this.wu = f64('wu'); this.wv = f64('wv');
    this.prevU = f64('prevU'); this.prevV = f64('prevV'); this.dens = f64('dens');
    this.solidU = f64('solidU'); this.solidV = f64('solidV');
    this.dispU = f64('dispU'); this.dispV = f64('dispV'); this.faceU = f64('faceU'); this.faceV = f64('faceV');
    this.drift = f64('driftPotential'); this.hstart = view(layout, 'hstart') as Int32Array;
    this.touch = new Uint8Array(layout.touch); this.deferRows = new Uint8Array(layout.deferRows);
    this.deferred = new Int32Array(layout.deferred); this.deferredCount = new Int32Array(layout.deferredCount);
    this.deferredStride = layout.deferredStride;
    this.progress = new Int32Array(layout.progress); this.partials = new Float64Array(layout.partials);
    this.fluid = view(layout, 'fluid') as Int32Array; this.precon = f64('precon'); this.res = f64('res'); this.zv = f64('zv');
    this.rowStart = new Int32Array(layout.rowStart); this.micProgress = new Int32Array(layout.micProgress);
    this.q = f64('q'); this.dir = f64('dir'); this.adir = f64('adir'); this.diag = f64('diag');
    this.terms = new Float64Array(layout.terms);
  }

  /** Runs task `task` for this thread's share; `threads` threads share it. */
  run(task: number, threads: number): void {
    switch (task) {
      case TASK.integrate: this.integrate(threads); break;
      case TASK.p2gClear: this.p2gClear(threads); break;
      case TASK.p2gSplat: this.p2gSplat(threads); break;
      case TASK.p2gFinish: this.p2gFinish(threads); break;
      case TASK.g2pFaces: this.g2pFaces(threads); break;
      case TASK.g2pParticles: this.g2pParticles(threads); break;
      case TASK.separate: this.separateRows(threads); break;
      case TASK.micForward: this.micForward(threads); break;
      case TASK.micBackward: this.micBackward(threads); break;
      case TASK.cgResidual: case TASK.cgSquares: case TASK.cgStart: case TASK.cgMatvec: case TASK.cgUpdate: case TASK.cgDot: case TASK.cgDirection:
        this.cg(task, threads); break;
      default: throw new Error(`solver team: unknown task ${task}`);
    }
  }

  /** This thread's particles [p0, p1): equal index ranges, in rank order. */
  private particleRange(threads: number): [number, number] {
    const n = this.ctrl[CTRL.n], r = this.rank;
    return [Math.floor((r * n) / threads), Math.floor(((r + 1) * n) / threads)];
  }

  /** This thread's grid rows [j0, j1). */
  private rowRange(threads: number): [number, number] {
    const ny = this.ny, r = this.rank;
    return [Math.floor((r * ny) / threads), Math.floor(((r + 1) * ny) / threads)];
  }

  /** Stage 1 (integrate in stages.ts) on this thread's particles. */
  private integrate(threads: number): void {
    const par = this.ctrl[CTRL.parity], x = this.xs[par], y = this.ys[par], u = this.us[par], v = this.vs[par];
    const dt = this.params[PARAM.dt];
    const gdx = this.gx * dt, gdy = this.gy * dt;
    const [p0, p1] = this.particleRange(threads);
    for (let p = p0; p < p1; p++) {
      const up = u[p], vp = v[p];
      x[p] += up * dt; y[p] += vp * dt;
      u[p] = up + gdx; v[p] = vp + gdy;
    }
  }

  /**
   * Particle to grid, part 1: this thread's rows get the cell types' starting values and zeroed sums; its
   * particles mark the grid rows their stencils write (touch), for part 2's ordering.
   */
  private p2gClear(threads: number): void {
    const { nx, ny, type, solid, open, gu, gv, wu, wv, dens, K } = this;
    const [j0, j1] = this.rowRange(threads);
    const c0 = j0 * nx, c1 = j1 * nx;
    for (let c = c0; c < c1; c++) {
      const s = solid[c];
      type[c] = s !== 0 ? SOLID : AIR;
      open[c] = s !== 0 ? 0 : 1;
    }
    gu.fill(0, c0, c1); gv.fill(0, c0, c1); wu.fill(0, c0, c1); wv.fill(0, c0, c1); dens.fill(0, c0, c1);
    const touch = this.touch, base = this.rank * ny, jMax = ny - 2;
    touch.fill(0, base, base + ny);
    const par = this.ctrl[CTRL.parity], x = this.xs[par], y = this.ys[par];
    const [p0, p1] = this.particleRange(threads);
    for (let p = p0; p < p1; p++) {
      K.at(x[p], y[p]);
      // rows written by splatFacesAndCentre: jb, jb + 1 (u faces, centres) and ja, ja + 1 (v faces), ja ∈ {jb, jb + 1}
      let jb = (K.Y - 0.5) | 0; if (jb > jMax) jb = jMax;
      let ja = K.Y | 0; if (ja > jMax) ja = jMax;
      touch[base + jb] = 1; touch[base + jb + 1] = 1; touch[base + ja + 1] = 1;
    }
  }

  /**
   * Particle to grid, part 2. The serial stage adds each particle's weights to a node in particle order; here
   * a thread adds directly to the rows no lower-ranked thread writes, and keeps the particles that write a
   * row some lower-ranked thread also writes (deferred), whose adds to those rows the main thread then makes
   * in rank order (replayDeferred). Every node thus receives its adds in particle order: the serial sums, bit for bit.
   */
  private p2gSplat(threads: number): void {
    const { ny, type, gu, gv, wu, wv, dens, K, touch } = this;
    const rank = this.rank, jMax = ny - 2;
    const defer = this.deferRows, base = rank * ny;
    // rows written by a lower-ranked thread
    defer.fill(0, base, base + ny);
    let anyDefer = false;
    for (let s = 0; s < rank; s++) {
      const t0 = s * ny;
      for (let j = 0; j < ny; j++) if (touch[t0 + j] !== 0) { defer[base + j] = 1; anyDefer = true; }
    }
    const par = this.ctrl[CTRL.parity], x = this.xs[par], y = this.ys[par], u = this.us[par], v = this.vs[par];
    const [p0, p1] = this.particleRange(threads);
    const list = this.deferred, l0 = rank * this.deferredStride;
    let m = 0;
    for (let p = p0; p < p1; p++) {
      const cell = K.at(x[p], y[p]);
      if (type[cell] === AIR) type[cell] = FLUID;
      if (anyDefer) {
        let jb = (K.Y - 0.5) | 0; if (jb > jMax) jb = jMax;
        let ja = K.Y | 0; if (ja > jMax) ja = jMax;
        if (defer[base + jb] !== 0 || defer[base + jb + 1] !== 0 || defer[base + ja + 1] !== 0) {
          list[l0 + m++] = p;
          splatRows(K, defer, base, 0, gu, wu, u[p], gv, wv, v[p], dens);
          continue;
        }
      }
      K.splatFacesAndCentre(gu, wu, u[p], gv, wv, v[p], dens);
    }
    this.deferredCount[rank] = m;
  }

  /** Particle to grid, part 3 (main thread, after part 2): the deferred particles' adds to deferred rows, in rank order. */
  replayDeferred(threads: number): void {
    const { ny, gu, gv, wu, wv, dens, K } = this;
    const par = this.ctrl[CTRL.parity], x = this.xs[par], y = this.ys[par], u = this.us[par], v = this.vs[par];
    for (let r = 1; r < threads; r++) {
      const l0 = r * this.deferredStride, m = this.deferredCount[r], base = r * ny;
      for (let k = 0; k < m; k++) {
        const p = this.deferred[l0 + k];
        K.at(x[p], y[p]);
        splatRows(K, this.deferRows, base, 1, gu, wu, u[p], gv, wv, v[p], dens);
      }
    }
  }

  /** Particle to grid, part 4: this thread's rows of the normalisation and solid faces (particlesToGrid's last loop). */
  private p2gFinish(threads: number): void {
    const { nx, solid, gu, gv, wu, wv, prevU, prevV, solidU, solidV } = this;
    const [j0, j1] = this.rowRange(threads);
    for (let j = j0; j < j1; j++) {
      for (let i = 0, c = nx * j; i < nx; i++, c++) {
        let uf = wu[c] > 0 ? gu[c] / wu[c] : 0;
        let vf = wv[c] > 0 ? gv[c] / wv[c] : 0;
        const sc = solid[c];
        const sl = i > 0 ? solid[c - 1] : sc, sb = j > 0 ? solid[c - nx] : sc;
        if (sc !== 0 || sl !== 0) uf = sc !== 0 && sl !== 0 ? 0.5 * (solidU[c] + solidU[i > 0 ? c - 1 : c]) : sc !== 0 ? solidU[c] : solidU[c - 1];
        if (sc !== 0 || sb !== 0) vf = sc !== 0 && sb !== 0 ? 0.5 * (solidV[c] + solidV[j > 0 ? c - nx : c]) : sc !== 0 ? solidV[c] : solidV[c - nx];
        gu[c] = uf; gv[c] = vf;
        prevU[c] = uf; prevV[c] = vf;
      }
    }
  }

  /** Grid to particle, part 1: this thread's rows of the per-face loop of gridToParticles. */
  private g2pFaces(threads: number): void {
    const { nx, type, gu, gv, wu, wv, prevU, prevV, dispU, dispV, faceU, faceV } = this;
    const s = this.drift;
    const dt = this.params[PARAM.dt];
    const gu2 = 0.5 * this.gx * dt, gv2 = 0.5 * this.gy * dt;
    const [j0, j1] = this.rowRange(threads);
    for (let j = j0; j < j1; j++) {
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
  }

  /** Grid to particle, part 2: this thread's particles; its largest squared speed goes to partials[rank]. */
  private g2pParticles(threads: number): void {
    const { gu, gv, wu, wv, prevU, prevV, dispU, dispV, flipRatio, K } = this;
    const par = this.ctrl[CTRL.parity], x = this.xs[par], y = this.ys[par], u = this.us[par], v = this.vs[par];
    const dt = this.params[PARAM.dt];
    const gu2 = 0.5 * this.gx * dt, gv2 = 0.5 * this.gy * dt;
    const pic = 1 - flipRatio;
    const hx = gu2 * dt, hy = gv2 * dt;
    let max2 = 0;
    const [p0, p1] = this.particleRange(threads);
    for (let p = p0; p < p1; p++) {
      K.at(x[p], y[p]);
      K.nodes(UFX, UFY);
      let ws = K.gather(wu);
      let up = u[p], ddx = hx;
      if (ws > 0) {
        const inv = 1 / ws;
        up = pic * (K.gather(gu) * inv) + flipRatio * (up + K.gather(prevU) * inv);
        u[p] = up;
        ddx = (K.gather(dispU) / ws) * dt;
      }
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
    this.partials[this.rank] = max2;
  }

  /**
   * Separation (separate in stages.ts), one iteration, as a wavefront over hash-cell rows: row cy goes to
   * thread cy mod threads. Cell (cx, cy) moves particles of cells (cx…cx+1, cy) and (cx−1…cx+1, cy+1), so it
   * may run once row cy−1 has done its cells up to cx+2 (the last ones whose pairs reach those cells) and
   * before row cy+1 reaches cx−2: each pair is then handled in the serial order, on the serial positions.
   * progress[cy] counts the cells of row cy done, progress[hny + cy] says a thread sleeps on it (the main thread
   * zeroes both before each iteration).
   */
  private separateRows(threads: number): void {
    const { hnx, hny, hstart, progress } = this;
    const par = this.ctrl[CTRL.parity], x = this.xs[par], y = this.ys[par];
    const minDist = 2 * this.radius, min2 = minDist * minDist;
    const rowEnd = hnx - 1;
    for (let cy = this.rank; cy < hny - 1; cy += threads) {
      let avail = cy === 0 ? rowEnd : 0;
      for (let cx = 0; cx < rowEnd; cx++) {
        if (avail < (cx + 3 < rowEnd ? cx + 3 : rowEnd)) {
          // publish this row's progress first, then wait for the row below to be a stretch ahead (fewer waits)
          publish(progress, cy, cx, hny + cy);
          const ahead = cx + 3 + WAVE_SLACK;
          avail = waitAtLeast(progress, cy - 1, ahead < rowEnd ? ahead : rowEnd, hny + cy - 1);
        }
        const c = cx + hnx * cy;
        const a = hstart[c], b = hstart[c + 1];
        if (a !== b) {
          const sameEnd = hstart[c + 2];
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
        if ((cx & 7) === 7) publish(progress, cy, cx + 1, hny + cy);
      }
      publish(progress, cy, rowEnd, hny + cy);
    }
  }

  /**
   * MIC(0) forward substitution (applyMic0 in pressure.ts) as a wavefront over grid rows: row j (thread
   * (j − 1) mod threads) computes zv[c] from zv[c − 1] (its own row) and zv[c − nx], so cell c may run once row
   * j − 1 is done up to its column. Same formula, same inputs: the serial bytes. micProgress[j] = columns of
   * row j done (exclusive), micProgress[ny + j] its sleep flag; the main thread zeroes them before.
   */
  private micForward(threads: number): void {
    const { nx, ny, fluid, precon, res, zv, rowStart, micProgress: prog } = this;
    for (let j = 1 + this.rank; j < ny - 1; j += threads) {
      const k0 = rowStart[j], k1 = rowStart[j + 1], row = nx * j;
      let avail = j === 1 ? nx : 0, sinceLast = 0;
      for (let k = k0; k < k1; k++) {
        const c = fluid[k], i = c - row;
        if (avail <= i) {
          publish(prog, j, i, ny + j);
          avail = waitAtLeast(prog, j - 1, i + 1, ny + j - 1);
        }
        zv[c] = (res[c] + precon[c - 1] * zv[c - 1] + precon[c - nx] * zv[c - nx]) * precon[c];
        if (++sinceLast === 8) { sinceLast = 0; publish(prog, j, i + 1, ny + j); }
      }
      publish(prog, j, nx, ny + j);
    }
  }

  /**
   * MIC(0) backward substitution, the wavefront from the top row down: row j needs row j + 1 done from the
   * right down to its column. micProgress[j] = nx − (the last column done), nx + 1 once the row is done.
   */
  private micBackward(threads: number): void {
    const { nx, ny, fluid, precon, zv, rowStart, micProgress: prog } = this;
    for (let j = ny - 2 - this.rank; j >= 1; j -= threads) {
      const k0 = rowStart[j], k1 = rowStart[j + 1], row = nx * j;
      let avail = j === ny - 2 ? nx + 1 : 0, sinceLast = 0;
      for (let k = k1 - 1; k >= k0; k--) {
        const c = fluid[k], i = c - row;
        if (avail < nx - i) {
          publish(prog, j, nx - i - 1, ny + j);
          avail = waitAtLeast(prog, j + 1, nx - i, ny + j + 1);
        }
        const pc = precon[c];
        zv[c] = (zv[c] + pc * (zv[c + 1] + zv[c + nx])) * pc;
        if (++sinceLast === 8) { sinceLast = 0; publish(prog, j, nx - i, ny + j); }
      }
      publish(prog, j, nx + 1, ny + j);
    }
  }

  /**
   * One loop of pcgSolve (pressure.ts) over this thread's range of the fluid list. The per-cell work is the
   * serial loop's; each term of a dot product goes to terms[k], which the main thread sums in fluid-list order,
   * the serial sum's order (a sum split between threads would round differently).
   */
  private cg(task: number, threads: number): void {
    const { nx, fluid, res, zv, dir, adir, diag, terms } = this;
    const x = this.ctrl[CTRL.cgVector] === 0 ? this.q : this.drift;
    const m = this.ctrl[CTRL.fluidCount], r = this.rank;
    const k0 = Math.floor((r * m) / threads), k1 = Math.floor(((r + 1) * m) / threads);
    const coef = this.params[PARAM.coefficient];
    switch (task) {
      case TASK.cgResidual: // r = b − A·x0
        for (let k = k0; k < k1; k++) {
          const c = fluid[k];
          const ax = diag[c] * x[c] - x[c - 1] - x[c + 1] - x[c - nx] - x[c + nx];
          res[c] -= ax;
        }
        break;
      case TASK.cgSquares:
        for (let k = k0; k < k1; k++) terms[k] = res[fluid[k]] ** 2;
        break;
      case TASK.cgStart: // dir = z; σ = z·r
        for (let k = k0; k < k1; k++) { const c = fluid[k]; dir[c] = zv[c]; terms[k] = zv[c] * res[c]; }
        break;
      case TASK.cgMatvec: // adir = A·dir; dir·adir
        for (let k = k0; k < k1; k++) {
          const c = fluid[k];
          const a = diag[c] * dir[c] - dir[c - 1] - dir[c + 1] - dir[c - nx] - dir[c + nx];
          adir[c] = a;
          terms[k] = dir[c] * a;
        }
        break;
      case TASK.cgUpdate: // x += α·dir; r −= α·adir; r·r
        for (let k = k0; k < k1; k++) {
          const c = fluid[k];
          x[c] += coef * dir[c];
          const rc = res[c] - coef * adir[c];
          res[c] = rc;
          terms[k] = rc * rc;
        }
        break;
      case TASK.cgDot: // z·r
        for (let k = k0; k < k1; k++) { const c = fluid[k]; terms[k] = zv[c] * res[c]; }
        break;
      default: // TASK.cgDirection: dir = z + β·dir
        for (let k = k0; k < k1; k++) { const c = fluid[k]; dir[c] = zv[c] + coef * dir[c]; }
    }
  }
}

/**
 * Waits until a[i] ≥ value and returns the value seen: spins, then sleeps on a[i] after raising a[flag] so that
 * the writer (publish) wakes it. Atomics.wait sleeps only while a[i] still holds the value last seen, so a store
 * between the check and the sleep is never missed.
 */
export function waitAtLeast(a: Int32Array, i: number, value: number, flag: number): number {
  let seen = Atomics.load(a, i);
  let slept = false;
  for (let spin = 0; seen < value; spin++) {
    if (spin > SPINS) {
      if (!slept) { Atomics.store(a, flag, 1); slept = true; }
      seen = Atomics.load(a, i);
      if (seen >= value) break;
      Atomics.wait(a, i, seen, 20);
    }
    seen = Atomics.load(a, i);
  }
  if (slept) Atomics.store(a, flag, 0);
  return seen;
}

/** Stores a[i] = value and wakes a thread sleeping on it (one that raised a[flag]). */
export function publish(a: Int32Array, i: number, value: number, flag: number): void {
  Atomics.store(a, i, value);
  // the sleeper lowers the flag itself once it has what it waited for: a notify is never lost
  if (Atomics.load(a, flag) !== 0) Atomics.notify(a, i);
}

/**
 * splatFacesAndCentre (kernel.ts) restricted to the nodes in rows whose flag (flags[base + row]) equals `which`:
 * the same weights in the same order, the other rows left alone.
 */
function splatRows(
  K: Bilinear, flags: Uint8Array, base: number, which: number,
  fu: Float64Array, wu: Float64Array, u: number, fv: Float64Array, wv: Float64Array, v: number, dens: Float64Array,
): void {
  const nx = K.nx, iMax = nx - 2, jMax = (fu.length / nx) - 2;
  const ax = K.X, ay = K.Y, bx = K.X - 0.5, by = K.Y - 0.5;
  let ia = ax | 0; if (ia > iMax) ia = iMax;
  let ib = bx | 0; if (ib > iMax) ib = iMax;
  let ja = ay | 0; if (ja > jMax) ja = jMax;
  let jb = by | 0; if (jb > jMax) jb = jMax;
  const sa = ax - ia, sb = bx - ib, ta = ay - ja, tb = by - jb;
  const rb0 = flags[base + jb] === which, rb1 = flags[base + jb + 1] === which;
  const ra0 = flags[base + ja] === which, ra1 = flags[base + ja + 1] === which;
  let n0 = ia + nx * jb;
  let w = (1 - sa) * (1 - tb); if (rb0) { fu[n0] += u * w; wu[n0] += w; }
  w = sa * (1 - tb); if (rb0) { fu[n0 + 1] += u * w; wu[n0 + 1] += w; }
  w = sa * tb; if (rb1) { fu[n0 + nx + 1] += u * w; wu[n0 + nx + 1] += w; }
  w = (1 - sa) * tb; if (rb1) { fu[n0 + nx] += u * w; wu[n0 + nx] += w; }
  n0 = ib + nx * ja;
  w = (1 - sb) * (1 - ta); if (ra0) { fv[n0] += v * w; wv[n0] += w; }
  w = sb * (1 - ta); if (ra0) { fv[n0 + 1] += v * w; wv[n0 + 1] += w; }
  w = sb * ta; if (ra1) { fv[n0 + nx + 1] += v * w; wv[n0 + nx + 1] += w; }
  w = (1 - sb) * ta; if (ra1) { fv[n0 + nx] += v * w; wv[n0 + nx] += w; }
  n0 = ib + nx * jb;
  if (rb0) { dens[n0] += (1 - sb) * (1 - tb); dens[n0 + 1] += sb * (1 - tb); }
  if (rb1) { dens[n0 + nx + 1] += sb * tb; dens[n0 + nx] += (1 - sb) * tb; }
}
