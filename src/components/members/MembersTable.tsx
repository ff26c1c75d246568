// The members table: name, e-mail, role, last active; owners change roles (optimistically, rolled back on refusal) and remove people.
import { useState } from 'react';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api, messageOf } from '../shared/api';
import { Spinner } from '../shared/form';
import { fullDate, relativeTime } from './time';
import ClientShows from './ClientShows';
import { keys, ROLE_ORDER, type Member, type MembersAnswer, type Notice, type RoleName } from './types';

interface Props {
  studioId: number;
  data: MembersAnswer;
  onNotice: (notice: Notice) => void;
}

const article = (role: RoleName) => (role === 'owner' || role === 'artist' ? 'an' : 'a');

export default function MembersTable({ studioId, data, onNotice }: Props) {
  const queryClient = useQueryClient();
  const key = keys.members(studioId);
  const isOwner = data.you.role === 'owner';
  const [confirming, setConfirming] = useState<number | null>(null);

  const changeRole = useMutation({
    mutationFn: ({ member, role }: { member: Member; role: RoleName }) =>
      api(`/api/studios/${studioId}/members/${member.id}`, { method: 'PATCH', body: { role } }),
    onMutate: async ({ member, role }) => {
      onNotice(null);
      await queryClient.cancelQueries({ queryKey: key });
      const previous = queryClient.getQueryData<MembersAnswer>(key);
      queryClient.setQueryData<MembersAnswer>(key, (old) =>
        old ? { ...old, members: old.members.map((m) => (m.id === member.id ? { ...m, role } : m)) } : old,
      );
      return { previous };
    },
    onError: (err, _vars, context) => {
      if (context?.previous) queryClient.setQueryData(key, context.previous);
      onNotice({ tone: 'error', text: messageOf(err) });
    },
    onSuccess: (_answer, { member, role }) => {
      const who = member.userId === data.you.userId ? 'You are' : `${member.name} is`;
      onNotice({ tone: 'success', text: `${who} now ${article(role)} ${role}.` });
    },
    onSettled: () => queryClient.invalidateQueries({ queryKey: key }),
  });

  const remove = useMutation({
    mutationFn: (member: Member) => api(`/api/studios/${studioId}/members/${member.id}`, { method: 'DELETE' }),
    onMutate: () => onNotice(null),
    onError: (err) => onNotice({ tone: 'error', text: messageOf(err) }),
    onSuccess: (_answer, member) => {
      setConfirming(null);
      if (member.userId === data.you.userId) {
        window.location.assign('/');
        return;
      }
      onNotice({ tone: 'success', text: `${member.name} no longer has access to this studio.` });
    },
    onSettled: () => queryClient.invalidateQueries({ queryKey: key }),
  });

  return (
    <div className="card relative overflow-x-auto">
      <table data-testid="members-table" className="w-full text-left text-sm max-sm:block sm:min-w-[40rem]">
        <thead className="border-b border-sand-line text-xs tracking-wide text-ink-muted uppercase max-sm:sr-only">
          <tr>
            <th scope="col" className="px-4 py-3 font-medium sm:px-5">
              Name
            </th>
            <th scope="col" className="px-4 py-3 font-medium">
              E-mail
            </th>
            <th scope="col" className="px-4 py-3 font-medium">
              Role
            </th>
            <th scope="col" className="px-4 py-3 font-medium">
              Last active
            </th>
            {isOwner && (
              <th scope="col" className="px-4 py-3 sm:pr-5">
                <span className="sr-only">Actions</span>
              </th>
            )}
          </tr>
        </thead>
        <tbody className="divide-y divide-sand-line/70 max-sm:block">
          {data.members.map((member) => {
            const isYou = member.userId === data.you.userId;
            const pendingRole = changeRole.isPending && changeRole.variables?.member.id === member.id;
            const removing = remove.isPending && remove.variables?.id === member.id;
            return (
              <tr key={member.id} className="align-middle max-sm:grid max-sm:grid-cols-[minmax(0,1fr)_auto] max-sm:items-center max-sm:gap-x-3 max-sm:gap-y-0.5 max-sm:px-4 max-sm:py-3.5">
                <td className="px-4 py-3 max-sm:col-start-1 max-sm:p-0 sm:px-5">
                  <span className="font-medium text-ink">{member.name}</span>
                  {isYou && <span className="ml-2 rounded-full bg-sand-deep px-2 py-0.5 text-xs text-ink-soft">you</span>}
                  {member.role === 'client' && member.showIds && <ClientShows studioId={studioId} member={member} canEdit={isOwner} onNotice={onNotice} />}
                </td>
                <td className="px-4 py-3 text-ink-soft max-sm:col-start-1 max-sm:truncate max-sm:p-0">{member.email}</td>
                <td className="px-4 py-3 max-sm:col-start-2 max-sm:row-span-2 max-sm:row-start-1 max-sm:justify-self-end max-sm:p-0">
                  {isOwner ? (
                    <span className="inline-flex items-center gap-2">
                      <select
                        aria-label={`Role of ${member.name}`}
                        value={member.role}
                        disabled={pendingRole || removing}
                        onChange={(event) => changeRole.mutate({ member, role: event.target.value as RoleName })}
                        className="field-input w-auto py-1.5 pr-8 capitalize"
                      >
                        {ROLE_ORDER.map((role) => (
                          <option key={role} value={role}>
                            {role[0]!.toUpperCase() + role.slice(1)}
                          </option>
                        ))}
                      </select>
                      {pendingRole && <Spinner />}
                    </span>
                  ) : (
                    <RoleBadge role={member.role} />
                  )}
                </td>
                <td className="px-4 py-3 text-ink-soft max-sm:col-start-1 max-sm:p-0 max-sm:text-xs">
                  <span className="sm:hidden">Last active </span>
                  {member.lastActiveAt ? (
                    <time dateTime={member.lastActiveAt} title={fullDate(member.lastActiveAt)} suppressHydrationWarning>
                      {relativeTime(member.lastActiveAt)}
                    </time>
                  ) : (
                    <span className="text-ink-muted">not yet</span>
                  )}
                </td>
                {isOwner && (
                  <td
                    className={`px-4 py-2 text-right whitespace-nowrap max-sm:p-0 max-sm:whitespace-normal sm:pr-5 ${
                      confirming === member.id ? 'max-sm:col-span-2 max-sm:row-start-4 max-sm:pt-2' : 'max-sm:col-start-2 max-sm:row-start-3'
                    }`}
                  >
                    {confirming === member.id ? (
                      <span className="inline-flex flex-wrap items-center justify-end gap-2" role="group" aria-label={`Confirm removing ${member.name}`}>
                        <span className="text-sm text-ink-soft">{isYou ? 'Leave this studio?' : `Remove ${member.name.split(' ')[0]}?`}</span>
                        <button type="button" className="btn-danger px-3 py-1.5" disabled={removing} onClick={() => remove.mutate(member)}>
                          {removing && <Spinner />}
                          Yes, remove
                        </button>
                        <button type="button" className="btn-quiet px-3 py-1.5" disabled={removing} onClick={() => setConfirming(null)}>
                          Cancel
                        </button>
                      </span>
                    ) : (
                      <button
                        type="button"
                        className="btn-ghost-danger py-1.5"
                        aria-label={`Remove ${member.name}`}
                        onClick={() => setConfirming(member.id)}
                      >
                        Remove
                      </button>
                    )}
                  </td>
                )}
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}

/** A role as a quiet pill, for read-only views. */
export function RoleBadge({ role }: { role: RoleName }) {
  const tone = role === 'owner' ? 'bg-harbour-50 text-harbour-700' : role === 'client' ? 'border border-sand-line text-ink-soft' : 'bg-sand-deep text-ink-soft';
  return <span className={`inline-block rounded-full px-2.5 py-0.5 text-xs font-medium capitalize ${tone}`}>{role}</span>;
}
