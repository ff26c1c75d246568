// The sign-in form: e-mail and password, field messages from the same rules as the server, throttle message at the top.
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { email } from '~/lib/forms/fields';
import { api } from '../shared/api';
import { applyServerError, FormMessage, SubmitButton, TextField } from '../shared/form';
import { sameSitePath } from '../shared/paths';

// Sign-in accepts any non-empty password (the length rule applies when a password is chosen).
const SignIn = z.object({ email, password: z.string().min(1, 'is required').max(200, 'is too long') });
type SignIn = z.infer<typeof SignIn>;

export default function SignInForm({ next, email: initialEmail = '' }: { next: string; email?: string }) {
  const [topMessage, setTopMessage] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors, isSubmitting },
  } = useForm<SignIn>({ resolver: zodResolver(SignIn), defaultValues: { email: initialEmail, password: '' } });

  const onSubmit = handleSubmit(async (values) => {
    setTopMessage(null);
    try {
      await api('/api/auth/sign-in', { method: 'POST', body: values });
      window.location.assign(sameSitePath(next, '/'));
    } catch (err) {
      setTopMessage(applyServerError(err, setError, ['email', 'password']));
    }
  });

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-5">
      <FormMessage>{topMessage}</FormMessage>
      <TextField label="E-mail" type="email" autoComplete="username" autoFocus={!initialEmail} registration={register('email')} error={errors.email?.message} />
      <TextField
        label="Password"
        type="password"
        autoComplete="current-password"
        autoFocus={Boolean(initialEmail)}
        registration={register('password')}
        error={errors.password?.message}
        aside={
          <a href="/forgot-password" className="text-sm font-medium text-harbour-600 hover:text-harbour-700 hover:underline">
            Forgot your password?
          </a>
        }
      />
      <SubmitButton busy={isSubmitting} className="w-full py-2.5">
        Sign in
      </SubmitButton>
    </form>
  );
}
