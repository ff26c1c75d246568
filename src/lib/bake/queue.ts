// The bake queue, kept in MariaDB so any number of app servers and bake machines can share it.
// Workers claim jobs with SELECT … FOR UPDATE SKIP LOCKED and hold a lease they renew; a lease that runs out
// puts the job back in the queue. For a queued job, lease_expires_at means "not before" (retry back-off).
// Each claim is a row in bake_attempts with object keys of its own; the objects of attempts that did not finish
// are deleted by whoever learns of them, so a lost attempt leaves nothing behind in the store.
import { randomBytes } from 'node:crypto';
import { and, desc, eq, inArray, notInArray, sql } from 'drizzle-orm';
import { db } from '../server/db';
import { assets, auditLog, bakeAttempts, bakeJobs, versions } from '../server/db/schema';
import { deleteObject } from '../server/storage';
import { audit } from '../server/audit';
import { HttpError } from '../server/http';
import { bakeCostLimitOf, requireBakeWithinLimit } from '../server/versions';
import { parseScene } from '../scene/schema';
import { SOLVER_BUILD } from './build';
import { healthOf } from '../sim/health';

export interface QueueSettings {
  /** How long a claim lasts without renewal, ms. */
  leaseMs: number;
  /** Attempts before a job fails for good. */
  maxAttempts: number;
  /** Wait before a failed attempt is retried, ms. */
  retryDelayMs: number;
}

export function queueSettings(): QueueSettings {
  return {
    leaseMs: Number(process.env.BAKE_LEASE_MS ?? 20_000),
    maxAttempts: Number(process.env.BAKE_MAX_ATTEMPTS ?? 3),
    retryDelayMs: Number(process.env.BAKE_RETRY_DELAY_MS ?? 5_000),
  };
}

const inMs = (ms: number) => sql`DATE_ADD(NOW(3), INTERVAL ${Math.round(ms * 1000)} MICROSECOND)`;

export interface ClaimedJob {
  jobId: number;
  versionId: number;
  studioId: number;
  sceneHash: string;
  attempt: number;
  /** This claim's row in bake_attempts, and the object keys it writes. */
  attemptId: number;
  keys: AttemptKeys;
  scene: unknown;
}

export interface AttemptKeys {
  clip: string;
  stats: string;
}

/**
 * Object-store keys of one attempt's outputs: by studio, scene and solver build, then job, attempt and a random
 * tag, so no two claims ever write the same object.
 */
export function attemptKeys(studioId: number, sceneHash: string, jobId: number, attempt: number): AttemptKeys {
  const tag = randomBytes(4).toString('hex');
  const base = `studios/${studioId}/clips/${sceneHash}-${SOLVER_BUILD.replace(/[^a-z0-9]+/gi, '_')}-${jobId}-a${attempt}-${tag}`;
  return { clip: `${base}.tdmclip`, stats: `${base}.stats.json` };
}

/**
 * Enqueues a bake of the version, or answers with what already exists: the running job, or a stored clip of
 * an identical scene in the same studio (reused, no bake). Freezes the version's scene.
 */
export async function enqueueBake(versionId: number, studioId: number, actorId: string) {
  const settings = queueSettings();
  const costLimit = await bakeCostLimitOf(studioId);
  const result = await db().transaction(async (tx) => {
    const [v] = await tx
      .select()
      .from(versions)
      .where(and(eq(versions.id, versionId), eq(versions.studioId, studioId)))
      .for('update');
    if (!v) throw new HttpError('not_found', 'No such version');
    if (v.bakeState === 'queued' || v.bakeState === 'baking') {
      const [job] = await tx.select().from(bakeJobs).where(eq(bakeJobs.versionId, versionId)).orderBy(desc(bakeJobs.id)).limit(1);
      return { kind: 'running' as const, jobId: job?.id ?? null };
    }
    if (v.bakeState === 'baked' && v.clipAssetId) return { kind: 'baked' as const, jobId: null };
    // An identical scene baked by the same solver build in this studio: point at its clip.
    const [same] = await tx
      .select({ clipAssetId: versions.clipAssetId, meta: assets.meta })
      .from(versions)
      .innerJoin(assets, eq(assets.id, versions.clipAssetId))
      .where(and(eq(versions.studioId, studioId), eq(versions.sceneHash, v.sceneHash), eq(versions.bakeState, 'baked')))
      .limit(5);
    const reusable = same && (same.meta as { solverBuild?: string } | null)?.solverBuild === SOLVER_BUILD ? same : null;
    if (reusable) {
      await tx
        .update(versions)
        .set({ bakeState: 'baked', clipAssetId: reusable.clipAssetId, frozenAt: v.frozenAt ?? new Date() })
        .where(eq(versions.id, versionId));
      return { kind: 'reused' as const, jobId: null };
    }
    // Versions saved before the cost limit existed (or under a studio limit lowered since) are checked again here.
    // A stored scene that no longer parses is left to the worker, which fails the job with the validation message.
    const parsed = parseScene(v.scene);
    if (parsed.ok) requireBakeWithinLimit(parsed.scene, costLimit);
    const scene = v.scene as { timing?: { startFrame?: number; endFrame?: number } };
    const framesTotal = (scene.timing?.endFrame ?? 0) - (scene.timing?.startFrame ?? 0) + 1;
    const [res] = await tx.insert(bakeJobs).values({
      studioId,
      versionId,
      sceneHash: v.sceneHash,
      maxAttempts: settings.maxAttempts,
      framesTotal,
      requestedBy: actorId,
    });
    await tx
      .update(versions)
      .set({ bakeState: 'queued', frozenAt: v.frozenAt ?? new Date() })
      .where(eq(versions.id, versionId));
    return { kind: 'queued' as const, jobId: Number(res.insertId) };
  });
  await audit({ studioId, actorId, action: `bake.${result.kind === 'queued' ? 'enqueue' : result.kind}`, targetType: 'version', targetId: versionId });
  return result;
}

/** Claims the oldest job that is queued (and due) or whose lease ran out; null when there is none. */
export async function claimNext(workerId: string): Promise<ClaimedJob | null> {
  const { leaseMs, maxAttempts } = queueSettings();
  for (;;) {
    const outcome = await db().transaction(async (tx): Promise<ClaimedJob | { skip: number } | null> => {
      const [job] = await tx
        .select()
        .from(bakeJobs)
        .where(
          sql`(${bakeJobs.state} = 'queued' AND (${bakeJobs.leaseExpiresAt} IS NULL OR ${bakeJobs.leaseExpiresAt} <= NOW(3)))
              OR (${bakeJobs.state} = 'running' AND ${bakeJobs.leaseExpiresAt} < NOW(3))`,
        )
        .orderBy(bakeJobs.id)
        .limit(1)
        .for('update', { skipLocked: true });
      if (!job) return null;
      // A lapsed lease: the attempt that held it is lost (its objects are deleted once this transaction is committed).
      if (job.state === 'running') {
        await tx
          .update(bakeAttempts)
          .set({ state: 'lost', endedAt: sql`NOW(3)` as unknown as Date })
          .where(and(eq(bakeAttempts.jobId, job.id), eq(bakeAttempts.state, 'running')));
      }
      if (job.state === 'running' && job.cancelRequested) {
        await finishJob(tx, job.id, job.versionId, 'cancelled', null);
        return { skip: job.id };
      }
      if (job.attempts >= Math.min(job.maxAttempts, maxAttempts)) {
        const error = job.error ?? `the bake worker stopped responding ${job.attempts} times`;
        await finishJob(tx, job.id, job.versionId, 'failed', `Bake failed after ${job.attempts} attempts: ${error}`);
        return { skip: job.id };
      }
      const keys = attemptKeys(job.studioId, job.sceneHash, job.id, job.attempts + 1);
      const [attemptRow] = await tx.insert(bakeAttempts).values({
        jobId: job.id,
        attempt: job.attempts + 1,
        workerId,
        clipKey: keys.clip,
        statsKey: keys.stats,
      });
      await tx
        .update(bakeJobs)
        .set({
          state: 'running',
          attempts: job.attempts + 1,
          leaseOwner: workerId,
          leaseExpiresAt: inMs(leaseMs) as unknown as Date,
          startedAt: sql`NOW(3)` as unknown as Date,
          framesDone: 0,
        })
        .where(eq(bakeJobs.id, job.id));
      await tx.update(versions).set({ bakeState: 'baking' }).where(eq(versions.id, job.versionId));
      const [v] = await tx.select({ scene: versions.scene }).from(versions).where(eq(versions.id, job.versionId));
      return {
        jobId: job.id,
        versionId: job.versionId,
        studioId: job.studioId,
        sceneHash: job.sceneHash,
        attempt: job.attempts + 1,
        attemptId: Number(attemptRow.insertId),
        keys,
        scene: v?.scene,
      } satisfies ClaimedJob;
    });
    if (outcome && 'skip' in outcome) {
      await clearEndedAttempts(outcome.skip);
      continue;
    }
    if (outcome) {
      await audit({ studioId: outcome.studioId, actorId: null, action: 'bake.claim', targetType: 'bake_job', targetId: outcome.jobId, detail: { workerId, attempt: outcome.attempt } });
      await clearEndedAttempts(outcome.jobId);
    }
    return outcome;
  }
}

type Tx = Parameters<Parameters<ReturnType<typeof db>['transaction']>[0]>[0];
type AttemptEnd = 'done' | 'lost' | 'released' | 'failed' | 'cancelled';

async function endAttempt(tx: Tx, attemptId: number, state: AttemptEnd) {
  await tx.update(bakeAttempts).set({ state, endedAt: sql`NOW(3)` as unknown as Date }).where(eq(bakeAttempts.id, attemptId));
}

/**
 * Whether this claim is still the job's running attempt (under the job row's lock): the lease is still its own.
 * The lease rule, the same for every holder's call (renew, complete, fail, release, cancel): a lease is held until
 * lease_expires_at and not a moment after, whether or not another worker has claimed the job yet — past it the job
 * belongs to the queue (claimNext takes it), so a late result is refused and the attempt ends as lost.
 */
async function holdsLease(tx: Tx, job: ClaimedJob, workerId: string) {
  const [found] = await tx
    .select({ row: bakeJobs, lapsed: sql<number>`${bakeJobs.leaseExpiresAt} IS NULL OR ${bakeJobs.leaseExpiresAt} < NOW(3)` })
    .from(bakeJobs)
    .where(eq(bakeJobs.id, job.jobId))
    .for('update');
  const row = found?.row;
  if (!row || row.state !== 'running' || row.leaseOwner !== workerId || Number(found.lapsed)) return null;
  const [attempt] = await tx.select({ state: bakeAttempts.state }).from(bakeAttempts).where(eq(bakeAttempts.id, job.attemptId));
  return attempt?.state === 'running' ? row : null;
}

/** Deletes one attempt's objects (missing ones are fine) and records that they are gone. */
export async function clearAttemptObjects(attemptId: number, keys: AttemptKeys): Promise<void> {
  await Promise.all([deleteObject(keys.clip), deleteObject(keys.stats)]);
  await db()
    .update(bakeAttempts)
    .set({ objectsCleared: true })
    .where(and(eq(bakeAttempts.id, attemptId), sql`${bakeAttempts.state} <> 'done'`));
}

/** Deletes the objects of the job's attempts that ended without finishing. Best effort: a store error is logged. */
export async function clearEndedAttempts(jobId: number): Promise<void> {
  const ended = await db()
    .select()
    .from(bakeAttempts)
    .where(and(eq(bakeAttempts.jobId, jobId), notInArray(bakeAttempts.state, ['running', 'done']), eq(bakeAttempts.objectsCleared, false)));
  for (const a of ended) {
    await clearAttemptObjects(a.id, { clip: a.clipKey, stats: a.statsKey }).catch((err) =>
      console.error(`[bake] could not delete the objects of attempt ${a.id}: ${err instanceof Error ? err.message : err}`),
    );
  }
}

async function finishJob(tx: Tx, jobId: number, versionId: number, state: 'failed' | 'cancelled', error: string | null) {
  await tx
    .update(bakeJobs)
    .set({ state, error, leaseOwner: null, leaseExpiresAt: null, finishedAt: sql`NOW(3)` as unknown as Date })
    .where(eq(bakeJobs.id, jobId));
  await tx.update(versions).set({ bakeState: state }).where(eq(versions.id, versionId));
  if (state === 'failed') await auditBakeEnd(tx, jobId, versionId, 'bake.failed', { error });
}

/** The end of a bake in the audit log, in the job's transaction, as the person who asked for it (shot activity). */
async function auditBakeEnd(tx: Tx, jobId: number, versionId: number, action: 'bake.done' | 'bake.failed', detail: Record<string, unknown>) {
  const [job] = await tx.select({ studioId: bakeJobs.studioId, requestedBy: bakeJobs.requestedBy }).from(bakeJobs).where(eq(bakeJobs.id, jobId));
  if (!job) return;
  await tx.insert(auditLog).values({ studioId: job.studioId, actorId: job.requestedBy, action, targetType: 'version', targetId: String(versionId), detail: { jobId, ...detail } });
}

/** Renews the lease and records progress. Returns 'lost' when another worker owns the job now, or the lease lapsed. */
export async function renewLease(jobId: number, workerId: string, framesDone: number): Promise<'ok' | 'lost' | 'cancel'> {
  const { leaseMs } = queueSettings();
  const [res] = await db()
    .update(bakeJobs)
    .set({ leaseExpiresAt: inMs(leaseMs) as unknown as Date, framesDone })
    // A lapsed lease is not renewed (see holdsLease): the job is the queue's until it is claimed again.
    .where(and(eq(bakeJobs.id, jobId), eq(bakeJobs.leaseOwner, workerId), eq(bakeJobs.state, 'running'), sql`${bakeJobs.leaseExpiresAt} >= NOW(3)`));
  if (res.affectedRows !== 1) return 'lost';
  const [row] = await db().select({ cancel: bakeJobs.cancelRequested }).from(bakeJobs).where(eq(bakeJobs.id, jobId));
  return row?.cancel ? 'cancel' : 'ok';
}

/**
 * Records the baked clip (its stored size and SHA-256) and marks the job done — only if this attempt still holds
 * the lease. Refused (false) when another worker took the job, the lease lapsed (even with nobody else claiming it
 * yet) or it was cancelled; the caller deletes its objects.
 */
export async function completeJob(
  job: ClaimedJob,
  workerId: string,
  clip: { key: string; bytes: number; sha256: string; meta: Record<string, unknown> },
  stats: { key: string; bytes: number },
): Promise<boolean> {
  const ok = await db().transaction(async (tx) => {
    const row = await holdsLease(tx, job, workerId);
    if (!row) return false;
    if (row.cancelRequested) {
      await finishJob(tx, row.id, row.versionId, 'cancelled', null);
      await endAttempt(tx, job.attemptId, 'cancelled');
      return false;
    }
    const [clipRes] = await tx.insert(assets).values({
      studioId: job.studioId,
      kind: 'clip',
      storageKey: clip.key,
      contentType: 'application/x-tidemark-clip',
      byteSize: clip.bytes,
      sha256: clip.sha256,
      versionId: job.versionId,
      meta: { ...clip.meta, statsKey: stats.key, statsBytes: stats.bytes },
    });
    await tx
      .update(bakeJobs)
      .set({ state: 'done', framesDone: row.framesTotal, error: null, leaseOwner: null, leaseExpiresAt: null, finishedAt: sql`NOW(3)` as unknown as Date })
      .where(eq(bakeJobs.id, row.id));
    await tx.update(versions).set({ bakeState: 'baked', clipAssetId: Number(clipRes.insertId) }).where(eq(versions.id, row.versionId));
    await endAttempt(tx, job.attemptId, 'done');
    const health = healthOf(clip.meta);
    await auditBakeEnd(tx, row.id, row.versionId, 'bake.done', {
      healthy: health?.healthy ?? null,
      ...(health && !health.healthy ? { problem: health.findings.map((f) => f.words).join('; ') } : {}),
    });
    return true;
  });
  if (ok) await clearEndedAttempts(job.jobId);
  return ok;
}

/** Records a failed attempt: back in the queue after a delay while attempts remain, else failed for good. */
export async function failAttempt(job: ClaimedJob, workerId: string, error: string, retryable: boolean): Promise<'retry' | 'failed' | 'lost'> {
  const { retryDelayMs } = queueSettings();
  return db().transaction(async (tx) => {
    const row = await holdsLease(tx, job, workerId);
    if (!row) return 'lost';
    await endAttempt(tx, job.attemptId, row.cancelRequested ? 'cancelled' : 'failed');
    if (retryable && row.attempts < row.maxAttempts && !row.cancelRequested) {
      await tx
        .update(bakeJobs)
        .set({ state: 'queued', error, leaseOwner: null, leaseExpiresAt: inMs(retryDelayMs) as unknown as Date })
        .where(eq(bakeJobs.id, row.id));
      await tx.update(versions).set({ bakeState: 'queued' }).where(eq(versions.id, row.versionId));
      return 'retry';
    }
    await finishJob(tx, row.id, row.versionId, row.cancelRequested ? 'cancelled' : 'failed', row.cancelRequested ? null : `Bake failed after ${row.attempts} attempt(s): ${error}`);
    return 'failed';
  });
}

/** Hands a job back to the queue untouched (the worker is shutting down); the attempt does not count. */
export async function releaseJob(job: ClaimedJob, workerId: string): Promise<void> {
  await db().transaction(async (tx) => {
    const row = await holdsLease(tx, job, workerId);
    if (!row) return;
    await endAttempt(tx, job.attemptId, 'released');
    await tx
      .update(bakeJobs)
      .set({ state: 'queued', attempts: Math.max(0, row.attempts - 1), leaseOwner: null, leaseExpiresAt: null, framesDone: 0 })
      .where(eq(bakeJobs.id, row.id));
    await tx.update(versions).set({ bakeState: 'queued' }).where(eq(versions.id, row.versionId));
  });
}

/** Marks a job cancelled by the worker that was running it. */
export async function acknowledgeCancel(job: ClaimedJob, workerId: string): Promise<void> {
  await db().transaction(async (tx) => {
    const row = await holdsLease(tx, job, workerId);
    if (!row) return;
    await finishJob(tx, row.id, row.versionId, 'cancelled', null);
    await endAttempt(tx, job.attemptId, 'cancelled');
  });
}

/** Cancels the version's current bake: a queued job at once, a running one at its worker's next lease renewal. */
export async function cancelBake(versionId: number, studioId: number, actorId: string) {
  const state = await db().transaction(async (tx) => {
    const [job] = await tx
      .select()
      .from(bakeJobs)
      .where(and(eq(bakeJobs.versionId, versionId), eq(bakeJobs.studioId, studioId), inArray(bakeJobs.state, ['queued', 'running'])))
      .orderBy(desc(bakeJobs.id))
      .limit(1)
      .for('update');
    if (!job) throw new HttpError('conflict', 'This version has no bake in progress');
    if (job.state === 'queued') {
      await finishJob(tx, job.id, job.versionId, 'cancelled', null);
      return 'cancelled' as const;
    }
    await tx.update(bakeJobs).set({ cancelRequested: true }).where(eq(bakeJobs.id, job.id));
    return 'cancelling' as const;
  });
  await audit({ studioId, actorId, action: 'bake.cancel', targetType: 'version', targetId: versionId });
  return state;
}

/** The version's latest bake job with progress and an estimate of the time left. */
export async function bakeProgress(versionId: number, studioId: number) {
  const [job] = await db()
    .select({
      id: bakeJobs.id,
      state: bakeJobs.state,
      attempts: bakeJobs.attempts,
      maxAttempts: bakeJobs.maxAttempts,
      framesDone: bakeJobs.framesDone,
      framesTotal: bakeJobs.framesTotal,
      error: bakeJobs.error,
      cancelRequested: bakeJobs.cancelRequested,
      startedAt: bakeJobs.startedAt,
      finishedAt: bakeJobs.finishedAt,
      now: sql<Date | string>`NOW(3)`,
    })
    .from(bakeJobs)
    .where(and(eq(bakeJobs.versionId, versionId), eq(bakeJobs.studioId, studioId)))
    .orderBy(desc(bakeJobs.id))
    .limit(1);
  if (!job) return null;
  let etaSeconds: number | null = null;
  if (job.state === 'running' && job.startedAt && job.framesDone > 0) {
    const now = job.now instanceof Date ? job.now : new Date(String(job.now).replace(' ', 'T') + 'Z');
    const elapsed = (now.getTime() - job.startedAt.getTime()) / 1000;
    etaSeconds = Math.max(0, Math.round((elapsed / job.framesDone) * (job.framesTotal - job.framesDone)));
  }
  const { now: _now, ...rest } = job;
  return { ...rest, percent: job.framesTotal ? Math.round((100 * job.framesDone) / job.framesTotal) : 0, etaSeconds };
}
