// Invitations not yet answered (owners): who, which role, when the link runs out, and Withdraw.
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api, messageOf } from '../shared/api';
import { Spinner } from '../shared/form';
import { RoleBadge } from './MembersTable';
import { fullDate, relativeTime } from './time';
import { keys, type Invitation, type Notice } from './types';

interface Props {
  studioId: number;
  invitations: Invitation[] | undefined;
  onNotice: (notice: Notice) => void;
}

export default function PendingInvitations({ studioId, invitations, onNotice }: Props) {
  const queryClient = useQueryClient();
  const withdraw = useMutation({
    mutationFn: (invitation: Invitation) => api(`/api/studios/${studioId}/invitations/${invitation.id}`, { method: 'DELETE' }),
    onMutate: () => onNotice(null),
    onSuccess: (_answer, invitation) => onNotice({ tone: 'success', text: `The invitation to ${invitation.email} is withdrawn: its link no longer works.` }),
    onError: (err) => onNotice({ tone: 'error', text: messageOf(err) }),
    onSettled: () => queryClient.invalidateQueries({ queryKey: keys.invitations(studioId) }),
  });

  if (!invitations) {
    return (
      <p className="flex items-center gap-2 text-sm text-ink-muted">
        <Spinner /> Loading invitations…
      </p>
    );
  }
  const now = Date.now();
  const open = invitations.filter((i) => !i.acceptedAt && !i.revokedAt && new Date(i.expiresAt).getTime() > now);
  if (open.length === 0) {
    return <p className="text-sm text-ink-muted">No open invitations. People you invite show here until they join.</p>;
  }
  return (
    <ul className="divide-y divide-sand-line/70" aria-label="Open invitations">
      {open.map((invitation) => {
        const busy = withdraw.isPending && withdraw.variables?.id === invitation.id;
        return (
          <li key={invitation.id} className="flex flex-wrap items-center gap-x-3 gap-y-1 py-3 first:pt-0 last:pb-0">
            <span className="min-w-0 flex-1">
              <span className="block truncate font-medium text-ink">{invitation.email}</span>
              <span className="text-xs text-ink-muted">
                Link runs out{' '}
                <time dateTime={invitation.expiresAt} title={fullDate(invitation.expiresAt)} suppressHydrationWarning>
                  {relativeTime(invitation.expiresAt, now)}
                </time>
              </span>
            </span>
            <RoleBadge role={invitation.role} />
            <button
              type="button"
              className="btn-ghost-danger py-1.5"
              disabled={busy}
              aria-label={`Withdraw the invitation to ${invitation.email}`}
              onClick={() => withdraw.mutate(invitation)}
            >
              {busy && <Spinner />}
              Withdraw
            </button>
          </li>
        );
      })}
    </ul>
  );
}
