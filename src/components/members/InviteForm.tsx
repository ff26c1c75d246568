// The invite form (owners): an e-mail, a role and, for a client, the shows it may see; the API e-mails a single-use link.
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { email, role } from '~/lib/forms/fields';
import { api } from '../shared/api';
import { applyServerError, fieldMessage, FormMessage, SubmitButton, TextField } from '../shared/form';
import { keys, ROLE_HELP, ROLE_ORDER, type Notice, type RoleName } from './types';

const Invite = z.object({ email, role, showIds: z.array(z.number()).optional() });
type Invite = z.infer<typeof Invite>;

export default function InviteForm({ studioId, onNotice }: { studioId: number; onNotice: (notice: Notice) => void }) {
  const queryClient = useQueryClient();
  const [topMessage, setTopMessage] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    reset,
    watch,
    formState: { errors },
  } = useForm<Invite>({ resolver: zodResolver(Invite), defaultValues: { email: '', role: 'artist' } });

  const [showIds, setShowIds] = useState<number[]>([]);
  const shows = useQuery({
    queryKey: ['studio-shows', studioId],
    queryFn: () => api<{ items: { id: number; code: string; name: string }[] }>(`/api/studios/${studioId}/shows?pageSize=100&archived=false&sort=code`),
  });
  const send = useMutation({
    mutationFn: (values: Invite) =>
      api(`/api/studios/${studioId}/invitations`, { method: 'POST', body: values.role === 'client' ? { ...values, showIds } : { email: values.email, role: values.role } }),
    onSuccess: (_answer, values) => {
      reset({ email: '', role: values.role });
      onNotice({ tone: 'success', text: `Invitation sent to ${values.email}.` });
      return queryClient.invalidateQueries({ queryKey: keys.invitations(studioId) });
    },
    onError: (err) => setTopMessage(applyServerError(err, setError, ['email', 'role', 'showIds'])),
  });

  const onSubmit = handleSubmit((values) => {
    setTopMessage(null);
    send.mutate(values);
  });
  const chosen = watch('role') as RoleName;
  const roleError = fieldMessage('Role', errors.role?.message);

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4">
      <FormMessage>{topMessage}</FormMessage>
      <TextField label="E-mail" type="email" autoComplete="off" registration={register('email')} error={errors.email?.message} />
      <div>
        <label htmlFor="field-role" className="field-label">
          Role
        </label>
        <select
          id="field-role"
          className="field-input"
          aria-invalid={roleError ? true : undefined}
          aria-describedby="field-role-help"
          {...register('role')}
        >
          {ROLE_ORDER.map((r) => (
            <option key={r} value={r}>
              {r[0]!.toUpperCase() + r.slice(1)}
            </option>
          ))}
        </select>
        {roleError ? (
          <p id="field-role-help" className="field-error">
            {roleError}
          </p>
        ) : (
          <p id="field-role-help" className="mt-1.5 text-sm text-ink-muted">
            {ROLE_HELP[chosen] ?? ''}
          </p>
        )}
      </div>
      {chosen === 'client' && (
        <fieldset className="rounded border border-sand-line p-3 text-sm" data-testid="invite-shows">
          <legend className="px-1 field-label">Shows this client may see</legend>
          {(shows.data?.items ?? []).map((s) => (
            <label key={s.id} className="flex items-center gap-2 py-0.5">
              <input type="checkbox" checked={showIds.includes(s.id)} onChange={(e) => setShowIds((p) => (e.target.checked ? [...p, s.id] : p.filter((x) => x !== s.id)))} />
              <span className="font-medium">{s.code}</span> <span className="text-ink-muted">{s.name}</span>
            </label>
          ))}
          {errors.showIds?.message && <p className="field-error">{errors.showIds.message}</p>}
          <p className="mt-1 text-ink-muted">A client sees only the versions shared with clients in these shows.</p>
        </fieldset>
      )}
      <SubmitButton busy={send.isPending}>Send invitation</SubmitButton>
    </form>
  );
}
