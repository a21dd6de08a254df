import { useState, type FormEvent } from 'react';
import { signInBody } from '../../../../shared/api';
import { Button } from '../../../components/Button';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { Field } from '../../../components/Field';
import { fieldErrorsOf } from '../../../lib/forms';
import { ApiError } from '../../../lib/http';
import { useSignIn } from '../api';

export function SignInForm() {
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const signIn = useSignIn();

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = signInBody.safeParse({ email, password });
    if (!parsed.success) {
      setFieldErrors(fieldErrorsOf(parsed.error));
      return;
    }
    setFieldErrors({});
    signIn.mutate(parsed.data);
  };

  const serverError = signIn.error;
  const serverFields = serverError instanceof ApiError ? serverError.fieldErrors : {};
  const message =
    serverError instanceof ApiError && serverError.status === 401
      ? new Error(serverError.message || 'That e-mail and password do not match an account. Check both and try again.')
      : serverError;

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Sign in">
      <ErrorBanner error={message} title="Could not sign you in" />
      <Field
        label="E-mail"
        type="email"
        name="email"
        autoComplete="username"
        value={email}
        onChange={(e) => setEmail(e.target.value)}
        error={fieldErrors.email ?? serverFields.email}
        required
      />
      <Field
        label="Password"
        type="password"
        name="password"
        autoComplete="current-password"
        value={password}
        onChange={(e) => setPassword(e.target.value)}
        error={fieldErrors.password ?? serverFields.password}
        required
      />
      <Button type="submit" busy={signIn.isPending} className="mt-1 w-full">
        {signIn.isPending ? 'Signing in…' : 'Sign in'}
      </Button>
    </form>
  );
}
