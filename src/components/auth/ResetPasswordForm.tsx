// Chooses a new password with a reset link's token; on success every session of the account is signed out.
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { password } from '~/lib/forms/fields';
import { api, ApiError } from '../shared/api';
import { applyServerError, FormMessage, SubmitButton, TextField } from '../shared/form';

const NewPassword = z
  .object({ password, repeat: z.string() })
  .refine((v) => v.password === v.repeat, { path: ['repeat'], message: 'does not match the password above' });
type NewPassword = z.infer<typeof NewPassword>;

export default function ResetPasswordForm({ token }: { token: string }) {
  const [topMessage, setTopMessage] = useState<string | null>(null);
  const [linkDead, setLinkDead] = useState(false);
  const [done, setDone] = useState(false);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors, isSubmitting },
  } = useForm<NewPassword>({ resolver: zodResolver(NewPassword), defaultValues: { password: '', repeat: '' } });

  const onSubmit = handleSubmit(async (values) => {
    setTopMessage(null);
    try {
      await api('/api/auth/password-reset/confirm', { method: 'POST', body: { token, password: values.password } });
      setDone(true);
    } catch (err) {
      const message = applyServerError(err, setError, ['password']).replace(/ \(token [^)]*\)$/, '');
      if (err instanceof ApiError && err.status === 410) {
        setLinkDead(true);
        // The link below offers the next step, so drop the API's own "ask for a new one" tail.
        setTopMessage(message.replace(/[:,;]\s*ask for a new one\.?$/i, '.'));
      } else {
        setTopMessage(message);
      }
    }
  });

  if (done) {
    return (
      <div className="space-y-5">
        <FormMessage tone="success">Your password is changed. Every device that was signed in has been signed out.</FormMessage>
        <a href="/sign-in" className="btn-primary w-full py-2.5">
          Sign in with the new password
        </a>
      </div>
    );
  }

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-5">
      <FormMessage>
        {topMessage}
        {linkDead && (
          <>
            {' '}
            <a href="/forgot-password" className="link">
              Ask for a new link
            </a>
            .
          </>
        )}
      </FormMessage>
      <TextField
        label="New password"
        type="password"
        autoComplete="new-password"
        autoFocus
        registration={register('password')}
        error={errors.password?.message}
        hint="At least 10 characters. A short sentence is easy to remember and hard to guess."
      />
      <TextField label="Repeat it" type="password" autoComplete="new-password" registration={register('repeat')} error={errors.repeat?.message} />
      <SubmitButton busy={isSubmitting} className="w-full py-2.5">
        Save the new password
      </SubmitButton>
    </form>
  );
}
