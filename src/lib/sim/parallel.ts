// One bake on several threads: a team of threads (the caller's thread is rank 0) runs the heavy stages of the
// step over the solver's own arrays, moved onto SharedArrayBuffers, each thread on a fixed share (particles by
// index range, grid rows by band, hash rows as a wavefront; parallel-kernels.ts). Every threaded stage gives
// the serial stage's bytes (fixed partitions, and every sum made in the serial order), so a bake on N threads is
// a bake on one, and run twice it is bit-identical. Pure TypeScript over SharedArrayBuffer and Atomics: the
// threads themselves are started by the host (Node worker_threads: src/lib/bake/solver-team.ts).
// Synchronisation: the main thread writes a task into the control block, bumps `gen` and notifies; each
// worker runs its share and counts itself into `done`; the main thread runs its own share, then waits for all.
import { integrate, separate, particlesToGrid, gridToParticles, type FlipState } from './stages';
import { applyMic0, useMic0Applier, useCgSolver, type Coupling, type PreconditionerOps } from './pressure';
import { CTRL, PARAM, TASK, TeamKernels, type TeamLayout } from './parallel-kernels';

export type { TeamLayout } from './parallel-kernels';

/** The host's side of a team: how to reach its worker threads. */
export interface TeamTransport {
  /** Worker threads (the caller's thread is one more). */
  readonly workers: number;
  /** Sends the attach message to every worker (each calls runTeamMember with it). */
  post(message: TeamAttach): void;
}

export interface TeamAttach { type: 'attach'; layout: TeamLayout }

/**
 * How a team's solvers pick between a stage's threaded and serial run, which give the same bytes:
 * 'adaptive' (default) runs whichever was faster lately, trying the other now and then — on a machine whose
 * cores are busy with other work, waiting on a descheduled thread can cost more than the threads save;
 * 'threaded' always runs the threaded stage (tests, benchmarks).
 */
export type TeamSchedule = 'adaptive' | 'threaded';

/** How many spins the main thread makes on `done` before it sleeps on it. */
const SPINS = 4000;
/** A task no worker finished for this long means a worker thread died (its exit cannot reach a blocked thread). */
const STALL_MS = 120_000;

/** Sleeps on ctrl[slot] until it reaches `value`; throws after STALL_MS without a change. */
function waitFor(ctrl: Int32Array, slot: number, value: number, spins: number): void {
  let spin = 0, since = 0;
  for (let d = Atomics.load(ctrl, slot); d < value; d = Atomics.load(ctrl, slot)) {
    if (++spin <= spins) continue;
    if (since === 0) since = Date.now();
    else if (Date.now() - since > STALL_MS) throw new Error('solver team: a worker thread stopped answering');
    Atomics.wait(ctrl, slot, d, 50);
  }
}

/**
 * A team of threads for solvers: `threads` = workers + the caller. Attached to one solver at a time (the one
 * that stepped last; stepping another re-attaches, which costs a message round trip).
 */
export class SolverTeam {
  readonly threads: number;
  private readonly ctrlBuffer = new SharedArrayBuffer(4 * CTRL.size);
  private readonly paramsBuffer = new SharedArrayBuffer(8 * PARAM.size);
  readonly ctrl = new Int32Array(this.ctrlBuffer);
  readonly params = new Float64Array(this.paramsBuffer);
  private current: ThreadedStages | null = null;
  private closed = false;

  constructor(private readonly transport: TeamTransport, readonly schedule: TeamSchedule = 'adaptive') {
    this.threads = transport.workers + 1;
  }

  /** Moves the solver state's arrays onto shared memory and returns its threaded stages. */
  attach(S: FlipState): ThreadedStages {
    return new ThreadedStages(this, S, shareArrays(S), this.ctrlBuffer, this.paramsBuffer);
  }

  /** Makes `stages` the attached solver (workers build their views of its arrays); waits until they have. */
  use(stages: ThreadedStages): void {
    if (this.current === stages) return;
    if (this.closed) throw new Error('solver team: used after close()');
    if (this.current) this.runTask(TASK.detach, null);
    this.current = null;
    Atomics.store(this.ctrl, CTRL.ready, 0);
    this.transport.post({ type: 'attach', layout: stages.layout });
    waitFor(this.ctrl, CTRL.ready, this.threads - 1, 0);
    this.current = stages;
  }

  /** Runs `task` on every thread (rank 0 here, with `main`'s kernels) and returns when all are done. */
  runTask(task: number, main: TeamKernels | null): void {
    const ctrl = this.ctrl;
    Atomics.store(ctrl, CTRL.done, 0);
    Atomics.store(ctrl, CTRL.task, task);
    Atomics.add(ctrl, CTRL.gen, 1);
    Atomics.notify(ctrl, CTRL.gen);
    if (main) main.run(task, this.threads);
    waitFor(ctrl, CTRL.done, this.threads - 1, SPINS);
  }

  /** Ends the workers' loops (they return to their event loop; the host then ends them). */
  close(): void {
    if (this.closed) return;
    this.closed = true;
    Atomics.store(this.ctrl, CTRL.stop, 1);
    Atomics.add(this.ctrl, CTRL.gen, 1);
    Atomics.notify(this.ctrl, CTRL.gen);
    this.current = null;
  }
}

/**
 * A worker's part: builds its kernels over the attached solver, then runs tasks until the main thread detaches
 * it (returns, so that the worker's event loop receives the next attach) or closes the team.
 */
export function runTeamMember(message: TeamAttach, rank: number): void {
  const K = new TeamKernels(message.layout, rank);
  const ctrl = K.ctrl, threads = message.layout.threads;
  let seen = Atomics.load(ctrl, CTRL.gen);
  Atomics.add(ctrl, CTRL.ready, 1);
  Atomics.notify(ctrl, CTRL.ready);
  for (;;) {
    let g = Atomics.load(ctrl, CTRL.gen);
    for (let spin = 0; g === seen; spin++) {
      if (spin > SPINS) Atomics.wait(ctrl, CTRL.gen, seen, 1000);
      g = Atomics.load(ctrl, CTRL.gen);
    }
    seen = g;
    if (Atomics.load(ctrl, CTRL.stop) !== 0) return;
    const task = Atomics.load(ctrl, CTRL.task);
    if (task !== TASK.detach) K.run(task, threads);
    const d = Atomics.add(ctrl, CTRL.done, 1) + 1;
    if (d === threads - 1) Atomics.notify(ctrl, CTRL.done);
    if (task === TASK.detach) return;
  }
}

type Typed = Float32Array | Float64Array | Int32Array | Uint8Array;

/**
 * Replaces every typed array of the solver state by a copy on a SharedArrayBuffer (same contents); returns
 * them by field name. Called before anything else holds the arrays (createSolver, right after the state).
 */
function shareArrays(S: FlipState): TeamLayout['arrays'] {
  const out: TeamLayout['arrays'] = {};
  const fields = S as unknown as Record<string, unknown>;
  for (const name of Object.keys(fields)) {
    const a = fields[name];
    let kind: 'f32' | 'f64' | 'i32' | 'u8';
    if (a instanceof Float32Array) kind = 'f32';
    else if (a instanceof Float64Array) kind = 'f64';
    else if (a instanceof Int32Array) kind = 'i32';
    else if (a instanceof Uint8Array) kind = 'u8';
    else continue;
    const src = a as Typed;
    let shared: Typed;
    if (src.buffer instanceof SharedArrayBuffer) shared = src;
    else {
      const buffer = new SharedArrayBuffer(Math.max(1, src.byteLength));
      shared = kind === 'f32' ? new Float32Array(buffer, 0, src.length) : kind === 'f64' ? new Float64Array(buffer, 0, src.length)
        : kind === 'i32' ? new Int32Array(buffer, 0, src.length) : new Uint8Array(buffer, 0, src.length);
      (shared as Float64Array).set(src as Float64Array);
      fields[name] = shared;
    }
    out[name] = { kind, buffer: shared.buffer as SharedArrayBuffer };
  }
  return out;
}

/** Calls between two tries of the run not currently chosen (adaptive schedule): from the first, doubling while the chosen one stays faster. */
const PROBE_FIRST = 8, PROBE_MOST = 512;

/**
 * One stage's choice between its threaded and serial run (the same bytes either way): an exponential mean of
 * each's wall time, the faster chosen, the other tried again after a number of calls that doubles each time
 * the try confirms the choice (so a run far slower costs little), and starts over when it does not.
 */
class StageChoice {
  private threadedMs = -1; private serialMs = -1;
  private sinceProbe = 0; private probeEvery = PROBE_FIRST;
  constructor(private readonly adaptive: boolean) {}

  run(threaded: () => void, serial: () => void): void {
    if (!this.adaptive) { threaded(); return; }
    let useThreads: boolean, probing = false;
    if (this.threadedMs < 0) useThreads = true;
    else if (this.serialMs < 0) useThreads = false;
    else {
      const faster = this.threadedMs <= this.serialMs;
      probing = ++this.sinceProbe >= this.probeEvery;
      useThreads = probing ? !faster : faster;
    }
    const t0 = performance.now();
    if (useThreads) threaded(); else serial();
    const ms = performance.now() - t0;
    const before = this.threadedMs <= this.serialMs;
    if (useThreads) this.threadedMs = this.threadedMs < 0 ? ms : 0.75 * this.threadedMs + 0.25 * ms;
    else this.serialMs = this.serialMs < 0 ? ms : 0.75 * this.serialMs + 0.25 * ms;
    if (probing) {
      this.sinceProbe = 0;
      const after = this.threadedMs <= this.serialMs;
      this.probeEvery = after === before ? Math.min(PROBE_MOST, 2 * this.probeEvery) : PROBE_FIRST;
    }
  }
}

/** The threaded stages of one solver (createSolver uses these in place of the serial ones when it has a team). */
export class ThreadedStages {
  readonly layout: TeamLayout;
  readonly threads: number;
  private readonly K: TeamKernels;
  private readonly xA: Float32Array;
  private readonly progress: Int32Array;
  private readonly choice: Record<'integrate' | 'separate' | 'p2g' | 'g2p' | 'mic0' | 'cg', StageChoice>;
  private readonly micProgress: Int32Array;

  constructor(private readonly team: SolverTeam, private readonly S: FlipState, arrays: TeamLayout['arrays'], ctrl: SharedArrayBuffer, params: SharedArrayBuffer) {
    const T = team.threads;
    this.threads = T;
    const stride = Math.ceil(S.cap / T) + 1;
    this.layout = {
      threads: T, arrays, ctrl, params,
      touch: new SharedArrayBuffer(T * S.ny), deferRows: new SharedArrayBuffer(T * S.ny),
      deferred: new SharedArrayBuffer(4 * T * stride), deferredCount: new SharedArrayBuffer(4 * T), deferredStride: stride,
      progress: new SharedArrayBuffer(4 * 2 * Math.max(1, S.hny)), partials: new SharedArrayBuffer(8 * T * 4),
      rowStart: new SharedArrayBuffer(4 * (S.ny + 1)), micProgress: new SharedArrayBuffer(4 * 2 * S.ny),
      terms: new SharedArrayBuffer(8 * S.nc),
      nx: S.nx, ny: S.ny, invH: S.invH, gx: S.gx, gy: S.gy, flipRatio: S.flipRatio, hnx: S.hnx, hny: S.hny, radius: S.radius,
    };
    this.K = new TeamKernels(this.layout, 0);
    this.xA = S.x;
    const adaptive = team.schedule === 'adaptive';
    this.choice = {
      integrate: new StageChoice(adaptive), separate: new StageChoice(adaptive), p2g: new StageChoice(adaptive), g2p: new StageChoice(adaptive),
      mic0: new StageChoice(adaptive), cg: new StageChoice(adaptive),
    };
    this.micProgress = new Int32Array(this.layout.micProgress);
    // the pressure and drift solves' MIC(0) preconditioner (pressure.ts) as two wavefronts
    useMic0Applier(S, { prepare: () => this.prepareMic0(), apply: () => this.applyMic0() });
    // and their conjugate gradient: the per-cell loops on the threads, every dot product summed here in order
    useCgSolver(S, (x, bNorm, maxIterations, tolerance, pre, coupling, here) => this.pcgSolve(x, bNorm, maxIterations, tolerance, pre, coupling, here));
    this.progress = new Int32Array(this.layout.progress);
  }

  /** Attaches and writes the per-step values every task reads (particle count, which particle buffers are current). */
  private begin(): void {
    this.team.use(this);
    const ctrl = this.team.ctrl;
    ctrl[CTRL.n] = this.S.n;
    ctrl[CTRL.parity] = this.S.x === this.xA ? 0 : 1;
  }

  /** Stage 1, integrate (stages.ts). */
  integrate(dt: number): void {
    this.choice.integrate.run(() => {
      this.begin();
      this.team.params[PARAM.dt] = dt;
      this.team.runTask(TASK.integrate, this.K);
    }, () => integrate(this.S, dt));
  }

  /** Stage 2, separate (stages.ts): each iteration one wavefront over the hash rows. */
  separate(iterations: number): void {
    this.choice.separate.run(() => {
      this.begin();
      for (let it = 0; it < iterations; it++) {
        this.progress.fill(0);
        this.team.runTask(TASK.separate, this.K);
      }
    }, () => separate(this.S, iterations));
  }

  /** Stage 5, particlesToGrid (stages.ts). */
  particlesToGrid(): void {
    this.choice.p2g.run(() => {
      this.begin();
      this.team.runTask(TASK.p2gClear, this.K);
      this.team.runTask(TASK.p2gSplat, this.K);
      this.K.replayDeferred(this.threads);
      this.team.runTask(TASK.p2gFinish, this.K);
    }, () => particlesToGrid(this.S));
  }

  /** After each MIC(0) build: where each grid row's cells start in the fluid list (for the wavefronts). */
  private prepareMic0(): void {
    const { nx, ny, fluid, fluidCount } = this.S;
    const rowStart = this.K.rowStart;
    let k = 0;
    for (let j = 0; j <= ny; j++) {
      const first = j * nx;
      while (k < fluidCount && fluid[k] < first) k++;
      rowStart[j] = k;
    }
  }

  /** z = M⁻¹ r with MIC(0) (applyMic0 in pressure.ts): the forward and the backward substitution, each a wavefront. */
  private applyMic0(): void {
    this.choice.mic0.run(() => {
      this.begin();
      this.micProgress.fill(0);
      this.team.runTask(TASK.micForward, this.K);
      this.micProgress.fill(0);
      this.team.runTask(TASK.micBackward, this.K);
    }, () => applyMic0(this.S));
  }

  /** Σ terms[0 … m) in order (the serial loop's running sum). */
  private sumTerms(m: number): number {
    const t = this.K.terms;
    let s = 0;
    for (let k = 0; k < m; k++) s += t[k];
    return s;
  }

  /**
   * pcgSolve (pressure.ts) with its per-cell loops on the team; returns its iterations. `here` (pcgSolve's own
   * loop) runs instead when x is not one of the state's two unknowns, or when the adaptive schedule picks it.
   */
  private pcgSolve(x: Float64Array, bNorm: number, maxIterations: number, tolerance: number, pre: PreconditionerOps, coupling: Coupling | undefined, here: () => number): number {
    const S = this.S;
    const vector = x === S.q ? 0 : x === S.driftPotential ? 1 : -1;
    if (vector < 0) return here();
    let it = 0;
    this.choice.cg.run(() => { it = this.pcgThreaded(vector, x, bNorm, maxIterations, tolerance, pre, coupling); }, () => { it = here(); });
    return it;
  }

  private pcgThreaded(vector: number, x: Float64Array, bNorm: number, maxIterations: number, tolerance: number, pre: PreconditionerOps, coupling?: Coupling): number {
    const { team, K, S } = this;
    const m = S.fluidCount;
    this.begin();
    team.ctrl[CTRL.fluidCount] = m;
    team.ctrl[CTRL.cgVector] = vector;
    const params = team.params;
    // r = b − (A + C) x0
    team.runTask(TASK.cgResidual, K);
    coupling?.apply(x, S.res, -1);
    team.runTask(TASK.cgSquares, K);
    let rr = this.sumTerms(m);
    const stop = tolerance * bNorm;
    let it = 0;
    if (Math.sqrt(rr) > stop) {
      pre.setup();
      pre.apply();
      this.begin(); // the preconditioner may have run serially: re-state the team's values
      team.ctrl[CTRL.fluidCount] = m;
      team.ctrl[CTRL.cgVector] = vector;
      team.runTask(TASK.cgStart, K);
      let sigma = this.sumTerms(m);
      for (it = 1; it <= maxIterations; it++) {
        team.runTask(TASK.cgMatvec, K);
        let dAd = this.sumTerms(m);
        if (coupling) dAd += coupling.apply(S.dir, S.adir, 1);
        if (!(dAd > 0)) break;
        params[PARAM.coefficient] = sigma / dAd;
        team.runTask(TASK.cgUpdate, K);
        rr = this.sumTerms(m);
        if (Math.sqrt(rr) <= stop) break;
        pre.apply();
        team.runTask(TASK.cgDot, K);
        const sigmaNew = this.sumTerms(m);
        params[PARAM.coefficient] = sigmaNew / sigma;
        sigma = sigmaNew;
        team.runTask(TASK.cgDirection, K);
      }
      if (it > maxIterations) it = maxIterations;
    }
    return it;
  }

  /** Stage 9, gridToParticles (stages.ts); sets S.maxSpeed from the threads' largest squared speeds (a max: exact). */
  gridToParticles(dt: number): void {
    this.choice.g2p.run(() => {
      this.begin();
      this.team.params[PARAM.dt] = dt;
      this.team.runTask(TASK.g2pFaces, this.K);
      this.team.runTask(TASK.g2pParticles, this.K);
      let max2 = 0;
      const partials = this.K.partials;
      for (let r = 0; r < this.threads; r++) if (partials[r] > max2) max2 = partials[r];
      this.S.maxSpeed = Math.sqrt(max2);
    }, () => gridToParticles(this.S, dt));
  }
}

let defaultTeam: SolverTeam | null = null;

/** A team every createSolver without a `team` option uses (tests set it from TIDEMARK_TEST_THREADS); null for none. */
export function setDefaultSolverTeam(team: SolverTeam | null): void {
  defaultTeam = team;
}

/** The team createSolver uses when its options name none. */
export function defaultSolverTeam(): SolverTeam | null {
  return defaultTeam;
}

/** Options of createSolver for a threaded bake. */
export interface ThreadOptions {
  /** Run the heavy stages on this team's threads (a team of 1 thread, or none, is the serial step). */
  team?: SolverTeam | null;
}
