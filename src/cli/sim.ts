// Headless bake: reads a scene document, steps the solver and writes one JSON line per frame,
// the first being the initial state at startFrame:
//   {"frame":1001,"time":0,"count":N,"x":[…],"y":[…],"u":[…],"v":[…],"liquid":[…],"props":[…]}   (metres, m/s)
// liquid: index into the scene's liquids per particle; props: every prop's {id,x,y,angle,vx,vy,spin}
// (centroid in tank metres, angle in degrees, velocities in m/s and deg/s).
// Usage: npx tsx src/cli/sim.ts --scene <scene.json> --out <frames.jsonl> [--frames N]
// N = number of lines written (default: the whole frame range). Exit code 2 + one line on a bad scene.
import { once } from 'node:events';
import { readFileSync, createWriteStream } from 'node:fs';
import { parseScene, formatSceneErrors } from '../lib/scene/schema';
import { frameCount, frameToTime } from '../lib/scene/time';
import { createSolver, type Solver, type PropState } from '../lib/sim/solver';

function fail(message: string, code = 2): never {
  process.stderr.write(message.replace(/\s*\n\s*/g, ' ') + '\n');
  process.exit(code);
}

function arg(name: string): string | undefined {
  const i = process.argv.indexOf(name);
  return i >= 0 ? process.argv[i + 1] : undefined;
}

/** Number array as JSON; float32 values are written with the digits that round-trip them exactly. */
function list(a: Float32Array | Uint8Array): string {
  let s = '[';
  for (let i = 0; i < a.length; i++) s += (i ? ',' : '') + a[i];
  return s + ']';
}

function frameLine(sim: Solver, props: PropState[]): string {
  const t = frameToTime(sim.scene.timing, sim.frame);
  return `{"frame":${sim.frame},"time":${t},"count":${sim.count},"x":${list(sim.x)},"y":${list(sim.y)},"u":${list(sim.u)},"v":${list(sim.v)},`
    + `"liquid":${list(sim.liquid)},"props":${JSON.stringify(props)}}\n`;
}

async function main(): Promise<void> {
  const scenePath = arg('--scene'), outPath = arg('--out'), framesArg = arg('--frames');
  if (!scenePath || !outPath) fail('usage: sim.ts --scene <scene.json> --out <frames.jsonl> [--frames N]');
  let text: string;
  try { text = readFileSync(scenePath, 'utf8'); } catch (e) { fail(`cannot read scene ${scenePath}: ${(e as Error).message}`); }
  const parsed = parseScene(text);
  if (!parsed.ok) fail(`invalid scene ${scenePath}: ${formatSceneErrors(parsed.errors)}`);
  const scene = parsed.scene;
  const total = framesArg === undefined ? frameCount(scene.timing) : Number(framesArg);
  if (!Number.isInteger(total) || total < 1) fail(`--frames must be a whole number ≥ 1 (got ${framesArg})`);
  const sim = createSolver(scene);
  const out = createWriteStream(outPath);
  // One error listener for the whole bake (a listener per line piled up: MaxListenersExceededWarning on long bakes);
  // a write waits only when the stream's buffer is full, and a stream error fails the bake at the next line.
  let streamError: Error | null = null;
  out.on('error', (e) => { streamError = e; });
  const write = async (s: string) => {
    if (streamError) throw streamError;
    if (!out.write(s)) await once(out, 'drain');
  };
  await write(frameLine(sim, sim.stats().props));
  for (let f = 1; f < total; f++) {
    const st = sim.stepFrame();
    await write(frameLine(sim, st.props));
  }
  await new Promise<void>((res, rej) => out.end((e?: Error | null) => (e ? rej(e) : res())));
}

main().catch((e) => fail(`sim failed: ${(e as Error).message}`, 1));
