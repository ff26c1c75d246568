// The members screen island: the members table for everyone, and for owners role changes, removal, invitations.
import { useState } from 'react';
import { QueryClient, QueryClientProvider, useQuery } from '@tanstack/react-query';
import { api, ApiError, messageOf } from '../shared/api';
import { DismissableNotice, FormMessage } from '../shared/form';
import { signInUrl } from '../shared/paths';
import MembersTable from './MembersTable';
import InviteForm from './InviteForm';
import PendingInvitations from './PendingInvitations';
import { keys, type InvitationsAnswer, type MembersAnswer, type Notice } from './types';

interface Props {
  studioId: number;
  studioSlug: string;
  studioName: string;
  /** Server-rendered first answers, so the table shows before any fetch. */
  initialMembers: MembersAnswer;
  initialInvitations?: InvitationsAnswer;
}

export default function MembersScreen(props: Props) {
  const [client] = useState(
    () =>
      new QueryClient({
        defaultOptions: {
          queries: {
            staleTime: 30_000,
            retry: (count, err) => !(err instanceof ApiError && err.status >= 400 && err.status < 500) && count < 2,
          },
        },
      }),
  );
  return (
    <QueryClientProvider client={client}>
      <Members {...props} />
    </QueryClientProvider>
  );
}

function Members({ studioId, studioSlug, studioName, initialMembers, initialInvitations }: Props) {
  const [notice, setNotice] = useState<Notice>(null);
  const [loadedAt] = useState(() => Date.now());
  const members = useQuery({
    queryKey: keys.members(studioId),
    queryFn: () => api<MembersAnswer>(`/api/studios/${studioId}/members`),
    initialData: initialMembers,
    initialDataUpdatedAt: loadedAt,
  });
  const isOwner = members.data.you.role === 'owner';
  const invitations = useQuery({
    queryKey: keys.invitations(studioId),
    queryFn: () => api<InvitationsAnswer>(`/api/studios/${studioId}/invitations`),
    initialData: initialInvitations,
    initialDataUpdatedAt: loadedAt,
    enabled: isOwner,
  });

  const failure = members.error ?? (isOwner ? invitations.error : null);
  if (failure instanceof ApiError && failure.status === 401) {
    window.location.assign(signInUrl(window.location.pathname));
    return null;
  }
  if (failure instanceof ApiError && (failure.status === 403 || failure.status === 404)) {
    return (
      <div className="card p-6">
        <h2 className="text-lg font-semibold">This list is not open to you any more</h2>
        <p className="mt-2 text-ink-soft">Your role in {studioName} may have changed. The library still shows what you can work on.</p>
        <a className="btn-quiet mt-4" href={`/studios/${studioSlug}/`}>
          Go to the library
        </a>
      </div>
    );
  }

  const count = members.data.members.length;
  return (
    <div className="space-y-8">
      <div aria-live="polite">
        <DismissableNotice notice={notice} onDismiss={() => setNotice(null)} />
        {failure && !(failure instanceof ApiError && failure.status < 500) && (
          <FormMessage>Could not refresh the list: {messageOf(failure)}</FormMessage>
        )}
      </div>

      <section aria-labelledby="members-heading">
        <div className="mb-3 flex items-baseline justify-between gap-3">
          <h2 id="members-heading" className="text-lg font-semibold">
            People <span className="font-normal text-ink-muted">· {count}</span>
          </h2>
          {!isOwner && <p className="text-sm text-ink-muted">Only owners change roles and invite people.</p>}
        </div>
        <MembersTable studioId={studioId} data={members.data} onNotice={setNotice} />
      </section>

      {isOwner && (
        <div className="grid gap-6 lg:grid-cols-5">
          <section aria-labelledby="invite-heading" className="card p-5 sm:p-6 lg:col-span-2">
            <h2 id="invite-heading" className="text-lg font-semibold">
              Invite someone
            </h2>
            <p className="mt-1 text-sm text-ink-soft">They get an e-mail with a link that works once, for 72 hours.</p>
            <div className="mt-5">
              <InviteForm studioId={studioId} onNotice={setNotice} />
            </div>
          </section>
          <section aria-labelledby="pending-heading" className="card p-5 sm:p-6 lg:col-span-3">
            <h2 id="pending-heading" className="text-lg font-semibold">
              Waiting for an answer
            </h2>
            <div className="mt-4">
              <PendingInvitations studioId={studioId} invitations={invitations.data?.invitations} onNotice={setNotice} />
            </div>
          </section>
        </div>
      )}
    </div>
  );
}
