import { useState, type FormEvent } from 'react';
import { changePasswordBody } from '../../../../shared/api';
import { Button } from '../../../components/Button';
import { ErrorBanner, Notice } from '../../../components/ErrorBanner';
import { Field } from '../../../components/Field';
import { fieldErrorsOf } from '../../../lib/forms';
import { ApiError } from '../../../lib/http';
import { useChangePassword } from '../api';

export function ChangePasswordForm() {
  const [currentPassword, setCurrent] = useState('');
  const [newPassword, setNew] = useState('');
  const [repeat, setRepeat] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const change = useChangePassword();

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = changePasswordBody.safeParse({ currentPassword, newPassword });
    const errs: Record<string, string> = parsed.success ? {} : fieldErrorsOf(parsed.error);
    if (!currentPassword) errs.currentPassword = 'Enter your current password';
    if (newPassword && newPassword === currentPassword) errs.newPassword = 'The new password must differ from the current one';
    if (repeat !== newPassword) errs.repeat = 'The two new passwords are not the same';
    setErrors(errs);
    if (Object.keys(errs).length || !parsed.success) return;
    change.mutate(parsed.data, {
      onSuccess: () => {
        setCurrent('');
        setNew('');
        setRepeat('');
      },
    });
  };

  const server = change.error instanceof ApiError ? change.error.fieldErrors : {};
  return (
    <form onSubmit={onSubmit} noValidate className="flex max-w-sm flex-col gap-4">
      {change.isSuccess && <Notice>Your password has been changed. Use the new one next time you sign in.</Notice>}
      {change.error && Object.keys(server).length === 0 && <ErrorBanner error={change.error} title="Your password was not changed" />}
      <Field
        label="Current password"
        type="password"
        autoComplete="current-password"
        value={currentPassword}
        onChange={(e) => setCurrent(e.target.value)}
        error={errors.currentPassword ?? server.currentPassword}
      />
      <Field
        label="New password"
        type="password"
        autoComplete="new-password"
        hint="At least 10 characters. A few unrelated words work well."
        value={newPassword}
        onChange={(e) => setNew(e.target.value)}
        error={errors.newPassword ?? server.newPassword}
      />
      <Field
        label="New password again"
        type="password"
        autoComplete="new-password"
        value={repeat}
        onChange={(e) => setRepeat(e.target.value)}
        error={errors.repeat}
      />
      <div>
        <Button type="submit" busy={change.isPending}>
          {change.isPending ? 'Changing…' : 'Change password'}
        </Button>
      </div>
    </form>
  );
}
