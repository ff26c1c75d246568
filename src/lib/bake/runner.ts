// A bake worker's loop: claim a job, bake it while renewing the lease, store the clip, record the result.
import { hostname } from 'node:os';
import { setTimeout as sleep } from 'node:timers/promises';
import { putObject } from '../server/storage';
import { acknowledgeCancel, claimNext, completeJob, failAttempt, queueSettings, releaseJob, renewLease, type ClaimedJob } from './queue';
import { bakeScene, sceneFromDocument, SceneError } from './bake';
import { SOLVER_BUILD } from './build';
import { bakeHealth } from '../sim/health';

export interface RunnerOptions {
  workerId?: string;
  /** Wait between empty polls, ms. */
  pollMs?: number;
  signal?: AbortSignal;
  log?: (line: string) => void;
}

export function defaultWorkerId(slot: number | string): string {
  return `${hostname()}:${process.pid}:${slot}`;
}

/** Object-store keys of a bake's outputs (content-addressed by scene and solver build, per studio). */
export function clipKeys(studioId: number, sceneHash: string, jobId: number) {
  const base = `studios/${studioId}/clips/${sceneHash}-${SOLVER_BUILD.replace(/[^a-z0-9]+/gi, '_')}-${jobId}`;
  return { clip: `${base}.tdmclip`, stats: `${base}.stats.json` };
}

class LostLease extends Error {}
class ShuttingDown extends Error {}

/** Runs one claimed job to its end (done, retry, failed, cancelled, or lost to another worker). */
export async function runJob(job: ClaimedJob, workerId: string, log: (s: string) => void, signal?: AbortSignal): Promise<string> {
  const { leaseMs } = queueSettings();
  const renewEvery = leaseMs / 3;
  let lastRenew = Date.now();
  let cancelled = false;
  try {
    const scene = sceneFromDocument(job.scene);
    const result = await bakeScene(scene, job.sceneHash, {
      onFrame: async (done) => {
        if (signal?.aborted) throw new ShuttingDown();
        if (Date.now() - lastRenew < renewEvery) return 'go';
        lastRenew = Date.now();
        const lease = await renewLease(job.jobId, workerId, done);
        if (lease === 'lost') throw new LostLease();
        if (lease === 'cancel') {
          cancelled = true;
          return 'stop';
        }
        return 'go';
      },
    });
    if (!result || cancelled) {
      await acknowledgeCancel(job, workerId);
      return 'cancelled';
    }
    const lease = await renewLease(job.jobId, workerId, result.framesTotal - 1);
    if (lease === 'lost') throw new LostLease();
    const keys = clipKeys(job.studioId, job.sceneHash, job.jobId);
    // the health verdict goes with the stats (for the player) and into the clip meta (for the server)
    const health = bakeHealth(scene, result.stats);
    const statsJson = new TextEncoder().encode(JSON.stringify({ solverBuild: SOLVER_BUILD, health, frames: result.stats }));
    await putObject(keys.stats, statsJson, 'application/json');
    await putObject(keys.clip, result.clip, 'application/x-tidemark-clip');
    const particleFrames = result.stats.reduce((a, s) => a + s.count, 0);
    const ok = await completeJob(
      job,
      workerId,
      {
        key: keys.clip,
        bytes: result.clip.length,
        meta: {
          sceneHash: job.sceneHash,
          solverBuild: SOLVER_BUILD,
          frames: result.framesTotal,
          particleCapacity: result.particleCapacity,
          bytesPerParticleFrame: particleFrames ? result.clip.length / particleFrames : 0,
          health,
        },
      },
      { key: keys.stats, bytes: statsJson.length },
    );
    return ok ? 'done' : 'lost';
  } catch (err) {
    if (err instanceof ShuttingDown) {
      await releaseJob(job, workerId).catch(() => {});
      log(`job ${job.jobId}: handed back to the queue (worker stopping)`);
      return 'released';
    }
    if (err instanceof LostLease) {
      log(`job ${job.jobId}: lease lost to another worker; stopping`);
      return 'lost';
    }
    const message = err instanceof Error ? err.message : String(err);
    const retryable = !(err instanceof SceneError);
    const outcome = await failAttempt(job, workerId, describe(message), retryable).catch(() => 'lost');
    log(`job ${job.jobId}: attempt ${job.attempt} failed (${outcome}): ${message}`);
    return outcome;
  }
}

/** Turns low-level errors into a line a studio can act on. */
function describe(message: string): string {
  if (/ECONNREFUSED|ENOTFOUND|socket hang up|ETIMEDOUT|EAI_AGAIN/i.test(message)) {
    return `could not reach the object store (${message.slice(0, 120)})`;
  }
  return message.slice(0, 500);
}

/** Claims and bakes jobs until the signal aborts. */
export async function runBakeLoop(o: RunnerOptions = {}): Promise<void> {
  const workerId = o.workerId ?? defaultWorkerId(0);
  const pollMs = o.pollMs ?? Number(process.env.BAKE_POLL_MS ?? 1000);
  const log = o.log ?? ((s: string) => console.log(`[bake ${workerId}] ${s}`));
  while (!o.signal?.aborted) {
    let job: ClaimedJob | null = null;
    try {
      job = await claimNext(workerId);
    } catch (err) {
      log(`could not reach the queue: ${err instanceof Error ? err.message : err}`);
    }
    if (!job) {
      await sleep(pollMs, undefined, { signal: o.signal }).catch(() => {});
      continue;
    }
    log(`job ${job.jobId} (version ${job.versionId}) attempt ${job.attempt}: baking`);
    const outcome = await runJob(job, workerId, log, o.signal);
    log(`job ${job.jobId}: ${outcome}`);
  }
}
