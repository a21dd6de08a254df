import { useQueryClient } from '@tanstack/react-query';
import { Button } from '../components/Button';
import { EmptyState } from '../components/EmptyState';
import { ErrorBanner } from '../components/ErrorBanner';
import { Loading } from '../components/Loading';
import { isApiError } from '../lib/http';
import { devMailKeys, useDevMail } from '../features/devmail/api';
import { MailList } from '../features/devmail/components/MailList';
import { PageHeader } from './PageHeader';

export function DevMailPage() {
  const mail = useDevMail();
  const qc = useQueryClient();
  return (
    <>
      <PageHeader title="Caught mail">
        Every message this installation sends goes to a local mail catcher instead of a real inbox. This page is for development
        and testing.
      </PageHeader>
      <div className="mb-4 flex items-center gap-3">
        <Button variant="secondary" size="sm" busy={mail.isFetching} onClick={() => qc.invalidateQueries({ queryKey: devMailKeys.all })}>
          Refresh
        </Button>
        {mail.data && (
          <span className="tabular text-sm text-muted">
            {mail.data.length} {mail.data.length === 1 ? 'message' : 'messages'}
          </span>
        )}
      </div>
      {mail.isPending ? (
        <Loading what="caught mail" />
      ) : mail.error ? (
        isApiError(mail.error, 404) ? (
          <EmptyState title="The development mail page is turned off here">
            <p>This server runs with MODEWRIGHT_DEV_MAIL=0, so mail goes out for real and is not kept here.</p>
          </EmptyState>
        ) : (
          <ErrorBanner error={mail.error} title="Caught mail could not be loaded" />
        )
      ) : mail.data.length === 0 ? (
        <EmptyState title="No mail caught yet">
          <p>Messages appear here as the site sends them, for example when staff release scores. The list refreshes every ten seconds.</p>
        </EmptyState>
      ) : (
        <MailList messages={mail.data} />
      )}
    </>
  );
}
