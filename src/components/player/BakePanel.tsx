// Bake controls on the version page: the "Bake this version" button, then a live progress bar (polled every second)
// with frames done, percent, time left, retries and Cancel; a failed bake says why in plain words.
import { useMutation } from '@tanstack/react-query';
import { api, messageOf } from '../shared/api';
import { FormMessage } from '../shared/form';
import type { BakeProgress } from './types';

interface Props {
  versionId: number;
  canBake: boolean;
  progress: BakeProgress | undefined;
  /** The bake finished while this page was open: show the full bar once more above the player. */
  justFinished?: boolean;
  /** Called after a request changed the bake (so the page polls again at once). */
  onChanged: () => void;
}

/** "2 min 05 s", "40 s". */
export function formatEta(seconds: number): string {
  if (seconds < 60) return `${Math.max(1, Math.round(seconds))} s`;
  const m = Math.floor(seconds / 60);
  const s = Math.round(seconds % 60);
  return m >= 60 ? `${Math.floor(m / 60)} h ${String(m % 60).padStart(2, '0')} min` : `${m} min ${String(s).padStart(2, '0')} s`;
}

export default function BakePanel({ versionId, canBake, progress, justFinished, onChanged }: Props) {
  const start = useMutation({
    mutationFn: () => api<{ state: string }>(`/api/versions/${versionId}/bake`, { method: 'POST' }),
    onSettled: onChanged,
  });
  const cancel = useMutation({
    mutationFn: () => api<{ state: string }>(`/api/versions/${versionId}/bake/cancel`, { method: 'POST' }),
    onSettled: onChanged,
  });

  const state = progress?.bakeState ?? 'none';
  const job = progress?.bake ?? null;
  const active = state === 'queued' || state === 'baking';
  const failure = start.error ?? cancel.error;

  if (state === 'baked') {
    if (!justFinished) return null;
    const frames = job?.framesTotal ?? 0;
    return (
      <section className="card px-5 py-3" data-testid="bake-panel" data-bake-state="baked" aria-label="Bake">
        <div role="progressbar" aria-label="Bake progress" aria-valuemin={0} aria-valuemax={100} aria-valuenow={100} data-testid="bake-progress" className="h-1.5 overflow-hidden rounded-full bg-sand-deep">
          <div className="h-full w-full rounded-full bg-foam-600" />
        </div>
        <p className="mt-2 flex gap-4 text-sm text-foam-600 tabular-nums" role="status">
          <span className="font-medium">Baked</span>
          <span data-testid="bake-frames">
            {frames} / {frames} frames
          </span>
          <span data-testid="bake-percent">100 %</span>
        </p>
      </section>
    );
  }

  return (
    <section className="card p-5 sm:p-6" aria-labelledby="bake-heading" data-testid="bake-panel" data-bake-state={state}>
      <div className="flex flex-wrap items-start justify-between gap-4">
        <div className="min-w-0">
          <h2 id="bake-heading" className="text-lg font-semibold">
            {active ? (state === 'queued' ? 'Waiting for a bake machine' : 'Baking') : state === 'failed' ? 'The bake failed' : state === 'cancelled' ? 'Bake cancelled' : 'Not baked yet'}
          </h2>
          <p className="mt-1 max-w-2xl text-sm leading-relaxed text-ink-soft">
            {active
              ? 'You can leave this page: the bake goes on, and the player appears here by itself when it is done.'
              : state === 'failed'
                ? 'Nothing was stored for this version. Fix what the message says, or bake again if the cause was passing.'
                : 'Baking runs the solver over every frame of the scene and stores the frames, so anyone in the studio can play them.'}
          </p>
        </div>
        {canBake && !active && (
          <button type="button" className="btn-primary" onClick={() => start.mutate()} disabled={start.isPending}>
            {start.isPending ? 'Starting…' : state === 'none' ? 'Bake this version' : 'Bake again'}
          </button>
        )}
        {canBake && active && (
          <button type="button" className="btn-ghost-danger" onClick={() => cancel.mutate()} disabled={cancel.isPending || job?.cancelRequested}>
            {job?.cancelRequested || cancel.isPending ? 'Cancelling…' : 'Cancel bake'}
          </button>
        )}
      </div>

      {active && job && <ProgressBar job={job} queued={state === 'queued'} />}
      {active && !job && <ProgressBar job={null} queued />}

      {state === 'failed' && job?.error && (
        <div className="mt-4">
          <FormMessage>{job.error}</FormMessage>
        </div>
      )}
      {!canBake && !active && (
        <p className="mt-4 text-sm text-ink-muted">An artist, supervisor or owner of the studio can start the bake.</p>
      )}
      {failure && (
        <div className="mt-4">
          <FormMessage>{messageOf(failure)}</FormMessage>
        </div>
      )}
    </section>
  );
}

function ProgressBar({ job, queued }: { job: BakeProgress['bake']; queued: boolean }) {
  const percent = job?.percent ?? 0;
  const retrying = job && job.attempts > 1;
  return (
    <div className="mt-5">
      <div
        role="progressbar"
        aria-label="Bake progress"
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={percent}
        aria-valuetext={job ? `${job.framesDone} of ${job.framesTotal} frames, ${percent} %` : 'Queued'}
        data-testid="bake-progress"
        className="h-3 overflow-hidden rounded-full bg-sand-deep"
      >
        <div className={`h-full rounded-full bg-harbour-500 transition-[width] duration-700 ${queued ? 'animate-pulse' : ''}`} style={{ width: `${percent}%` }} />
      </div>
      <p className="mt-2 flex flex-wrap gap-x-4 gap-y-1 text-sm text-ink-soft tabular-nums" aria-live="polite">
        {job ? (
          <>
            <span data-testid="bake-frames">
              {job.framesDone} / {job.framesTotal} frames
            </span>
            <span data-testid="bake-percent">{percent} %</span>
            {job.etaSeconds !== null && !queued && <span>about {formatEta(job.etaSeconds)} left</span>}
            {queued && <span>queued</span>}
            {retrying && (
              <span className="text-coral-700">
                attempt {job.attempts} of {job.maxAttempts}
              </span>
            )}
          </>
        ) : (
          <span>queued</span>
        )}
      </p>
      {retrying && job?.error && <p className="mt-1 text-sm text-ink-muted">The last attempt stopped: {job.error}</p>}
    </div>
  );
}
