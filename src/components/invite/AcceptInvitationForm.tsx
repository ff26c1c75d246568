// Accepts an invitation: a new account chooses a name and a password; a signed-in invitee just joins.
import { useState, type SyntheticEvent } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { password, personName } from '~/lib/forms/fields';
import { api } from '../shared/api';
import { applyServerError, FormMessage, SubmitButton, TextField } from '../shared/form';

const NewAccount = z.object({ name: personName, password });
type NewAccount = z.infer<typeof NewAccount>;

interface Props {
  token: string;
  email: string;
  /** True when the invitee has no account yet and must choose a name and a password. */
  newAccount: boolean;
}

/** Where to go after joining. */
function studioHome(slug: string) {
  return `/studios/${encodeURIComponent(slug)}/`;
}

export default function AcceptInvitationForm({ token, email, newAccount }: Props) {
  return newAccount ? <NewAccountForm token={token} email={email} /> : <JoinButton token={token} />;
}

function NewAccountForm({ token, email }: { token: string; email: string }) {
  const [topMessage, setTopMessage] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors, isSubmitting },
  } = useForm<NewAccount>({ resolver: zodResolver(NewAccount), defaultValues: { name: '', password: '' } });

  const onSubmit = handleSubmit(async (values) => {
    setTopMessage(null);
    try {
      const result = await api<{ studio: string }>(`/api/invitations/${encodeURIComponent(token)}/accept`, { method: 'POST', body: values });
      window.location.assign(studioHome(result.studio));
    } catch (err) {
      setTopMessage(applyServerError(err, setError, ['name', 'password']));
    }
  });

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-5">
      <FormMessage>{topMessage}</FormMessage>
      <div>
        <span className="field-label">E-mail</span>
        <p className="rounded-lg border border-sand-line bg-sand px-3 py-2 text-[0.95rem] text-ink-soft">{email}</p>
      </div>
      <TextField label="Your name" autoComplete="name" autoFocus registration={register('name')} error={errors.name?.message} hint="As your team knows you." />
      <TextField
        label="Password"
        type="password"
        autoComplete="new-password"
        registration={register('password')}
        error={errors.password?.message}
        hint="At least 10 characters."
      />
      <SubmitButton busy={isSubmitting} className="w-full py-2.5">
        Join
      </SubmitButton>
    </form>
  );
}

function JoinButton({ token }: { token: string }) {
  const [topMessage, setTopMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const join = async (event: SyntheticEvent) => {
    event.preventDefault();
    setBusy(true);
    setTopMessage(null);
    try {
      const result = await api<{ studio: string }>(`/api/invitations/${encodeURIComponent(token)}/accept`, { method: 'POST', body: {} });
      window.location.assign(studioHome(result.studio));
    } catch (err) {
      setTopMessage(applyServerError(err, () => {}, []));
      setBusy(false);
    }
  };
  return (
    <form onSubmit={join} className="space-y-5">
      <FormMessage>{topMessage}</FormMessage>
      <SubmitButton busy={busy} className="w-full py-2.5">
        Join
      </SubmitButton>
    </form>
  );
}
