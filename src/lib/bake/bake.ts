// Bakes a scene into a clip: runs the solver frame by frame and encodes every frame. Pure TypeScript.
import { parseScene, formatSceneErrors, type Scene } from '../scene';
import { createSolver, type FrameStats } from '../sim';
import type { SolverTeam } from '../sim/parallel';
import { ClipWriter } from '../clip/encode';
import { clipLookOf } from '../clip/look';
import { SOLVER_BUILD } from './build';

export interface BakeHooks {
  /** Called after each frame (framesDone counts the initial frame); resolve to 'stop' to abandon the bake. */
  onFrame?: (framesDone: number, framesTotal: number) => Promise<'go' | 'stop'> | 'go' | 'stop';
  /** Receives each compressed clip chunk as it is made (a streaming bake); the result's clip is then only its head. */
  onChunk?: (chunk: Uint8Array) => void;
}

export interface BakeResult {
  /** The whole clip, or with onChunk only the bytes before the first chunk (magic, header, index). */
  clip: Uint8Array;
  stats: FrameStats[];
  framesTotal: number;
  particleCapacity: number;
}

/** A scene that cannot be baked (invalid document): retrying will not help. */
export class SceneError extends Error {}

/** Parses a stored scene document, throwing SceneError with the validation messages. */
export function sceneFromDocument(doc: unknown): Scene {
  const parsed = parseScene(doc);
  if (!parsed.ok) throw new SceneError(`The scene is not valid: ${formatSceneErrors(parsed.errors)}`);
  return parsed.scene;
}

/**
 * Bakes every frame of the scene's range; returns null when a hook stopped it. With a team of N threads
 * (src/lib/sim/parallel.ts) the heavy stages run on them; the frames are the same bytes as on one thread.
 */
export async function bakeScene(scene: Scene, sceneHash: string, hooks: BakeHooks = {}, options: { team?: SolverTeam | null } = {}): Promise<BakeResult | null> {
  const { startFrame, endFrame, fps } = scene.timing;
  const framesTotal = endFrame - startFrame + 1;
  const sim = createSolver(scene, { team: options.team });
  const writer = new ClipWriter({
    startFrame,
    endFrame,
    fps,
    tankWidth: scene.tank.width,
    tankHeight: scene.tank.height,
    particleCapacity: sim.capacity,
    solverBuild: SOLVER_BUILD,
    sceneHash,
    look: clipLookOf(scene),
    onChunk: hooks.onChunk,
    diffuse: true,
  });
  const stats: FrameStats[] = [];
  const first = sim.stats();
  writer.addFrame(sim.count, sim.x, sim.y, sim.u, sim.v, { liquid: sim.liquid, props: first.props, diffuse: sim.diffuse });
  stats.push(first);
  if ((await hooks.onFrame?.(1, framesTotal)) === 'stop') return null;
  for (let done = 1; done < framesTotal; done++) {
    const s = sim.stepFrame();
    writer.addFrame(sim.count, sim.x, sim.y, sim.u, sim.v, { liquid: sim.liquid, props: s.props, diffuse: sim.diffuse });
    stats.push(s);
    if ((await hooks.onFrame?.(done + 1, framesTotal)) === 'stop') return null;
  }
  return { clip: hooks.onChunk ? writer.finishHead() : writer.finish(), stats, framesTotal, particleCapacity: sim.capacity };
}
