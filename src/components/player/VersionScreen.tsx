// The version page island: header (shot, version, author, frame range in SMPTE timecode, review and bake state), the
// bake controls with live progress while queued or baking, and the player once the version is baked.
import { useEffect, useRef, useState } from 'react';
import { QueryClient, QueryClientProvider, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, ApiError } from '../shared/api';
import { signInUrl } from '../shared/paths';
import BakePanel from './BakePanel';
import BakeHealthNote from './BakeHealthNote';
import Player from './Player';
import ReviewPanel from '../review/ReviewPanel';
import NoteTicks from '../review/NoteTicks';
import type { Role } from '~/lib/vocab';
import type { NoteMarker } from '~/lib/review/notes';
import { rateText, sourceTimecodeLabel } from '~/lib/timecode';
import type { BakeProgress, BakeState, ClipInfo, PlateInfo, ShotInfo, VersionInfo } from './types';
import { CutRange } from '../library/CutRange';
import { reviewStateWord, versionLabel, type ClientState } from '~/lib/vocab';
import { ClientStateBadge } from '../review/ClientSignOff';

interface Props {
  studioId: number;
  studioSlug: string;
  version: VersionInfo;
  shot: ShotInfo;
  plate: PlateInfo | null;
  /** Presigned clip URLs when the version was baked as the page was made. */
  clip: ClipInfo | null;
  /** Artist or above: may start and cancel bakes, and sees progress. */
  canBake: boolean;
  /** The viewer's role in the studio (what the review panel offers). */
  role: Role;
  /** The version to compare this one with: the one last decided on for the shot (returned or approved), else the one before. */
  compareWith?: { id: number; number: number; why: string } | null;
  /** The latest decision on this version (a returned version shows what to change and the way to the next one). */
  decision?: { toState: string; comment: string | null; actorName: string | null; at: string } | null;
}

export default function VersionScreen(props: Props) {
  const [client] = useState(
    () =>
      new QueryClient({
        defaultOptions: {
          queries: { retry: (count, err) => !(err instanceof ApiError && err.status >= 400 && err.status < 500) && count < 2 },
        },
      }),
  );
  return (
    <QueryClientProvider client={client}>
      <Version {...props} />
    </QueryClientProvider>
  );
}

const STATE_STYLE: Record<string, string> = {
  draft: 'bg-sand-deep text-ink-soft',
  submitted: 'bg-harbour-50 text-harbour-700',
  approved: 'bg-foam-50 text-foam-600',
  returned: 'bg-coral-50 text-coral-700',
  superseded: 'bg-sand-deep text-ink-muted',
  none: 'bg-sand-deep text-ink-soft',
  queued: 'bg-harbour-50 text-harbour-700',
  baking: 'bg-harbour-50 text-harbour-700',
  baked: 'bg-foam-50 text-foam-600',
  failed: 'bg-coral-50 text-coral-700',
  cancelled: 'bg-sand-deep text-ink-muted',
};
const BAKE_LABEL: Record<BakeState, string> = { none: 'not baked', queued: 'bake queued', baking: 'baking', baked: 'baked', failed: 'bake failed', cancelled: 'bake cancelled' };

function Chip({ value, label, testId }: { value: string; label: string; testId?: string }) {
  return (
    <span className={`rounded-full px-2.5 py-0.5 text-xs font-medium ${STATE_STYLE[value] ?? 'bg-sand-deep text-ink-soft'}`} data-testid={testId}>
      {label}
    </span>
  );
}

function Version({ studioId, studioSlug, version, shot, plate, clip, canBake, role, compareWith, decision }: Props) {
  const [currentFrame, setCurrentFrame] = useState(version.startFrame);
  const [seekTo, setSeekTo] = useState<{ frame: number } | null>(() => {
    // Links in review e-mails carry ?frame=<n>.
    if (typeof window === 'undefined') return null;
    const f = Number(new URLSearchParams(window.location.search).get('frame'));
    return Number.isInteger(f) && f >= version.startFrame && f <= version.endFrame ? { frame: f } : null;
  });
  const [markers, setMarkers] = useState<NoteMarker[]>([]);
  // both states follow the review panel's answers: the studio's review and the client's sign-off
  const [reviewState, setReviewState] = useState(version.reviewState);
  const [clientState, setClientState] = useState<ClientState>(version.clientState);
  const queryClient = useQueryClient();
  const progressKey = ['version', version.id, 'bake'];
  const progress = useQuery({
    queryKey: progressKey,
    queryFn: () => api<BakeProgress>(`/api/versions/${version.id}/bake`),
    enabled: canBake,
    initialData: { bakeState: version.bakeState, bake: null } as BakeProgress,
    initialDataUpdatedAt: 0,
    refetchInterval: (q) => {
      const s = q.state.data?.bakeState;
      return s === 'queued' || s === 'baking' ? 1000 : false;
    },
    refetchIntervalInBackground: true,
  });
  const bakeState: BakeState = canBake ? (progress.data?.bakeState ?? version.bakeState) : version.bakeState;
  // the banner of a version sent back, for whoever opens it later (even once a newer one superseded it); the one
  // who just sent it back reads the review panel's confirmation instead
  const sentBack = decision?.toState === 'returned' && (reviewState === 'returned' || reviewState === 'superseded') && role !== 'client';

  // Remember that a bake ran while the page was open, to confirm its end above the player.
  const sawActive = useRef(false);
  if (bakeState === 'queued' || bakeState === 'baking') sawActive.current = true;

  const clipQuery = useQuery({
    queryKey: ['version', version.id, 'clip'],
    queryFn: () => api<ClipInfo>(`/api/versions/${version.id}/clip`),
    enabled: bakeState === 'baked' && !clip,
    staleTime: 10 * 60_000,
  });
  const clipInfo = clip ?? clipQuery.data ?? null;

  const failure = progress.error;
  useEffect(() => {
    if (failure instanceof ApiError && failure.status === 401) window.location.assign(signInUrl(window.location.pathname));
  }, [failure]);

  const frames = version.endFrame - version.startFrame + 1;
  return (
    <div className="space-y-6">
      <header className="flex flex-wrap items-end justify-between gap-4" data-testid="version-header">
        <div className="min-w-0">
          <p className="text-sm font-medium tracking-wide text-harbour-600 uppercase">
            <a className="hover:underline" href={`/studios/${studioSlug}/`}>
              {shot.showCode}
            </a>{' '}
            ·{' '}
            <a className="hover:underline" href={`/studios/${studioSlug}/shots/${shot.id}`} data-testid="version-shot-link">
              {shot.code}
            </a>
          </p>
          <h1 className="mt-1 flex flex-wrap items-center gap-3 text-3xl font-semibold tracking-tight">
            <span>
              {shot.code} <span className="text-ink-muted">{versionLabel(version.number)}</span>
            </span>
            <Chip value={reviewState} label={reviewStateWord(reviewState)} testId="review-state" />
            <ClientStateBadge state={clientState} testId="header-client-state" />
            <Chip value={bakeState} label={BAKE_LABEL[bakeState]} testId="bake-state" />
          </h1>
          <p className="mt-2 text-sm text-ink-soft">
            {version.authorName ? <>By {version.authorName} · </> : null}
            {new Date(version.createdAt).toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'short' })}
          </p>
          {version.comment && <p className="mt-2 max-w-3xl leading-relaxed">“{version.comment}”</p>}
          <div className="mt-3 flex flex-wrap items-center gap-2">
            <a className="btn-quiet" href={`/studios/${studioSlug}/shots/${shot.id}`} data-testid="open-shot">
              Shot {shot.code}: all versions
            </a>
            {canBake && !sentBack && <NewVersionLink studioSlug={studioSlug} shotId={shot.id} versionId={version.id} quiet />}
            {compareWith && (
              <a className="btn-quiet" href={`/studios/${studioSlug}/compare?a=${compareWith.id}&b=${version.id}`} data-testid="compare-link">
                Compare with {versionLabel(compareWith.number)}
                {compareWith.why === 'returned' ? ' (sent back)' : compareWith.why === 'approved' ? ' (approved)' : ''}
              </a>
            )}
          </div>
        </div>
        <dl className="grid grid-cols-[auto_auto] gap-x-4 gap-y-1 text-sm" data-testid="frame-range">
          <dt className="text-ink-muted">Frames</dt>
          <dd className="tabular-nums">
            {version.startFrame}–{version.endFrame} <span className="text-ink-muted">({frames})</span>
          </dd>
          <dt className="text-ink-muted">Source timecode</dt>
          <dd className="font-mono text-xs leading-5 tabular-nums">
            {sourceTimecodeLabel(shot, version.startFrame, '—')} – {sourceTimecodeLabel(shot, version.endFrame, '—')}
          </dd>
          <dt className="text-ink-muted">Cut in – cut out</dt>
          <dd>
            <CutRange shot={shot} testId="shot-cut-range" />
            <span className="text-xs text-ink-muted">{rateText(shot.frameRate)}</span>
          </dd>
        </dl>
      </header>

      {sentBack && (
        <section className="card border-coral-500/40 bg-coral-50 p-4" data-testid="returned-banner">
          <h2 className="font-semibold text-coral-700">Sent back for changes{decision?.actorName ? ` by ${decision.actorName}` : ''}</h2>
          {reviewState === 'superseded' && <p className="mt-1 text-sm text-ink-soft">A newer version of the shot has been saved since; this stays the list of what to change until the next one is submitted.</p>}
          {decision?.comment && <p className="mt-1 max-w-3xl whitespace-pre-wrap">“{decision.comment}”</p>}
          <p className="mt-1 text-sm text-ink-soft">The notes pinned to frames are listed below the player. Start the next version from this scene: the plate and its scale come with it.</p>
          {canBake && (
            <div className="mt-3">
              <NewVersionLink studioSlug={studioSlug} shotId={shot.id} versionId={version.id} />
            </div>
          )}
        </section>
      )}

      <BakePanel
        versionId={version.id}
        canBake={canBake}
        progress={canBake ? progress.data : { bakeState, bake: null }}
        justFinished={sawActive.current}
        onChanged={() => {
          // A bake started here is confirmed at its end even if it finished before the next poll.
          sawActive.current = true;
          void queryClient.invalidateQueries({ queryKey: progressKey });
        }}
      />

      {bakeState === 'baked' &&
        (clipInfo ? (
          <div className="space-y-2">
            <BakeHealthNote health={clipInfo.health} />
            <Player studioId={studioId} version={version} shot={shot} plate={plate} clip={clipInfo} onFrame={setCurrentFrame} seekTo={seekTo} />
            <NoteTicks markers={markers} start={version.startFrame} end={version.endFrame} currentFrame={currentFrame} onSeek={(f) => setSeekTo({ frame: f })} tcShot={shot} />
          </div>
        ) : (
          <section className="card p-6 text-sm text-ink-muted" data-testid="player-loading">
            {clipQuery.error ? `The baked clip could not be opened: ${clipQuery.error.message}` : 'Opening the bake…'}
          </section>
        ))}

      <ReviewPanel
        versionId={version.id}
        studioSlug={studioSlug}
        role={role}
        currentFrame={currentFrame}
        onSeek={(f) => setSeekTo({ frame: f })}
        frameRange={{ start: version.startFrame, end: version.endFrame }}
        onMarkers={setMarkers}
        onStateChange={setReviewState}
        onClientStateChange={setClientState}
        tcShot={shot}
        bakeState={bakeState}
      />
    </div>
  );
}

/** Opens the editor on this version's scene; saving there makes the shot's next version (a draft). */
function NewVersionLink({ studioSlug, shotId, versionId, quiet = false }: { studioSlug: string; shotId: number; versionId: number; quiet?: boolean }) {
  return (
    <a className={quiet ? 'btn-quiet' : 'btn-primary'} href={`/studios/${studioSlug}/shots/${shotId}/edit?from=${versionId}`} data-testid="new-version-from-this">
      New version from this
    </a>
  );
}
