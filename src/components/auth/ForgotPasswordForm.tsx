// Asks for a password-reset link by e-mail; says the same thing whether or not the address has an account.
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { email } from '~/lib/forms/fields';
import { api } from '../shared/api';
import { applyServerError, FormMessage, SubmitButton, TextField } from '../shared/form';

const Request = z.object({ email });
type Request = z.infer<typeof Request>;

export default function ForgotPasswordForm() {
  const [topMessage, setTopMessage] = useState<string | null>(null);
  const [sentTo, setSentTo] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors, isSubmitting },
  } = useForm<Request>({ resolver: zodResolver(Request), defaultValues: { email: '' } });

  const onSubmit = handleSubmit(async (values) => {
    setTopMessage(null);
    try {
      await api('/api/auth/password-reset', { method: 'POST', body: values });
      setSentTo(values.email);
    } catch (err) {
      setTopMessage(applyServerError(err, setError, ['email']));
    }
  });

  if (sentTo) {
    return (
      <div className="space-y-5">
        <FormMessage tone="success">
          If <strong className="font-semibold">{sentTo}</strong> has a Tidemark account, a link to choose a new password is on its way. It
          works once, for one hour.
        </FormMessage>
        <p className="text-sm text-ink-soft">
          Nothing after a few minutes? Check the spam folder, or{' '}
          <button type="button" className="link" onClick={() => setSentTo(null)}>
            try another address
          </button>
          .
        </p>
        <a href="/sign-in" className="btn-quiet w-full">
          Back to sign in
        </a>
      </div>
    );
  }

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-5">
      <FormMessage>{topMessage}</FormMessage>
      <TextField label="E-mail" type="email" autoComplete="username" autoFocus registration={register('email')} error={errors.email?.message} />
      <SubmitButton busy={isSubmitting} className="w-full py-2.5">
        Send me a link
      </SubmitButton>
    </form>
  );
}
