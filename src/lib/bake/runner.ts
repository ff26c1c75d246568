// A bake worker's loop, run in the parent thread: claim a job, hold its lease on a timer, bake it in a bake thread
// while its clip chunks stream to the store, then record the result. The solver never runs on this thread.
import { hostname } from 'node:os';
import { setTimeout as sleep } from 'node:timers/promises';
import { headObject, putBytes } from '../server/storage';
import { acknowledgeCancel, claimNext, clearAttemptObjects, completeJob, failAttempt, releaseJob, type ClaimedJob } from './queue';
import { sceneFromDocument, SceneError } from './bake';
import { SOLVER_BUILD } from './build';
import { bakeHealth } from '../sim/health';
import { BakeCancelled, holdLease, LeaseLost } from './lease';
import { BakeThread, ThreadOutOfMemory } from './host';
import { ClipUpload } from './clip-upload';

export interface RunnerOptions {
  workerId?: string;
  /** Wait between empty polls, ms. */
  pollMs?: number;
  signal?: AbortSignal;
  log?: (line: string) => void;
  /** The thread that runs the solver (one is made when not given). */
  thread?: BakeThread;
}

export function defaultWorkerId(slot: number | string): string {
  return `${hostname()}:${process.pid}:${slot}`;
}

/** The worker is stopping: its job goes back to the queue. */
export class ShuttingDown extends Error {}

const CLIP_TYPE = 'application/x-tidemark-clip';
const never = new AbortController().signal;

/** Runs one claimed job to its end (done, retry, failed, cancelled, released, or lost to another worker). */
export async function runJob(job: ClaimedJob, workerId: string, thread: BakeThread, log: (s: string) => void, stopping: AbortSignal = never): Promise<string> {
  const lease = holdLease(job.jobId, workerId, log);
  const signal = AbortSignal.any([lease.signal, stopping]);
  const upload = new ClipUpload(job.keys.clip, CLIP_TYPE, signal);
  try {
    const scene = sceneFromDocument(job.scene);
    const baked = await thread.bake(scene, job.sceneHash, { onFrame: (done) => lease.progress(done), onChunk: (c) => (upload.add(c), upload.room()) }, signal);
    // the health verdict goes with the stats (for the player) and into the clip meta (for the server)
    const health = bakeHealth(scene, baked.stats);
    const statsJson = new TextEncoder().encode(JSON.stringify({ solverBuild: SOLVER_BUILD, health, frames: baked.stats }));
    await putBytes(job.keys.stats, statsJson, 'application/json', signal);
    // Size and SHA-256 computed from the bytes sent (clip-upload.ts); the store is asked for the size only, the clip
    // is never downloaded again.
    const { bytes, sha256 } = await upload.finish(baked.head);
    const stored = await headObject(job.keys.clip);
    if (stored?.size !== bytes) throw new Error(`the store holds ${stored?.size ?? 'no'} bytes of a ${bytes}-byte clip`);
    signal.throwIfAborted();
    const particleFrames = baked.stats.reduce((a, s) => a + s.count, 0);
    const ok = await completeJob(
      job,
      workerId,
      {
        key: job.keys.clip,
        bytes,
        sha256,
        meta: {
          sceneHash: job.sceneHash,
          solverBuild: SOLVER_BUILD,
          frames: baked.framesTotal,
          particleCapacity: baked.particleCapacity,
          bytesPerParticleFrame: particleFrames ? bytes / particleFrames : 0,
          health,
        },
      },
      { key: job.keys.stats, bytes: statsJson.length },
    );
    if (ok) return 'done';
    await clearOwnObjects(job, log);
    return 'lost';
  } catch (caught) {
    // An abort shows up as whatever the interrupted call threw: the signal's reason says why.
    const err = signal.aborted ? signal.reason : caught;
    lease.stop();
    await upload.abort();
    const outcome = await endAttempt(job, workerId, err, log);
    await clearOwnObjects(job, log);
    return outcome;
  } finally {
    lease.stop();
  }
}

/** Records why the attempt stopped; returns the outcome's name. */
async function endAttempt(job: ClaimedJob, workerId: string, err: unknown, log: (s: string) => void): Promise<string> {
  if (err instanceof ShuttingDown) {
    await releaseJob(job, workerId).catch(() => {});
    log(`job ${job.jobId}: handed back to the queue (worker stopping)`);
    return 'released';
  }
  if (err instanceof LeaseLost) {
    log(`job ${job.jobId}: lease lost (${err.message}); solve and upload stopped`);
    return 'lost';
  }
  if (err instanceof BakeCancelled) {
    await acknowledgeCancel(job, workerId).catch(() => {});
    return 'cancelled';
  }
  const message = err instanceof Error ? err.message : String(err);
  const retryable = !(err instanceof SceneError || err instanceof ThreadOutOfMemory);
  const outcome = await failAttempt(job, workerId, describe(message), retryable).catch(() => 'lost');
  log(`job ${job.jobId}: attempt ${job.attempt} failed (${outcome}): ${message}`);
  return outcome;
}

/** Deletes what this attempt may have stored (it did not become the version's clip). */
async function clearOwnObjects(job: ClaimedJob, log: (s: string) => void) {
  await clearAttemptObjects(job.attemptId, job.keys).catch((e) =>
    log(`job ${job.jobId}: could not delete attempt ${job.attemptId}'s objects (the next claim or completion retries): ${e instanceof Error ? e.message : e}`),
  );
}

/** Turns low-level errors into a line a studio can act on. */
function describe(message: string): string {
  if (/ECONNREFUSED|ENOTFOUND|socket hang up|ETIMEDOUT|EAI_AGAIN|ECONNRESET/i.test(message)) {
    return `could not reach the object store (${message.slice(0, 120)})`;
  }
  return message.slice(0, 500);
}

/** Claims and bakes jobs until the signal aborts (a running job is then handed back). */
export async function runBakeLoop(o: RunnerOptions = {}): Promise<void> {
  const workerId = o.workerId ?? defaultWorkerId(0);
  const pollMs = o.pollMs ?? Number(process.env.BAKE_POLL_MS ?? 1000);
  const log = o.log ?? ((s: string) => console.log(`[bake ${workerId}] ${s}`));
  const thread = o.thread ?? new BakeThread(log);
  thread.warm();
  const stopping = new AbortController();
  o.signal?.addEventListener('abort', () => stopping.abort(new ShuttingDown('the worker is stopping')), { once: true });
  while (!stopping.signal.aborted) {
    let job: ClaimedJob | null = null;
    try {
      job = await claimNext(workerId);
    } catch (err) {
      log(`could not reach the queue: ${err instanceof Error ? err.message : err}`);
    }
    if (!job) {
      await sleep(pollMs, undefined, { signal: stopping.signal }).catch(() => {});
      continue;
    }
    log(`job ${job.jobId} (version ${job.versionId}) attempt ${job.attempt}: baking`);
    const outcome = await runJob(job, workerId, thread, log, stopping.signal);
    log(`job ${job.jobId}: ${outcome}`);
  }
  await thread.end();
}
