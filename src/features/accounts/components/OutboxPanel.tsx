import { Card } from '../../../components/Card';
import { Button } from '../../../components/Button';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { Loading } from '../../../components/Loading';
import { formatDateTime } from '../../../lib/format';
import { useOutbox, useRetryMail } from '../api';

const kindWords: Record<string, string> = { invitation: 'Invitation', release: 'Scores', 'score-release': 'Scores' };

/** Instructor: the course's mail that has not gone out (failed, or waiting for a retry), with "send again". */
export function OutboxPanel({ courseId }: { courseId: number }) {
  const outbox = useOutbox(courseId, 'unsent');
  const retry = useRetryMail(courseId);
  if (outbox.isPending) return <Loading what="course mail" />;
  if (outbox.error) return <ErrorBanner error={outbox.error} title="The course mail could not be loaded" />;
  const { messages, counts } = outbox.data;
  const failed = messages.filter((m) => m.state === 'failed');
  const waiting = messages.filter((m) => m.state !== 'failed');
  const retrying = waiting.filter((m) => m.attempts > 0 && m.lastError);
  const fresh = waiting.filter((m) => !(m.attempts > 0 && m.lastError));
  return (
    <Card title="Course mail">
      <p className="tabular text-sm text-muted">
        {counts.sent} sent
        {waiting.length > 0 && <> · {waiting.length} waiting</>}
        {failed.length > 0 && <> · <span className="font-medium text-danger">{failed.length} failed</span></>}
      </p>
      {messages.length === 0 && <p className="mt-1 text-sm text-muted">Every message has gone out.</p>}
      {retrying.length > 0 && (
        <p className="mt-2 text-sm">
          <span aria-hidden="true">↻ </span>
          {retrying.length === 1 ? 'One message is' : `${retrying.length} messages are`} waiting for a retry: the mail server did not take{' '}
          {retrying.length === 1 ? 'it' : 'them'} yet, and the site tries again by itself with growing pauses.
          {retrying[0]?.lastError && <span className="mt-0.5 block text-xs break-words text-muted">Last answer: {retrying[0].lastError}</span>}
        </p>
      )}
      {fresh.length > 0 && (
        <p className="mt-2 text-sm text-muted">
          {fresh.length === 1 ? 'One message is' : `${fresh.length} messages are`} on the way.
        </p>
      )}
      {failed.length > 0 && (
        <>
          <p className="mt-2 text-sm">These did not arrive after every retry. Check the address, then send again.</p>
          <ul className="mt-1.5 flex flex-col divide-y divide-line/70 text-sm" aria-label="Mail not delivered">
            {failed.map((m) => (
              <li key={m.id} className="flex flex-col gap-0.5 py-1.5">
                <div className="flex items-baseline justify-between gap-2">
                  <span className="truncate font-medium" title={m.to}>
                    <span aria-hidden="true" className="text-danger">
                      ✕{' '}
                    </span>
                    {m.to}
                  </span>
                  <Button size="sm" variant="secondary" busy={retry.isPending && retry.variables === m.id} onClick={() => retry.mutate(m.id)} aria-label={`Send again: ${m.subject} to ${m.to}`}>
                    Send again
                  </Button>
                </div>
                <span className="text-xs text-muted">
                  {kindWords[m.kind ?? ''] ?? m.subject} · {m.attempts} {m.attempts === 1 ? 'try' : 'tries'}, last {formatDateTime(m.updatedAt)}
                </span>
                {m.lastError && <span className="text-xs break-words text-danger">{m.lastError}</span>}
              </li>
            ))}
          </ul>
        </>
      )}
      {retry.error && (
        <div className="mt-2">
          <ErrorBanner error={retry.error} title="The message was not queued again" />
        </div>
      )}
    </Card>
  );
}
