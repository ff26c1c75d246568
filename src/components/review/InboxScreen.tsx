// The review inbox island: versions waiting for the viewer's decision, their own versions sent back, new notes on
// their versions (each note links to its frame), the client's sign-off (what waits for a client's sign-off, or the
// client's recent decisions for the studio), plus the daily digest switch. Each unread item can be marked read on
// its own (or all at once); a version sent back stays until the next one is submitted or the artist dismisses it.
import { useState } from 'react';
import { QueryClient, QueryClientProvider, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, ApiError, messageOf } from '../shared/api';
import { FormMessage } from '../shared/form';
import { STATE_TONE, STATE_WORDS, type InboxAnswer, type InboxAssignment, type InboxItem } from './types';
import { versionLabel } from '~/lib/vocab';
import { ClientDecisionLine, ClientStateBadge } from './ClientSignOff';

interface Props {
  studioId: number;
  studioSlug: string;
  role: string;
  initial: InboxAnswer;
  dailyDigest: boolean;
}

export default function InboxScreen(props: Props) {
  const [client] = useState(
    () => new QueryClient({ defaultOptions: { queries: { staleTime: 15_000, retry: (n, err) => !(err instanceof ApiError && err.status < 500) && n < 2 } } }),
  );
  return (
    <QueryClientProvider client={client}>
      <Inbox {...props} />
    </QueryClientProvider>
  );
}

const when = (iso: string) => new Date(iso).toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'short' });

function Inbox({ studioId, studioSlug, role, initial, dailyDigest }: Props) {
  const [loadedAt] = useState(() => Date.now());
  const inbox = useQuery({
    queryKey: ['inbox', studioId],
    queryFn: () => api<InboxAnswer>(`/api/studios/${studioId}/inbox`),
    initialData: initial,
    initialDataUpdatedAt: loadedAt,
    refetchInterval: 60_000,
  });
  const data = inbox.data;
  const marks = useInboxMarks(studioId);
  const link = (versionId: number, frame?: number) => `/studios/${studioSlug}/versions/${versionId}${frame !== undefined ? `?frame=${frame}` : ''}`;
  const decides = role === 'supervisor' || role === 'owner';
  const nothing = data.counts.total === 0;
  const readVersion = (versionId: number) => marks.read([{ type: 'version', id: versionId }]);

  return (
    <div className="space-y-8">
      {inbox.error && <FormMessage>{messageOf(inbox.error)}</FormMessage>}
      {marks.error && <FormMessage>{messageOf(marks.error)}</FormMessage>}
      {data.unread.total > 0 && (
        <div className="flex items-center justify-end gap-3 text-sm">
          <span className="text-ink-muted" data-testid="inbox-unread-total">
            {data.unread.total} new
          </span>
          <button type="button" className="btn-quiet" disabled={marks.busy} onClick={() => marks.readAll()} data-testid="inbox-mark-all-read">
            Mark all read
          </button>
        </div>
      )}
      {nothing && (
        <section className="card px-6 py-10 text-center" data-testid="inbox-empty">
          <h2 className="text-lg font-semibold">Nothing waits for you</h2>
          <p className="mt-2 text-ink-soft">Shots assigned to you, new submissions, versions sent back and notes on your work show up here.</p>
        </section>
      )}
      {role !== 'client' && (
        <Section title="Assigned to you" count={data.counts.assigned} unread={data.unread.assigned} testId="inbox-assigned">
          {data.assigned.map((a) => (
            <AssignedRow key={a.shotId} item={a} href={`/studios/${studioSlug}/shots/${a.shotId}`} onRead={() => marks.read([{ type: 'shot', id: a.shotId }])} busy={marks.busy} />
          ))}
        </Section>
      )}
      {(decides || role === 'client' || data.toReview.length > 0) && (
        <Section title={role === 'client' ? 'Shared with you for a look' : 'Waiting for your decision'} count={data.counts.toReview} unread={data.unread.toReview} testId="inbox-to-review">
          {data.toReview.map((v) => (
            <Row key={v.versionId} item={v} href={link(v.versionId)} onRead={() => readVersion(v.versionId)} busy={marks.busy} />
          ))}
        </Section>
      )}
      <Section title={role === 'client' ? 'Waiting for your sign-off' : 'Client decisions (last two weeks)'} count={data.counts.client} unread={data.unread.client} testId="inbox-client">
        {data.client.map((v) => (
          <ClientRow key={v.versionId} item={v} href={link(v.versionId)} onRead={() => readVersion(v.versionId)} busy={marks.busy} />
        ))}
      </Section>
      {role !== 'client' && (
        <Section title="Your versions sent back" count={data.counts.returned} unread={data.unread.returned} testId="inbox-returned">
          {data.returned.map((v) => (
            <Row key={v.versionId} item={v} href={link(v.versionId)} onRead={() => readVersion(v.versionId)} busy={marks.busy}>
              {v.nextVersion && (
                <p className="mt-1 text-sm text-ink-soft" data-testid="inbox-next-version">
                  <a className="link" href={link(v.nextVersion.id)}>
                    {versionLabel(v.nextVersion.number)}
                  </a>{' '}
                  saved since, not submitted yet: this stays here until the next version goes in for review.
                </p>
              )}
              <button
                type="button"
                className="btn-quiet mt-2 text-xs"
                disabled={marks.busy}
                onClick={() => marks.dismiss(v.versionId)}
                title="Take it off your inbox without submitting a newer version"
                data-testid="inbox-dismiss"
              >
                Dismiss
              </button>
            </Row>
          ))}
        </Section>
      )}
      {role !== 'client' && (
        <Section title="New notes on your versions" count={data.counts.newNotes} unread={data.unread.newNotes} testId="inbox-new-notes">
          {data.newNotes.map((v) => (
            <li key={v.versionId} className="card p-4" data-testid="inbox-note-version" data-unread={v.unread}>
              <a className="font-semibold hover:underline" href={link(v.versionId)}>
                {v.showCode} · {v.shotCode} {versionLabel(v.number)}
              </a>
              {v.unread && <NewMark />}
              {v.notes.length > 1 && (
                <button type="button" className="btn-quiet ml-2 text-xs" disabled={marks.busy} onClick={() => readVersion(v.versionId)} data-testid="inbox-notes-mark-read">
                  Mark all {v.notes.length} read
                </button>
              )}
              <ul className="mt-2 space-y-1.5">
                {v.notes.map((n) => (
                  <li key={n.id} className="flex gap-3 text-sm" data-testid="inbox-note" data-note-id={n.id}>
                    <a className="shrink-0 rounded-md bg-ink px-2 py-0.5 font-mono text-xs text-white tabular-nums hover:bg-harbour-700" href={link(v.versionId, n.frame)}>
                      {n.frame}
                    </a>
                    <span className="min-w-0">
                      <span className="whitespace-pre-wrap">{n.body}</span>
                      <span className="block text-xs text-ink-muted">
                        {n.author.name} · {when(n.createdAt)}
                        {n.parentId ? ' · reply' : ''}
                      </span>
                    </span>
                    <button
                      type="button"
                      className="ml-auto shrink-0 self-start text-xs text-harbour-700 hover:underline disabled:opacity-50"
                      disabled={marks.busy}
                      onClick={() => marks.read([{ type: 'note', id: n.id }])}
                      data-testid="inbox-note-mark-read"
                    >
                      Mark read
                    </button>
                  </li>
                ))}
              </ul>
            </li>
          ))}
        </Section>
      )}
      <DigestSwitch initial={dailyDigest} />
    </div>
  );
}

function Section({ title, count, unread, testId, children }: { title: string; count: number; unread: number; testId: string; children: React.ReactNode }) {
  return (
    <section data-testid={testId}>
      <h2 className="mb-3 flex items-center gap-2 text-lg font-semibold">
        {title}
        <span className="rounded-full bg-sand-deep px-2 py-0.5 text-xs font-medium text-ink-soft tabular-nums">{count}</span>
        {unread > 0 && (
          <span className="rounded-full bg-harbour-500 px-2 py-0.5 text-xs font-medium text-white tabular-nums" data-testid="unread-count">
            {unread} new
          </span>
        )}
      </h2>
      {count === 0 ? <p className="text-sm text-ink-muted">Nothing here.</p> : <ul className="space-y-3">{children}</ul>}
    </section>
  );
}

/** Marks one item read, dismisses a version sent back, or marks everything read; the answer is the new inbox. */
function useInboxMarks(studioId: number) {
  const qc = useQueryClient();
  const onSuccess = (answer: InboxAnswer) => qc.setQueryData(['inbox', studioId], answer);
  const read = useMutation({
    mutationFn: (body: { items: { type: 'shot' | 'version' | 'note'; id: number }[] } | { all: true }) =>
      api<InboxAnswer>(`/api/studios/${studioId}/inbox/read`, { method: 'POST', body }),
    onSuccess,
  });
  const dismiss = useMutation({
    mutationFn: (versionId: number) => api<InboxAnswer>(`/api/studios/${studioId}/inbox/dismiss`, { method: 'POST', body: { versionId } }),
    onSuccess,
  });
  return {
    read: (items: { type: 'shot' | 'version' | 'note'; id: number }[]) => read.mutate({ items }),
    readAll: () => read.mutate({ all: true }),
    dismiss: (versionId: number) => dismiss.mutate(versionId),
    busy: read.isPending || dismiss.isPending,
    error: read.error ?? dismiss.error,
  };
}

/** One version in a section: its code as a link, what the section says of it, and a state badge on the right. */
function VersionCard({
  item,
  href,
  testId,
  badge,
  onRead,
  busy,
  children,
}: {
  item: InboxItem;
  href: string;
  testId: string;
  badge: React.ReactNode;
  onRead: () => void;
  busy: boolean;
  children: React.ReactNode;
}) {
  return (
    <li className="card flex flex-wrap items-start justify-between gap-3 p-4" data-testid={testId} data-version-id={item.versionId} data-unread={item.unread}>
      <div className="min-w-0">
        <a className="font-semibold hover:underline" href={href}>
          {item.showCode} · {item.shotCode} {versionLabel(item.number)}
        </a>
        {item.unread && <NewMark />}
        {children}
      </div>
      <div className="flex flex-col items-end gap-2">
        {badge}
        {item.unread && <MarkReadButton onClick={onRead} busy={busy} />}
      </div>
    </li>
  );
}

function MarkReadButton({ onClick, busy }: { onClick: () => void; busy: boolean }) {
  return (
    <button type="button" className="text-xs text-harbour-700 hover:underline disabled:opacity-50" disabled={busy} onClick={onClick} data-testid="inbox-mark-read">
      Mark read
    </button>
  );
}

function NewMark() {
  return <span className="ml-2 rounded bg-harbour-50 px-1.5 py-0.5 text-xs font-medium text-harbour-700">new</span>;
}

function AssignedRow({ item, href, onRead, busy }: { item: InboxAssignment; href: string; onRead: () => void; busy: boolean }) {
  return (
    <li className="card flex flex-wrap items-start justify-between gap-3 p-4" data-testid="inbox-assigned-shot" data-shot-id={item.shotId} data-unread={item.unread}>
      <div className="min-w-0">
        <a className="font-semibold hover:underline" href={href}>
          {item.showCode} · {item.shotCode}
        </a>
        {item.unread && <NewMark />}
        {item.description && <p className="text-sm text-ink-soft">{item.description}</p>}
        <p className="text-sm text-ink-muted">
          Assigned {when(item.at)}
          {item.assignedBy ? ` by ${item.assignedBy}` : ''}
          {item.dueDate ? ` · due ${item.dueDate}` : ''}
        </p>
      </div>
      <div className="flex flex-col items-end gap-2">
        <a className="btn-quiet" href={href}>
          Open the shot
        </a>
        {item.unread && <MarkReadButton onClick={onRead} busy={busy} />}
      </div>
    </li>
  );
}

function Row({ item, href, onRead, busy, children }: { item: InboxItem; href: string; onRead: () => void; busy: boolean; children?: React.ReactNode }) {
  // a version sent back and superseded since still reads as sent back: that is what it asks of the artist
  const state = item.reviewState === 'superseded' && item.lastEvent ? 'returned' : item.reviewState;
  const badge = <span className={`rounded-full px-2.5 py-0.5 text-xs font-medium ${STATE_TONE[state] ?? ''}`}>{STATE_WORDS[state] ?? state}</span>;
  return (
    <VersionCard item={item} href={href} testId="inbox-version" badge={badge} onRead={onRead} busy={busy}>
      <p className="text-sm text-ink-soft">
        By {item.author.name} · {when(item.updatedAt)}
      </p>
      {item.lastEvent?.comment && (
        <p className="mt-1 text-sm">
          “{item.lastEvent.comment}”{item.lastEvent.actorName ? <span className="text-ink-muted"> — {item.lastEvent.actorName}</span> : null}
        </p>
      )}
      {children}
    </VersionCard>
  );
}

function ClientRow({ item, href, onRead, busy }: { item: InboxItem; href: string; onRead: () => void; busy: boolean }) {
  return (
    <VersionCard item={item} href={href} testId="inbox-client-version" badge={<ClientStateBadge state={item.clientState} testId="inbox-client-state" />} onRead={onRead} busy={busy}>
      <ClientDecisionLine side={item} />
    </VersionCard>
  );
}

function DigestSwitch({ initial }: { initial: boolean }) {
  const qc = useQueryClient();
  const [on, setOn] = useState(initial);
  const save = useMutation({
    mutationFn: (value: boolean) => api<{ preferences: { dailyDigest: boolean } }>('/api/me/preferences', { method: 'PATCH', body: { dailyDigest: value } }),
    onSuccess: (res) => {
      setOn(res.preferences.dailyDigest);
      void qc.invalidateQueries({ queryKey: ['inbox'] });
    },
  });
  return (
    <section className="card p-4">
      <label className="flex items-center gap-3 text-sm">
        <input type="checkbox" checked={on} disabled={save.isPending} onChange={(e) => save.mutate(e.target.checked)} data-testid="digest-toggle" />
        <span>
          <span className="font-medium">Daily review e-mail</span>
          <span className="block text-ink-muted">Once a day, a short summary of what moved in review in your studios.</span>
        </span>
      </label>
      {save.error && <p className="field-error">{messageOf(save.error)}</p>}
    </section>
  );
}
