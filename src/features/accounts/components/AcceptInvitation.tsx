import { Link, useNavigate } from 'react-router-dom';
import { roleLabels, type UserSummary } from '../../../../shared/api';
import { Button } from '../../../components/Button';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { Loading } from '../../../components/Loading';
import { formatDateTime } from '../../../lib/format';
import { SignInForm } from '../../auth/components/SignInForm';
import { useSignOut } from '../../auth/api';
import { useAcceptInvitation, useInvitationLookup } from '../api';
import { InvitationSignUpForm, LinkProblem } from './AccountForms';

/**
 * An invitation link, signed in or not: a new address creates its account here; an existing
 * account signs in first (with the invited address) and then joins with one click.
 */
export function AcceptInvitation({ token, user }: { token: string | null; user: UserSummary | null }) {
  const lookup = useInvitationLookup(token);
  const accept = useAcceptInvitation();
  const signOut = useSignOut();
  const navigate = useNavigate();
  if (!token) return <LinkProblem state="missing" purpose="invitation" />;
  if (lookup.isPending) return <Loading what="your invitation" />;
  if (lookup.error) return <ErrorBanner error={lookup.error} title="The invitation could not be read" />;
  const inv = lookup.data;
  if (inv.state !== 'valid' || !inv.course || !inv.email || !inv.role) {
    return <LinkProblem state={inv.state === 'valid' ? 'unknown' : inv.state} purpose="invitation" />;
  }
  const course = inv.course;
  const goToCourse = () => navigate(`/courses/${course.id}`, { replace: true });
  const heading = (
    <div className="text-sm">
      <p>
        {inv.invitedBy ? <>{inv.invitedBy} invites you</> : 'You are invited'} to join
      </p>
      <p className="mt-1 text-base font-semibold text-ink">{course.title}</p>
      <p className="text-muted">
        <span className="font-mono text-[0.8125rem]">{course.code}</span> · {course.term} · as {roleLabels[inv.role].toLowerCase()}
      </p>
    </div>
  );
  const expires = inv.expiresAt ? <p className="text-xs text-muted">The invitation works once, until {formatDateTime(inv.expiresAt)}.</p> : null;

  if (user) {
    if (user.email !== inv.email) {
      return (
        <div className="flex flex-col gap-4">
          {heading}
          <p className="rounded-md border border-line-strong bg-surface-sunken px-3 py-2 text-sm" role="alert">
            This invitation was sent to <strong className="font-semibold">{inv.email}</strong>, but you are signed in as {user.email}. Sign out, then open the link
            again and sign in (or create the account) with the invited address.
          </p>
          <Button variant="secondary" busy={signOut.isPending} onClick={() => signOut.mutate()}>
            Sign out
          </Button>
        </div>
      );
    }
    return (
      <div className="flex flex-col gap-4">
        {heading}
        {accept.error && <ErrorBanner error={accept.error} title="You have not joined yet" />}
        <Button busy={accept.isPending} onClick={() => accept.mutate({ token }, { onSuccess: goToCourse })}>
          Join {course.code}
        </Button>
        {expires}
      </div>
    );
  }

  if (inv.accountExists) {
    return (
      <div className="flex flex-col gap-4">
        {heading}
        <p className="text-sm">
          <strong className="font-semibold">{inv.email}</strong> has a Modewright account. Sign in with it to accept.
        </p>
        <SignInForm />
        <p className="text-xs text-muted">
          Forgot the password?{' '}
          <Link to="/forgot-password" className="text-accent underline">
            Get a link to set a new one
          </Link>
          , then open the invitation again.
        </p>
      </div>
    );
  }

  return (
    <div className="flex flex-col gap-4">
      {heading}
      <InvitationSignUpForm
        email={inv.email}
        busy={accept.isPending}
        error={accept.error}
        onSubmit={(v, setServerErrors) => accept.mutate({ token, ...v }, { onSuccess: goToCourse, onError: setServerErrors })}
      />
      {expires}
    </div>
  );
}
