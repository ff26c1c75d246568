// The invite form (owners): an e-mail and a role; the API e-mails a single-use link.
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { email, role } from '~/lib/server/validation';
import { api } from '../shared/api';
import { applyServerError, fieldMessage, FormMessage, SubmitButton, TextField } from '../shared/form';
import { keys, ROLE_HELP, ROLE_ORDER, type Notice, type RoleName } from './types';

const Invite = z.object({ email, role });
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

  const send = useMutation({
    mutationFn: (values: Invite) => api(`/api/studios/${studioId}/invitations`, { method: 'POST', body: values }),
    onSuccess: (_answer, values) => {
      reset({ email: '', role: values.role });
      onNotice({ tone: 'success', text: `Invitation sent to ${values.email}.` });
      return queryClient.invalidateQueries({ queryKey: keys.invitations(studioId) });
    },
    onError: (err) => setTopMessage(applyServerError(err, setError, ['email', 'role'])),
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
      <SubmitButton busy={send.isPending}>Send invitation</SubmitButton>
    </form>
  );
}
