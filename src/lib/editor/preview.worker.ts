// The live preview's Web Worker: runs the solver on the preview scene and streams each frame's particles back as
// transferable Float32Arrays while the editor stays responsive. One run at a time; a new 'start' replaces it.
import { parseScene, formatSceneErrors } from '../scene/schema';
import { createSolver, type Solver } from '../sim/solver';
import { previewScene, type PreviewMessage, type PreviewRequest } from './preview';
import type { EditorDoc } from './document';

interface Scope { onmessage: ((e: MessageEvent<PreviewRequest>) => void) | null; postMessage(m: PreviewMessage, transfer?: Transferable[]): void }
const scope = self as unknown as Scope;

let solver: Solver | null = null;
let run = 0;
let paused = false;
let timer: ReturnType<typeof setTimeout> | null = null;

function post(m: PreviewMessage, transfer: Transferable[] = []) { scope.postMessage(m, transfer); }

/** Copies the solver's current particles into fresh arrays and sends them (with the frame's stats and prop poses). */
function sendFrame(s: Solver, stats: ReturnType<Solver['stats']>) {
  const n = s.count;
  const x = new Float32Array(n), y = new Float32Array(n), speed = new Float32Array(n);
  const liquid = s.liquid.slice(0, n);
  x.set(s.x); y.set(s.y);
  const u = s.u, v = s.v;
  for (let i = 0; i < n; i++) speed[i] = Math.hypot(u[i], v[i]);
  post({ type: 'frame', run, frame: s.frame, count: n, x, y, speed, liquid, stats, props: stats.props }, [x.buffer, y.buffer, speed.buffer, liquid.buffer]);
}

/** Steps one frame, sends it, and schedules the next (a macrotask between frames lets pause/start messages in). */
function tick() {
  timer = null;
  const s = solver;
  if (!s || paused) return;
  if (s.frame >= s.scene.timing.endFrame) { post({ type: 'done', run, frame: s.frame }); return; }
  try {
    sendFrame(s, s.stepFrame());
  } catch (e) {
    post({ type: 'error', run, message: (e as Error).message });
    solver = null;
    return;
  }
  timer = setTimeout(tick, 0);
}

function schedule() { if (!timer) timer = setTimeout(tick, 0); }

scope.onmessage = (e) => {
  const m = e.data;
  if (m.type === 'start') {
    run = m.run;
    paused = false;
    solver = null;
    const parsed = parseScene(m.scene);
    if (!parsed.ok) { post({ type: 'error', run, message: formatSceneErrors(parsed.errors) }); return; }
    const coarse = parseScene(previewScene(parsed.scene as EditorDoc, m.factor));
    if (!coarse.ok) { post({ type: 'error', run, message: formatSceneErrors(coarse.errors) }); return; }
    try {
      solver = createSolver(coarse.scene);
    } catch (err) {
      post({ type: 'error', run, message: (err as Error).message });
      return;
    }
    post({ type: 'started', run, cells: { nx: solver.grid.nx - 2, ny: solver.grid.ny - 2 }, cellSize: solver.grid.cellSize, capacity: solver.capacity });
    sendFrame(solver, solver.stats());
    schedule();
  } else if (m.type === 'pause' && m.run === run) {
    paused = true;
  } else if (m.type === 'resume' && m.run === run) {
    paused = false;
    schedule();
  } else if (m.type === 'stop') {
    solver = null;
  }
};
