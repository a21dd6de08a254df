import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { Link, useNavigate } from 'react-router-dom';
import { z } from 'zod';
import { invitationSignUpForm, passwordResetBody, passwordResetRequestBody, signUpBody, type TokenStatus } from '../../../../shared/accounts';
import { Button } from '../../../components/Button';
import { ErrorBanner, Notice } from '../../../components/ErrorBanner';
import { Field } from '../../../components/Field';
import { Loading } from '../../../components/Loading';
import { formatDateTime } from '../../../lib/format';
import { hasServerFieldErrors, showServerFieldErrors } from '../../../lib/forms';
import { useCompletePasswordReset, useConfirmSignUp, useRequestPasswordReset, useSignUp, useTokenStatus } from '../api';

const samePassword = (field: 'password' | 'newPassword') => (v: Record<string, string>, ctx: z.RefinementCtx) => {
  if (v.repeat !== v[field]) ctx.addIssue({ code: 'custom', path: ['repeat'], message: 'The two passwords are not the same' });
};

const signUpForm = signUpBody.extend({ repeat: z.string() }).superRefine(samePassword('password'), { when: () => true });
const signUpFields = ['displayName', 'email', 'password'] as const;

/** Create a student account: the account exists once the link in the e-mail is opened. */
export function SignUpForm() {
  const form = useForm({ resolver: zodResolver(signUpForm), defaultValues: { displayName: '', email: '', password: '', repeat: '' } });
  const { errors } = form.formState;
  const signUp = useSignUp();

  if (signUp.isSuccess) {
    return (
      <div className="flex flex-col gap-3 text-sm">
        <Notice>Check your inbox at {signUp.variables.email}.</Notice>
        <p>{signUp.data.message}</p>
        <p className="text-muted">
          Nothing arrived after a few minutes? Look in the spam folder, or{' '}
          <button type="button" className="text-accent underline" onClick={() => signUp.reset()}>
            try again
          </button>{' '}
          (a new message replaces the old link).
        </p>
      </div>
    );
  }

  const onSubmit = form.handleSubmit(({ displayName, email, password }) =>
    signUp.mutate({ displayName, email, password }, { onError: (err) => showServerFieldErrors(err, form.setError, signUpFields) }),
  );
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Create an account">
      {signUp.error && !hasServerFieldErrors(signUp.error, signUpFields) && <ErrorBanner error={signUp.error} title="The account was not started" />}
      <Field label="Your name" autoComplete="name" hint="As your course staff should see it" {...form.register('displayName')} error={errors.displayName?.message} required />
      <Field label="E-mail" type="email" autoComplete="email" {...form.register('email')} error={errors.email?.message} required />
      <Field label="Password" type="password" autoComplete="new-password" hint="At least 10 characters" {...form.register('password')} error={errors.password?.message} required />
      <Field label="Password again" type="password" autoComplete="new-password" {...form.register('repeat')} error={errors.repeat?.message} required />
      <Button type="submit" busy={signUp.isPending} className="mt-1 w-full">
        {signUp.isPending ? 'Sending the link…' : 'Create account'}
      </Button>
      <p className="text-xs text-muted">You get a student account. To teach, ask an instructor on Modewright to allow your account to create courses.</p>
    </form>
  );
}

/** The token in the address (?token=…), or null. */
export function tokenFromLocation(search: string): string | null {
  const t = new URLSearchParams(search).get('token');
  return t && t.trim() ? t.trim() : null;
}

/** What to say about a link that is no longer good, with the way forward. */
export function LinkProblem({ state, purpose }: { state: TokenStatus['state'] | 'missing'; purpose: 'sign-up' | 'password-reset' | 'invitation' }) {
  const again =
    purpose === 'sign-up' ? (
      <Link to="/sign-up" className="text-accent underline">
        sign up again
      </Link>
    ) : purpose === 'password-reset' ? (
      <Link to="/forgot-password" className="text-accent underline">
        ask for a new link
      </Link>
    ) : (
      <span>ask the instructor to invite you again</span>
    );
  const what = purpose === 'sign-up' ? 'confirmation link' : purpose === 'password-reset' ? 'password link' : 'invitation link';
  const text: Record<typeof state, string> = {
    missing: `This page needs the ${what} from your e-mail. Open the link from the message (if it is split over two lines, copy the whole address).`,
    unknown: `This ${what} is not known. Perhaps it was copied only in part.`,
    used: `This ${what} has been used already. Each link works once.`,
    expired: `This ${what} has expired.`,
    revoked: `A newer message replaced this ${what}; use the newest one.`,
    valid: '',
  };
  return (
    <div className="flex flex-col gap-2 text-sm" role="alert">
      <p className="font-medium">{text[state]}</p>
      <p>
        You can {again}
        {state === 'used' && purpose !== 'password-reset' ? (
          <>
            , or{' '}
            <Link to="/" className="text-accent underline">
              sign in
            </Link>
          </>
        ) : null}
        .
      </p>
    </div>
  );
}

/** The confirmation link: a click (never the mere visit, which mail scanners make) creates the account and signs in. */
export function ConfirmSignUp({ token }: { token: string | null }) {
  const status = useTokenStatus('sign-up', token);
  const confirm = useConfirmSignUp();
  const navigate = useNavigate();
  if (!token) return <LinkProblem state="missing" purpose="sign-up" />;
  if (status.isPending) return <Loading what="your link" />;
  if (status.error) return <ErrorBanner error={status.error} title="The link could not be checked" />;
  if (status.data.state !== 'valid') return <LinkProblem state={status.data.state} purpose="sign-up" />;
  return (
    <div className="flex flex-col gap-4 text-sm">
      <p>
        Create the account for <strong className="font-semibold">{status.data.email}</strong>?
      </p>
      {confirm.error && <ErrorBanner error={confirm.error} title="The account was not created" />}
      <Button busy={confirm.isPending} className="w-full" onClick={() => confirm.mutate(token, { onSuccess: () => navigate('/', { replace: true }) })}>
        Confirm and sign in
      </Button>
      {status.data.expiresAt && <p className="text-xs text-muted">The link works until {formatDateTime(status.data.expiresAt)}.</p>}
    </div>
  );
}

export function ForgotPasswordForm() {
  const form = useForm({ resolver: zodResolver(passwordResetRequestBody), defaultValues: { email: '' } });
  const request = useRequestPasswordReset();
  if (request.isSuccess) {
    return (
      <div className="flex flex-col gap-3 text-sm">
        <Notice>{request.data.message}</Notice>
        <p className="text-muted">
          Nothing arrived? Check the address and the spam folder, then{' '}
          <button type="button" className="text-accent underline" onClick={() => request.reset()}>
            try again
          </button>
          .
        </p>
      </div>
    );
  }
  const onSubmit = form.handleSubmit(({ email }) => request.mutate(email, { onError: (err) => showServerFieldErrors(err, form.setError, ['email']) }));
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Ask for a password link">
      <p className="text-sm text-muted">Enter the address you sign in with. We send a link to choose a new password; it works for one hour.</p>
      {request.error && !hasServerFieldErrors(request.error, ['email']) && <ErrorBanner error={request.error} title="No link was sent" />}
      <Field label="E-mail" type="email" autoComplete="email" {...form.register('email')} error={form.formState.errors.email?.message} required />
      <Button type="submit" busy={request.isPending} className="w-full">
        Send the link
      </Button>
    </form>
  );
}

const resetForm = passwordResetBody.omit({ token: true }).extend({ repeat: z.string() }).superRefine(samePassword('newPassword'), { when: () => true });

export function ResetPasswordForm({ token }: { token: string | null }) {
  const status = useTokenStatus('password-reset', token);
  const reset = useCompletePasswordReset();
  const form = useForm({ resolver: zodResolver(resetForm), defaultValues: { newPassword: '', repeat: '' } });
  const { errors } = form.formState;
  if (!token) return <LinkProblem state="missing" purpose="password-reset" />;
  if (reset.isSuccess) {
    return (
      <div className="flex flex-col gap-3 text-sm">
        <Notice>Your new password is set. Every browser that was signed in has been signed out.</Notice>
        <Link to="/" className="font-medium text-accent underline">
          Sign in with the new password
        </Link>
      </div>
    );
  }
  if (status.isPending) return <Loading what="your link" />;
  if (status.error) return <ErrorBanner error={status.error} title="The link could not be checked" />;
  if (status.data.state !== 'valid') return <LinkProblem state={status.data.state} purpose="password-reset" />;
  const onSubmit = form.handleSubmit(({ newPassword }) =>
    reset.mutate({ token, newPassword }, { onError: (err) => showServerFieldErrors(err, form.setError, ['newPassword']) }),
  );
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Choose a new password">
      <p className="text-sm">
        New password for <strong className="font-semibold">{status.data.email}</strong>
      </p>
      {reset.error && !hasServerFieldErrors(reset.error, ['newPassword']) && <ErrorBanner error={reset.error} title="The password was not changed" />}
      <input type="email" autoComplete="username" value={status.data.email} readOnly hidden />
      <Field label="New password" type="password" autoComplete="new-password" hint="At least 10 characters" {...form.register('newPassword')} error={errors.newPassword?.message} required />
      <Field label="New password again" type="password" autoComplete="new-password" {...form.register('repeat')} error={errors.repeat?.message} required />
      <Button type="submit" busy={reset.isPending} className="w-full">
        Set the new password
      </Button>
    </form>
  );
}

const invitationForm = invitationSignUpForm.extend({ repeat: z.string() }).superRefine(samePassword('password'), { when: () => true });
const invitationFields = ['displayName', 'password'] as const;

/** New account from an invitation: the address is the invited one, proven by the link. */
export function InvitationSignUpForm({ email, busy, error, onSubmit }: { email: string; busy: boolean; error: unknown; onSubmit: (v: { displayName: string; password: string }, setServerErrors: (err: unknown) => void) => void }) {
  const form = useForm({ resolver: zodResolver(invitationForm), defaultValues: { displayName: '', password: '', repeat: '' } });
  const { errors } = form.formState;
  const submit = form.handleSubmit(({ displayName, password }) =>
    onSubmit({ displayName, password }, (err) => showServerFieldErrors(err, form.setError, invitationFields)),
  );
  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-4" aria-label="Create your account and join">
      {error && !hasServerFieldErrors(error, invitationFields) ? <ErrorBanner error={error} title="You have not joined yet" /> : null}
      <Field label="E-mail" type="email" autoComplete="username" value={email} readOnly hint="The invited address; it becomes your sign-in" />
      <Field label="Your name" autoComplete="name" {...form.register('displayName')} error={errors.displayName?.message} required />
      <Field label="Password" type="password" autoComplete="new-password" hint="At least 10 characters" {...form.register('password')} error={errors.password?.message} required />
      <Field label="Password again" type="password" autoComplete="new-password" {...form.register('repeat')} error={errors.repeat?.message} required />
      <Button type="submit" busy={busy} className="w-full">
        Create account and join
      </Button>
    </form>
  );
}
