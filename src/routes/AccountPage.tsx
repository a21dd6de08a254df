import { Card } from '../components/Card';
import { ChangePasswordForm } from '../features/auth/components/ChangePasswordForm';
import { useCurrentUser } from './Layout';
import { PageHeader } from './PageHeader';

export function AccountPage() {
  const user = useCurrentUser();
  return (
    <>
      <PageHeader title="Account" />
      <div className="grid max-w-3xl gap-5">
        <Card title="You">
          <dl className="grid grid-cols-[max-content_1fr] gap-x-6 gap-y-1.5 text-sm">
            <dt className="text-muted">Name</dt>
            <dd className="font-medium">{user.displayName}</dd>
            <dt className="text-muted">E-mail</dt>
            <dd>{user.email}</dd>
            <dt className="text-muted">Creating courses</dt>
            <dd>{user.canTeach ? 'Allowed' : 'Not allowed. An instructor can allow you from a course’s member list.'}</dd>
          </dl>
        </Card>
        <Card title="Change password">
          <ChangePasswordForm />
        </Card>
      </div>
    </>
  );
}
