// A shot's page: code, status and assignee, frame range with timecode, the plate (upload, scale), its versions
// (each opens the version page), its activity, and the way into blocking a new version.
import { useState } from 'react';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { ShotStatus } from '~/lib/vocab';
import { api, messageOf } from '../shared/api';
import { DismissableNotice, FormMessage, Spinner } from '../shared/form';
import { fullDate, relativeTime } from '../members/time';
import { LibraryQueries } from './query';
import { Dialog } from './fields';
import { StatusBadge, StateWord } from './status';
import { ClientStateBadge } from '../review/ClientSignOff';
import { AssigneeSelect, StatusSelect } from './inline';
import PlatePanel from './PlatePanel';
import { ShotThumbnail } from './thumbnail';
import ShotForm from './ShotForm';
import { dueLabel } from './format';
import { CutRange } from './CutRange';
import { rateText } from '~/lib/timecode';
import { can, keys, type ActivityEntry, type Person, type ShotDetail, type Viewer } from './types';
import { versionLabel } from '~/lib/vocab';
import { activityLine } from '~/lib/review/activity';

interface Props {
  viewer: Viewer;
  shot: ShotDetail;
  showName: string;
  people: Person[];
}

export default function ShotScreen(props: Props) {
  const { studioId } = props.viewer;
  return (
    <LibraryQueries
      seed={[
        [keys.shot(studioId, props.shot.id), props.shot],
        [keys.people(studioId), can(props.viewer.role, 'artist') ? { people: props.people } : undefined],
      ]}
    >
      <Shot {...props} />
    </LibraryQueries>
  );
}

function Shot({ viewer, shot: initialShot, showName }: Props) {
  const { studioId, studioSlug, role } = viewer;
  const queryClient = useQueryClient();
  const artist = can(role, 'artist');
  const supervisor = can(role, 'supervisor');
  const [editing, setEditing] = useState(false);
  const [notice, setNotice] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);
  const key = keys.shot(studioId, initialShot.id);

  const shotQuery = useQuery({
    queryKey: key,
    queryFn: () => api<{ shot: ShotDetail }>(`/api/studios/${studioId}/shots/${initialShot.id}`).then((a) => a.shot),
  });
  const shot = shotQuery.data ?? initialShot;
  const people = useQuery({
    queryKey: keys.people(studioId),
    queryFn: () => api<{ people: Person[] }>(`/api/studios/${studioId}/people`),
    enabled: artist,
    staleTime: 5 * 60_000,
  });
  const peopleList = people.data?.people ?? [];
  const activity = useQuery({
    queryKey: keys.activity(studioId, shot.id),
    queryFn: () => api<{ activity: ActivityEntry[] }>(`/api/studios/${studioId}/shots/${shot.id}/activity`).then((a) => a.activity),
    enabled: artist,
  });

  const workflow = useMutation({
    mutationFn: (patch: { status?: ShotStatus; assigneeId?: string | null }) => api(`/api/studios/${studioId}/shots/${shot.id}/workflow`, { method: 'PATCH', body: patch }),
    onMutate: async (patch) => {
      setNotice(null);
      await queryClient.cancelQueries({ queryKey: key });
      const previous = queryClient.getQueryData<ShotDetail>(key);
      const assigneeName = patch.assigneeId !== undefined ? (peopleList.find((p) => p.userId === patch.assigneeId)?.name ?? null) : undefined;
      queryClient.setQueryData<ShotDetail>(key, (old) => (old ? { ...old, ...patch, ...(assigneeName !== undefined ? { assigneeName } : {}) } : old));
      return { previous };
    },
    onError: (err, patch, context) => {
      if (context?.previous) queryClient.setQueryData(key, context.previous);
      setNotice({ tone: 'error', text: `Could not change the ${patch.status !== undefined ? 'status' : 'assignee'}: ${messageOf(err)}` });
    },
    onSettled: () => {
      void queryClient.invalidateQueries({ queryKey: key });
      void queryClient.invalidateQueries({ queryKey: keys.activity(studioId, shot.id) });
    },
  });

  const archive = useMutation({
    mutationFn: () => api(`/api/studios/${studioId}/shots/${shot.id}/archive`, { method: 'POST', body: { archived: !shot.archivedAt } }),
    onSuccess: () => setNotice({ tone: 'success', text: shot.archivedAt ? `${shot.code} is active again.` : `${shot.code} is archived: it leaves the show’s active list.` }),
    onError: (err) => setNotice({ tone: 'error', text: messageOf(err) }),
    onSettled: () => {
      void queryClient.invalidateQueries({ queryKey: key });
      void queryClient.invalidateQueries({ queryKey: keys.activity(studioId, shot.id) });
    },
  });

  const showHref = `/studios/${studioSlug}/shows/${shot.showId}`;
  return (
    <div className="space-y-6">
      <header className="flex flex-wrap items-start justify-between gap-4">
        <div className="flex min-w-0 items-start gap-4">
          {(shot.thumbnailUrl || shot.plateAssetId) && (
            <div className="mt-1 hidden shrink-0 sm:block">
              <ShotThumbnail url={shot.thumbnailUrl} code={shot.code} size="header" />
            </div>
          )}
          <div className="min-w-0">
            <p className="text-sm text-ink-muted">
              <a href={`/studios/${studioSlug}/`} className="link">
                Library
              </a>{' '}
              <span aria-hidden="true">/</span>{' '}
              <a href={showHref} className="link" title={showName}>
                {shot.showCode}
              </a>{' '}
              <span aria-hidden="true">/</span> Shot
            </p>
            <h1 className="mt-1 flex flex-wrap items-center gap-3 text-3xl font-semibold tracking-tight">
              {shot.code}
              {shot.archivedAt && <span className="rounded-full border border-sand-line px-2.5 py-0.5 text-sm font-normal text-ink-muted">archived</span>}
            </h1>
            {shot.description && <p className="mt-1.5 max-w-2xl text-ink-soft">{shot.description}</p>}
          </div>
        </div>
        <div className="flex flex-wrap items-center gap-2">
          {supervisor && (
            <>
              <button type="button" className="btn-quiet" onClick={() => setEditing(true)}>
                Edit details
              </button>
              <button type="button" className="btn-quiet" disabled={archive.isPending} onClick={() => archive.mutate()}>
                {archive.isPending && <Spinner />}
                {shot.archivedAt ? 'Unarchive' : 'Archive'}
              </button>
            </>
          )}
          {artist && (
            <a className="btn-primary" href={`/studios/${studioSlug}/shots/${shot.id}/edit`}>
              <svg width="16" height="16" viewBox="0 0 16 16" aria-hidden="true">
                <path d="M2 11c2-2.6 4-2.6 6 0s4 2.6 6 0" fill="none" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" />
                <path d="M8 2v6M5 5l3 3 3-3" fill="none" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" strokeLinejoin="round" />
              </svg>
              Block a new version
            </a>
          )}
        </div>
      </header>

      <div aria-live="polite">
        <DismissableNotice notice={notice} onDismiss={() => setNotice(null)} />
      </div>

      <dl className="card grid grid-cols-2 gap-x-6 gap-y-4 p-5 text-sm sm:grid-cols-3 lg:grid-cols-6" data-testid="shot-facts">
        <Fact label="Status">
          {artist ? <StatusSelect value={shot.status} label="Status" disabled={workflow.isPending} onChange={(status) => workflow.mutate({ status })} /> : <StatusBadge status={shot.status} />}
        </Fact>
        <Fact label="Assignee">
          {artist ? (
            <AssigneeSelect value={shot.assigneeId} name={shot.assigneeName} people={peopleList} label="Assignee" disabled={workflow.isPending} onChange={(assigneeId) => workflow.mutate({ assigneeId })} />
          ) : (
            (shot.assigneeName ?? '—')
          )}
        </Fact>
        <Fact label="Cut in – cut out · handles" wide>
          <CutRange shot={shot} testId="frame-range" />
        </Fact>
        {shot.recordIn && shot.recordOut && (
          <Fact label="In the cut" wide>
            <span className="tabular-nums" data-testid="record-range">
              record {shot.recordIn} – {shot.recordOut}
            </span>
            {(shot.reel || shot.clipName) && <span className="block text-xs text-ink-muted">{[shot.reel && `reel ${shot.reel}`, shot.clipName].filter(Boolean).join(' · ')}</span>}
          </Fact>
        )}
        <Fact label="Rate">{rateText(shot.frameRate)}</Fact>
        <Fact label="Due">{shot.dueDate ? dueLabel(shot.dueDate) : '—'}</Fact>
      </dl>

      <div className="grid gap-6 lg:grid-cols-3">
        <div className="lg:col-span-2">
          <PlatePanel studioId={studioId} shot={shot} canUpload={artist} />
          <p className="mt-2 text-xs text-ink-muted">
            Plate format {shot.plateWidth}×{shot.plateHeight}, pixel aspect {shot.pixelAspect}.
          </p>
        </div>
        <div className="space-y-6">
          <Versions shot={shot} studioSlug={studioSlug} canBlock={artist} />
          {artist && <Activity entries={activity.data} loading={activity.isLoading} error={activity.error} />}
        </div>
      </div>

      <Dialog open={editing} title={`Edit ${shot.code}`} onClose={() => setEditing(false)} wide>
        <ShotForm
          studioId={studioId}
          showId={shot.showId}
          showRate={shot.frameRate}
          shot={shot}
          convention={viewer.handleConvention}
          people={peopleList}
          onCancel={() => setEditing(false)}
          onSaved={(saved) => {
            setEditing(false);
            queryClient.setQueryData(key, saved);
            void queryClient.invalidateQueries({ queryKey: keys.activity(studioId, shot.id) });
            setNotice({ tone: 'success', text: `Saved ${saved.code}.` });
          }}
        />
      </Dialog>
    </div>
  );
}

function Fact({ label, children, wide = false }: { label: string; children: React.ReactNode; wide?: boolean }) {
  return (
    <div className={wide ? 'col-span-2' : ''}>
      <dt className="text-xs tracking-wide text-ink-muted uppercase">{label}</dt>
      <dd className="mt-1">{children}</dd>
    </div>
  );
}

function Versions({ shot, studioSlug, canBlock }: { shot: ShotDetail; studioSlug: string; canBlock: boolean }) {
  return (
    <section aria-labelledby="versions-heading" className="card overflow-hidden">
      <h2 id="versions-heading" className="border-b border-sand-line px-5 py-3 font-semibold">
        Versions <span className="font-normal text-ink-muted">· {shot.versions.length}</span>
      </h2>
      {shot.versions.length === 0 ? (
        <p className="px-5 py-6 text-sm text-ink-soft">
          No versions yet.{' '}
          {canBlock && (
            <a className="link" href={`/studios/${studioSlug}/shots/${shot.id}/edit`}>
              Block the first one
            </a>
          )}
        </p>
      ) : (
        <ul className="divide-y divide-sand-line/70" data-testid="versions">
          {shot.versions.map((v) => (
            <li key={v.id}>
              <a href={`/studios/${studioSlug}/versions/${v.id}`} className="grid grid-cols-[auto_1fr] gap-x-3 px-5 py-3 hover:bg-sand/60 focus-visible:bg-harbour-50">
                <span className="row-span-2 grid size-10 place-items-center rounded-lg bg-ink text-sm font-semibold text-sand tabular-nums">{versionLabel(v.number)}</span>
                <span className="flex items-baseline justify-between gap-2 text-sm">
                  <span className="truncate font-medium">{v.authorName ?? 'Someone'}</span>
                  <time dateTime={v.createdAt} title={fullDate(v.createdAt)} className="shrink-0 text-xs text-ink-muted" suppressHydrationWarning>
                    {relativeTime(v.createdAt)}
                  </time>
                </span>
                <span className="flex flex-wrap gap-x-3">
                  <StateWord kind="bake" state={v.bakeState} />
                  <StateWord kind="review" state={v.reviewState} />
                  {v.clientState !== 'not sent' && <ClientStateBadge state={v.clientState} testId="version-client-state" />}
                  {v.plateAssetId !== shot.plateAssetId && v.plateAssetId && <span className="text-xs text-ink-muted">earlier plate</span>}
                </span>
              </a>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}

function Activity({ entries, loading, error }: { entries?: ActivityEntry[]; loading: boolean; error: unknown }) {
  return (
    <section aria-labelledby="activity-heading" className="card overflow-hidden">
      <h2 id="activity-heading" className="border-b border-sand-line px-5 py-3 font-semibold">
        Activity
      </h2>
      {loading ? (
        <p className="px-5 py-4 text-sm text-ink-muted">Loading…</p>
      ) : error ? (
        <p className="px-5 py-4 text-sm text-coral-700">Could not load the activity: {messageOf(error)}</p>
      ) : !entries?.length ? (
        <p className="px-5 py-4 text-sm text-ink-muted">Nothing yet.</p>
      ) : (
        <ol className="max-h-96 space-y-3 overflow-y-auto px-5 py-4 text-sm" data-testid="activity">
          {entries.map((e) => (
            <li key={e.id} data-action={e.action} className="relative pl-4 before:absolute before:top-2 before:left-0 before:size-1.5 before:rounded-full before:bg-harbour-300">
              {activityLine(e)}
              <time dateTime={e.createdAt} title={fullDate(e.createdAt)} className="block text-xs text-ink-muted" suppressHydrationWarning>
                {relativeTime(e.createdAt)}
              </time>
            </li>
          ))}
        </ol>
      )}
    </section>
  );
}
