import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { signInBody } from '../../../../shared/api';
import { Button } from '../../../components/Button';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { Field } from '../../../components/Field';
import { showServerFieldErrors } from '../../../lib/forms';
import { ApiError } from '../../../lib/http';
import { useSignIn } from '../api';

const fields = ['email', 'password'] as const;

export function SignInForm() {
  const form = useForm({ resolver: zodResolver(signInBody), defaultValues: { email: '', password: '' } });
  const { errors } = form.formState;
  const signIn = useSignIn();

  const onSubmit = form.handleSubmit((data) =>
    signIn.mutate(data, { onError: (err) => showServerFieldErrors(err, form.setError, fields) }),
  );

  const serverError = signIn.error;
  const message =
    serverError instanceof ApiError && serverError.status === 401
      ? new Error(serverError.message || 'That e-mail and password do not match an account. Check both and try again.')
      : serverError;

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Sign in">
      <ErrorBanner error={message} title="Could not sign you in" />
      <Field label="E-mail" type="email" autoComplete="username" {...form.register('email')} error={errors.email?.message} required />
      <Field
        label="Password"
        type="password"
        autoComplete="current-password"
        {...form.register('password')}
        error={errors.password?.message}
        required
      />
      <Button type="submit" busy={signIn.isPending} className="mt-1 w-full">
        {signIn.isPending ? 'Signing in…' : 'Sign in'}
      </Button>
    </form>
  );
}
