import { Button } from '../../../components/Button';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { useReferenceProgress, useRetryReferences } from '../api';
import { ProgressBar } from './bits';

/**
 * References done of total for a published assignment, polled every second until every
 * reference is ready or failed; failures with their stored message and a retry.
 */
export function ReferenceProgressPanel({ courseId, assignmentId, canRetry }: { courseId: number; assignmentId: number; canRetry: boolean }) {
  const progress = useReferenceProgress(courseId, assignmentId);
  const retry = useRetryReferences(courseId, assignmentId);
  if (progress.isPending) return <p className="text-sm text-muted">Counting references…</p>;
  if (progress.error) return <ErrorBanner error={progress.error} title="The reference progress could not be loaded" />;
  const { ready, failed, total, failures } = progress.data;
  const done = ready + failed >= total;
  return (
    <div className="flex flex-col gap-2" data-testid="reference-progress">
      <p className="flex flex-wrap items-baseline justify-between gap-x-3 text-sm">
        <span className="font-medium">
          References ready <span className="tabular">{ready}</span> of <span className="tabular">{total}</span>
        </span>
        <span className="text-xs text-muted" aria-live="polite">
          {total === 0
            ? 'No variants yet: references are computed for every enrolled student at publishing.'
            : !done
              ? 'Computing… this updates by itself.'
              : failed > 0
                ? `${failed} failed`
                : 'All references are ready.'}
        </span>
      </p>
      {total > 0 && <ProgressBar ready={ready} failed={failed} total={total} label="References ready" />}
      {failures.length > 0 && (
        <div className="mt-1 rounded-md border border-danger/40 bg-danger-soft/60 p-3">
          <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
            <p className="text-sm font-semibold text-danger">
              {failures.length} reference{failures.length === 1 ? '' : 's'} failed
            </p>
            {canRetry && (
              <Button size="sm" variant="danger" busy={retry.isPending} onClick={() => retry.mutate()}>
                {retry.isPending ? 'Retrying…' : 'Retry failed references'}
              </Button>
            )}
          </div>
          <ul className="flex flex-col gap-1.5 text-sm">
            {failures.map((f) => (
              <li key={f.referenceId} className="flex flex-col">
                <span className="font-medium">
                  {f.student ?? 'Instructor preview'}
                  <span className="ml-2 text-xs font-normal text-muted">
                    after {f.attempts} attempt{f.attempts === 1 ? '' : 's'}
                  </span>
                </span>
                <span className="font-mono text-xs break-words text-ink">{f.message}</span>
              </li>
            ))}
          </ul>
          {retry.error && <ErrorBanner error={retry.error} title="The retry was not started" />}
        </div>
      )}
    </div>
  );
}
