import { Link } from 'react-router-dom';
import type { Role } from '../../../../shared/api';
import type { DashboardResponse } from '../../../../shared/submission';
import { EmptyState } from '../../../components/EmptyState';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { Loading } from '../../../components/Loading';
import { formatDate } from '../../../lib/format';
import { useDashboard } from '../api';

type Row = DashboardResponse['assignments'][number];

const linkPrimary = 'inline-flex items-center rounded-md border border-accent bg-accent px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-strong';
const linkSecondary = 'inline-flex items-center rounded-md border border-line-strong bg-surface-raised px-3 py-1.5 text-sm font-medium text-ink hover:bg-surface-sunken';

/** Where the row's next action leads: the queue when something waits for review, otherwise the assignment's staff page. */
function nextLink(courseId: number, r: Row): string {
  if (r.waitingForReview > 0) return `/courses/${courseId}/reviews`;
  if (r.status === 'draft') return `/courses/${courseId}/assignments/${r.id}/edit`;
  return `/courses/${courseId}/assignments/${r.id}#submissions`;
}

/** Staff: per assignment, how many handed in, were scored, are flagged and wait for review, with the next thing to do one click away. */
export function CourseDashboard({ courseId, role }: { courseId: number; role: Role }) {
  const dash = useDashboard(courseId);
  const waiting = dash.data?.assignments.reduce((n, a) => n + a.waitingForReview, 0) ?? 0;
  return (
    <section aria-labelledby="dashboard-heading" className="flex min-w-0 flex-col gap-3">
      <div className="flex flex-wrap items-center gap-2">
        <h2 id="dashboard-heading" className="mr-auto text-base font-semibold">
          Dashboard
        </h2>
        <Link to={`/courses/${courseId}/reviews`} className={waiting > 0 ? linkPrimary : linkSecondary}>
          Review queue{dash.data ? <span className="tabular">&nbsp;({waiting})</span> : null}
        </Link>
        <Link to={`/courses/${courseId}/gradebook`} className={linkSecondary}>
          Gradebook
        </Link>
      </div>
      {dash.isPending ? (
        <Loading what="the dashboard" />
      ) : dash.error ? (
        <ErrorBanner error={dash.error} title="The dashboard could not be loaded" />
      ) : dash.data.assignments.length === 0 ? (
        <EmptyState
          title="No assignments yet"
          action={
            role === 'instructor' ? (
              <Link to={`/courses/${courseId}/assignments/new`} className={linkPrimary}>
                Write the first assignment
              </Link>
            ) : undefined
          }
        >
          {role === 'instructor'
            ? 'Write an assignment and publish it: each student gets their own data, and their hand-ins are counted here.'
            : 'When the instructor publishes an assignment, its hand-ins, flags and reviews are counted here.'}
        </EmptyState>
      ) : (
        <ul className="flex flex-col gap-2" aria-label="Assignments at a glance">
          {dash.data.assignments.map((r) => (
            <li key={r.id} className="grid grid-cols-[minmax(0,1fr)] items-center gap-x-4 gap-y-2 rounded-lg border border-line bg-surface-raised px-3 py-2.5 md:grid-cols-[minmax(0,1.4fr)_minmax(0,2fr)_auto]">
              <div className="min-w-0">
                <Link to={`/courses/${courseId}/assignments/${r.id}`} className="font-medium text-ink hover:text-accent hover:underline">
                  {r.title}
                </Link>
                <p className="text-xs text-muted">
                  {r.status} · due <time dateTime={r.dueAt}>{formatDate(r.dueAt)}</time>
                  {r.released ? ' · scores released' : ''}
                </p>
              </div>
              <dl className="grid grid-cols-4 gap-2 text-center">
                <Count label="handed in" value={r.submitted} of={r.students} />
                <Count label="scored" value={r.scored} of={r.students} />
                <Count label="flagged" value={r.flagged} mark={r.flagged > 0} />
                <Count label="to review" value={r.waitingForReview} mark={r.waitingForReview > 0} />
              </dl>
              <div className="flex flex-col items-start gap-1 md:items-end">
                <Link to={nextLink(courseId, r)} className={r.waitingForReview > 0 ? linkPrimary : linkSecondary}>
                  {r.next}
                  <span className="sr-only"> ({r.title})</span>
                </Link>
              </div>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}

function Count({ label, value, of, mark }: { label: string; value: number; of?: number; mark?: boolean }) {
  return (
    <div className="min-w-0">
      <dt className="text-[0.7rem] text-muted">{label}</dt>
      <dd className={`tabular text-sm ${mark ? 'font-semibold text-flagged' : ''}`}>
        {mark && <span aria-hidden="true">⚑ </span>}
        {value}
        {of !== undefined && <span className="text-muted"> / {of}</span>}
      </dd>
    </div>
  );
}
