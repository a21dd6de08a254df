import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { changePasswordBody } from '../../../../shared/api';
import { Button } from '../../../components/Button';
import { ErrorBanner, Notice } from '../../../components/ErrorBanner';
import { Field } from '../../../components/Field';
import { hasServerFieldErrors, showServerFieldErrors } from '../../../lib/forms';
import { useChangePassword } from '../api';

/** The API's body plus what only the form asks: the new password twice, and different from the old one. */
const changePasswordForm = changePasswordBody
  .extend({
    currentPassword: z.string().min(1, 'Enter your current password').max(200),
    repeat: z.string(),
  })
  .superRefine(
    (v, ctx) => {
      if (v.newPassword && v.newPassword === v.currentPassword)
        ctx.addIssue({ code: 'custom', path: ['newPassword'], message: 'The new password must differ from the current one' });
      if (v.repeat !== v.newPassword) ctx.addIssue({ code: 'custom', path: ['repeat'], message: 'The two new passwords are not the same' });
    },
    // Also when a field already failed, so every problem shows at once.
    { when: () => true },
  );

const serverFields = ['currentPassword', 'newPassword'] as const;

export function ChangePasswordForm() {
  const form = useForm({
    resolver: zodResolver(changePasswordForm),
    defaultValues: { currentPassword: '', newPassword: '', repeat: '' },
  });
  const { errors } = form.formState;
  const change = useChangePassword();

  const onSubmit = form.handleSubmit(({ currentPassword, newPassword }) =>
    change.mutate(
      { currentPassword, newPassword },
      {
        onSuccess: () => form.reset(),
        onError: (err) => showServerFieldErrors(err, form.setError, serverFields),
      },
    ),
  );

  return (
    <form onSubmit={onSubmit} noValidate className="flex max-w-sm flex-col gap-4">
      {change.isSuccess && <Notice>Your password has been changed. Use the new one next time you sign in.</Notice>}
      {change.error && !hasServerFieldErrors(change.error, serverFields) && (
        <ErrorBanner error={change.error} title="Your password was not changed" />
      )}
      <Field
        label="Current password"
        type="password"
        autoComplete="current-password"
        {...form.register('currentPassword')}
        error={errors.currentPassword?.message}
      />
      <Field
        label="New password"
        type="password"
        autoComplete="new-password"
        hint="At least 10 characters. A few unrelated words work well."
        {...form.register('newPassword')}
        error={errors.newPassword?.message}
      />
      <Field label="New password again" type="password" autoComplete="new-password" {...form.register('repeat')} error={errors.repeat?.message} />
      <div>
        <Button type="submit" busy={change.isPending}>
          {change.isPending ? 'Changing…' : 'Change password'}
        </Button>
      </div>
    </form>
  );
}
