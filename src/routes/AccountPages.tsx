import { Link, Route, Routes, useLocation } from 'react-router-dom';
import { useMe } from '../features/auth/api';
import { AcceptInvitation } from '../features/accounts/components/AcceptInvitation';
import { ConfirmSignUp, ForgotPasswordForm, ResetPasswordForm, SignUpForm, tokenFromLocation } from '../features/accounts/components/AccountForms';
import { PageHeader } from './PageHeader';
import { PublicShell } from './PublicShell';
import { SignInPage } from './SignInPage';

function useToken() {
  return tokenFromLocation(useLocation().search);
}

function SignUpPage() {
  return (
    <PublicShell title="Create an account">
      <SignUpForm />
    </PublicShell>
  );
}

function ConfirmPage() {
  return (
    <PublicShell title="Confirm your account">
      <ConfirmSignUp token={useToken()} />
    </PublicShell>
  );
}

function ForgotPasswordPage() {
  return (
    <PublicShell title="Forgot your password?">
      <ForgotPasswordForm />
    </PublicShell>
  );
}

function ResetPasswordPage() {
  return (
    <PublicShell title="Choose a new password">
      <ResetPasswordForm token={useToken()} />
    </PublicShell>
  );
}

function InvitationPublicPage() {
  return (
    <PublicShell title="Course invitation">
      <AcceptInvitation token={useToken()} user={null} />
    </PublicShell>
  );
}

/** Signed in: the invitation inside the usual layout. */
export function InvitationPage() {
  const token = useToken();
  const me = useMe();
  return (
    <div className="max-w-md">
      <PageHeader title="Course invitation" />
      <div className="rounded-lg border border-line bg-surface-raised p-5">
        <AcceptInvitation token={token} user={me.data ?? null} />
      </div>
    </div>
  );
}

/** Signed in: a password link still works (it sets the password of the account it was sent for). */
export function SignedInResetPasswordPage() {
  return (
    <div className="max-w-sm">
      <PageHeader title="Choose a new password" />
      <div className="rounded-lg border border-line bg-surface-raised p-5">
        <ResetPasswordForm token={useToken()} />
      </div>
    </div>
  );
}

/** Signed in: a confirmation link is for a new account; say so rather than switch accounts silently. */
export function SignedInConfirmPage() {
  const me = useMe();
  return (
    <div className="max-w-prose">
      <PageHeader title="Confirm an account" />
      <p className="text-sm">
        You are signed in as {me.data?.email}. If the link was for this address, the account is ready:{' '}
        <Link to="/" className="text-accent underline">
          go to your courses
        </Link>
        . If it was for another address, sign out first, then open the link from the e-mail again.
      </p>
    </div>
  );
}

/** Everything reachable while signed out; any other address shows the sign-in page. */
export function SignedOutRoutes() {
  return (
    <Routes>
      <Route path="sign-up" element={<SignUpPage />} />
      <Route path="confirm" element={<ConfirmPage />} />
      <Route path="forgot-password" element={<ForgotPasswordPage />} />
      <Route path="reset-password" element={<ResetPasswordPage />} />
      <Route path="invitation" element={<InvitationPublicPage />} />
      <Route path="*" element={<SignInPage />} />
    </Routes>
  );
}
