import { zodResolver } from '@hookform/resolvers/zod';
import { useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { invitationsForm, splitAddresses, type Invitation, type InvitationState } from '../../../../shared/accounts';
import { roleLabels } from '../../../../shared/api';
import { Button } from '../../../components/Button';
import { Card } from '../../../components/Card';
import { ErrorBanner, Notice } from '../../../components/ErrorBanner';
import { Loading } from '../../../components/Loading';
import { formatDate } from '../../../lib/format';
import { useCreateInvitations, useInvitations, useRevokeInvitation } from '../api';

const stateWords: Record<InvitationState, { label: string; mark: string; className: string }> = {
  pending: { label: 'Waiting', mark: '◔', className: 'text-muted' },
  accepted: { label: 'Joined', mark: '✓', className: 'text-ok' },
  expired: { label: 'Expired', mark: '⌛', className: 'text-muted' },
  revoked: { label: 'Withdrawn', mark: '⊘', className: 'text-muted' },
};

function MailState({ inv }: { inv: Invitation }) {
  if (!inv.mail) return null;
  if (inv.mail.state === 'failed') {
    return (
      <span className="text-danger" title={inv.mail.lastError ?? undefined}>
        <span aria-hidden="true">✕ </span>mail not delivered
      </span>
    );
  }
  if (inv.mail.state === 'queued' || inv.mail.state === 'sending') {
    return (
      <span className="text-near-miss" title={inv.mail.lastError ?? undefined}>
        <span aria-hidden="true">↻ </span>
        {inv.mail.attempts > 0 ? `mail retrying (${inv.mail.attempts} tries)` : 'mail on its way'}
      </span>
    );
  }
  return null;
}

/** Instructor: invite addresses as students or teaching assistants; the invitations sent and their state. */
export function InvitationsPanel({ courseId }: { courseId: number }) {
  const list = useInvitations(courseId);
  const create = useCreateInvitations(courseId);
  const revoke = useRevokeInvitation(courseId);
  const [showAll, setShowAll] = useState(false);
  const form = useForm({ resolver: zodResolver(invitationsForm), defaultValues: { addresses: '', role: 'student' as const } });
  const { errors } = form.formState;
  const typed = form.watch('addresses');
  const count = useMemo(() => splitAddresses(typed).length, [typed]);

  const onSubmit = form.handleSubmit(({ addresses, role }) =>
    create.mutate({ emails: splitAddresses(addresses), role }, { onSuccess: () => form.reset({ addresses: '', role }) }),
  );
  const rows = list.data ?? [];
  const shown = showAll ? rows : rows.slice(0, 8);

  return (
    <Card title="Invitations">
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-2.5" aria-label="Invite people">
        <div className="flex flex-col gap-1">
          <label htmlFor="invite-addresses" className="text-sm font-medium">
            E-mail addresses
          </label>
          <textarea
            id="invite-addresses"
            rows={3}
            placeholder={'one@example.org, two@example.org\nor one per line'}
            aria-invalid={errors.addresses ? true : undefined}
            aria-describedby="invite-addresses-hint"
            className={`rounded-md border bg-surface-raised px-3 py-2 text-sm ${errors.addresses ? 'border-danger' : 'border-line-strong'}`}
            {...form.register('addresses')}
          />
          <p id="invite-addresses-hint" className="text-xs text-muted">
            Paste a list: commas, spaces or new lines. {count > 0 && <span className="tabular">{count} address{count === 1 ? '' : 'es'}.</span>}
          </p>
          {errors.addresses && <p className="text-xs font-medium text-danger">{errors.addresses.message}</p>}
        </div>
        <div className="flex flex-col gap-2">
          <div className="flex flex-col gap-1">
            <label htmlFor="invite-role" className="text-sm font-medium">
              Invite as
            </label>
            <select id="invite-role" className="rounded-md border border-line-strong bg-surface-raised px-2 py-1.5 text-sm" {...form.register('role')}>
              <option value="student">{roleLabels.student}</option>
              <option value="teaching_assistant">{roleLabels.teaching_assistant}</option>
            </select>
          </div>
          <Button type="submit" size="sm" busy={create.isPending} className="w-full">
            Send invitations
          </Button>
        </div>
      </form>
      {create.error && (
        <div className="mt-3">
          <ErrorBanner error={create.error} title="No invitation was sent" />
        </div>
      )}
      {create.isSuccess && (
        <div className="mt-3 flex flex-col gap-1.5">
          <Notice>
            {create.data.invitations.length === 0
              ? 'Nobody new to invite.'
              : `${create.data.invitations.length} invitation${create.data.invitations.length === 1 ? '' : 's'} on the way.`}
          </Notice>
          {create.data.skipped.length > 0 && (
            <ul className="text-xs text-muted">
              {create.data.skipped.map((s) => (
                <li key={s.email}>
                  {s.email}: {s.reason}
                </li>
              ))}
            </ul>
          )}
        </div>
      )}

      <h3 className="mt-4 mb-1.5 border-t border-line pt-3 text-sm font-semibold">Sent</h3>
      {list.isPending ? (
        <Loading what="invitations" />
      ) : list.error ? (
        <ErrorBanner error={list.error} title="The invitations could not be loaded" />
      ) : rows.length === 0 ? (
        <p className="text-sm text-muted">No invitations yet. Students can also join with the join code, or create an account from the sign-in page.</p>
      ) : (
        <ul className="flex flex-col divide-y divide-line/70 text-sm" aria-label="Invitations sent">
          {shown.map((inv) => {
            const st = stateWords[inv.state];
            return (
              <li key={inv.id} className="flex flex-col gap-0.5 py-1.5">
                <div className="flex items-baseline justify-between gap-2">
                  <span className="truncate font-medium" title={inv.email}>
                    {inv.email}
                  </span>
                  <span className={`shrink-0 text-xs font-medium ${st.className}`}>
                    <span aria-hidden="true">{st.mark} </span>
                    {st.label}
                  </span>
                </div>
                <div className="flex flex-wrap items-center gap-x-2 text-xs text-muted">
                  <span>{roleLabels[inv.role]}</span>
                  <span>· sent {formatDate(inv.createdAt)}</span>
                  {inv.state === 'pending' && <MailState inv={inv} />}
                  {inv.state === 'pending' && (
                    <button
                      type="button"
                      className="ml-auto text-accent hover:underline disabled:opacity-60"
                      disabled={revoke.isPending && revoke.variables === inv.id}
                      onClick={() => revoke.mutate(inv.id)}
                      aria-label={`Withdraw: invitation to ${inv.email}`}
                    >
                      Withdraw
                    </button>
                  )}
                </div>
              </li>
            );
          })}
        </ul>
      )}
      {rows.length > 8 && (
        <Button variant="quiet" size="sm" className="mt-1" onClick={() => setShowAll((v) => !v)}>
          {showAll ? 'Show fewer' : `Show all ${rows.length}`}
        </Button>
      )}
      {revoke.error && (
        <div className="mt-2">
          <ErrorBanner error={revoke.error} title="The invitation was not withdrawn" />
        </div>
      )}
    </Card>
  );
}
