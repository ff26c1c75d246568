// A job's lease, held on a timer in the parent thread: the solver runs in its own thread and the upload awaits
// the network, so neither can delay a renewal. Losing the lease (or a cancel) aborts the hold's signal.
import { renewLease, queueSettings } from './queue';

/** Another worker holds the job now (or the lease could not be renewed for a whole lease period). */
export class LeaseLost extends Error {}
/** Someone cancelled the bake. */
export class BakeCancelled extends Error {}

export interface LeaseHold {
  /** Aborts with LeaseLost or BakeCancelled. */
  signal: AbortSignal;
  /** Records progress, written with the next renewal. */
  progress(framesDone: number): void;
  /** Stops renewing (the job was completed, failed or handed back). */
  stop(): void;
}

/** Renews the claimed job's lease every third of BAKE_LEASE_MS until stop() or until the lease is lost. */
export function holdLease(jobId: number, workerId: string, log: (s: string) => void = () => {}): LeaseHold {
  const { leaseMs } = queueSettings();
  const controller = new AbortController();
  let framesDone = 0;
  let lastRenewed = Date.now();
  let renewing = false;
  const renew = async () => {
    if (renewing || controller.signal.aborted) return;
    renewing = true;
    try {
      const lease = await renewLease(jobId, workerId, framesDone);
      if (controller.signal.aborted) return;
      if (lease === 'ok') lastRenewed = Date.now();
      else controller.abort(lease === 'lost' ? new LeaseLost(`job ${jobId}: another worker holds the lease`) : new BakeCancelled());
    } catch (err) {
      // The queue is unreachable: past (most of) a lease, another worker may have taken the job; stop before it does.
      log(`job ${jobId}: could not renew the lease: ${err instanceof Error ? err.message : err}`);
      if (Date.now() - lastRenewed > leaseMs * 0.8) controller.abort(new LeaseLost(`job ${jobId}: the lease could not be renewed`));
    } finally {
      renewing = false;
    }
  };
  const timer = setInterval(() => void renew(), Math.max(50, leaseMs / 3));
  return {
    signal: controller.signal,
    progress: (n) => {
      framesDone = n;
    },
    stop: () => clearInterval(timer),
  };
}
