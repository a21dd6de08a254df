import { Link } from 'react-router-dom';
import { methodLabels } from '../labels';
import { EmptyState } from '../../../components/EmptyState';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { Loading } from '../../../components/Loading';
import { Table, Td, Th } from '../../../components/Table';
import type { AssignmentSummary } from '../../../../shared/assignment';
import { formatDateTime } from '../../../lib/format';
import { useAssignments } from '../api';
import { AssignmentStatusTag, DueDate, ProgressBar } from './bits';

const linkButton =
  'inline-flex items-center justify-center gap-1.5 rounded-md border border-accent bg-accent px-3 py-1.5 text-sm font-medium whitespace-nowrap text-white hover:border-accent-strong hover:bg-accent-strong';

/** A student's own standing: what she handed in, its points as the feedback policy allows, attempts left. */
function MyStanding({ a }: { a: AssignmentSummary }) {
  const m = a.mine!;
  const past = Date.parse(m.dueAt) < Date.now();
  const left = `${m.attemptsLeft} attempt${m.attemptsLeft === 1 ? '' : 's'} left`;
  const l = m.latest;
  let main: React.ReactNode;
  const lateOpen = past && Date.parse(m.cutoffAt) > Date.now() && a.status !== 'closed';
  if (!l)
    main =
      a.status === 'closed' ? (
        <span className="text-muted">Not handed in · closed</span>
      ) : past ? (
        <span>
          <span className="font-medium text-danger">Not handed in</span>
          {lateOpen && (
            <span className="block text-xs text-muted">
              late hand-in accepted until <time dateTime={m.cutoffAt}>{formatDateTime(m.cutoffAt)}</time>
            </span>
          )}
        </span>
      ) : (
        <span>Not handed in yet</span>
      );
  else if (l.status === 'scored')
    main =
      l.points !== null ? (
        <span>
          <span className="tabular font-medium">{formatPoints(l.points)}</span>
          <span className="text-muted"> / {formatPoints(l.maxPoints ?? 0)}</span> {m.released ? 'released' : 'provisional'}
        </span>
      ) : (
        <span>Handed in · scores shown at release</span>
      );
  else if (l.status === 'failed') main = <span>Handed in · could not be scored yet; the staff look at it</span>;
  else main = <span>Handed in · being scored</span>;
  return (
    <div className="text-[0.8125rem]">
      {main}
      <span className="block text-xs text-muted">
        {l ? `attempt ${l.attempt}${l.late ? ', late' : ''} · ` : ''}
        {a.status === 'closed' || (past && !lateOpen) ? 'closed for hand-ins' : left}
      </span>
    </div>
  );
}

const formatPoints = (x: number) => String(Math.round(x * 100) / 100);

/** The course's assignments: title, state (staff) or the student's own standing, due date, and for staff how far the references are. */
export function CourseAssignments({ courseId, role }: { courseId: number; role: 'instructor' | 'teaching_assistant' | 'student' }) {
  const list = useAssignments(courseId);
  const staff = role !== 'student';
  const newLink =
    role === 'instructor' ? (
      <Link to={`/courses/${courseId}/assignments/new`} className={linkButton}>
        New assignment
      </Link>
    ) : null;

  return (
    <section aria-labelledby="assignments-heading" className="min-w-0">
      <div className="mb-3 flex items-center justify-between gap-3">
        <h2 id="assignments-heading" className="text-base font-semibold">
          Assignments
        </h2>
        {list.data && list.data.length > 0 && newLink}
      </div>
      {list.isPending ? (
        <Loading what="assignments" />
      ) : list.error ? (
        <ErrorBanner error={list.error} title="The assignments could not be loaded" />
      ) : list.data.length === 0 ? (
        <EmptyState
          title={staff ? 'No assignments yet' : 'No assignments have been published yet'}
          action={newLink}
        >
          {role === 'instructor' ? (
            <p>
              Create one: write the task, choose a dataset (upload your own or generate one from a scenario), pick the method and how it
              is graded. It stays a draft until you publish it; then every student gets a variant and its reference is computed.
            </p>
          ) : staff ? (
            <p>The instructor has not created one. Drafts appear here as soon as they are saved, and you can read them.</p>
          ) : (
            <p>
              When your instructor publishes one, it appears here with its due date and your own copy of the dataset to download. You
              compute the spectrum in the tool you already use; scores stay provisional until the course staff release them.
            </p>
          )}
        </EmptyState>
      ) : (
        <Table caption="Assignments" captionHidden>
          <thead>
            <tr>
              <Th>Title</Th>
              {staff ? <Th>State</Th> : <Th>Your work</Th>}
              <Th>Due</Th>
              {staff && <Th>References</Th>}
            </tr>
          </thead>
          <tbody>
            {list.data.map((a) => (
              <tr key={a.id} className="hover:bg-accent-soft/30">
                <Td>
                  <Link to={`/courses/${courseId}/assignments/${a.id}`} className="font-medium text-ink hover:text-accent-strong hover:underline">
                    {a.title}
                  </Link>
                  <span className="block text-xs text-muted">
                    {methodLabels[a.method]}
                    {staff && a.version > 1 ? ` · version ${a.version}` : ''}
                  </span>
                </Td>
                <Td>{staff || !a.mine ? <AssignmentStatusTag status={a.status} /> : <MyStanding a={a} />}</Td>
                <Td className="text-[0.8125rem]">
                  <DueDate dueAt={a.mine?.dueAt ?? a.dueAt} timeZone={a.timeZone} compact />
                  {a.mine && a.mine.dueAt !== a.dueAt && <span className="block text-xs text-muted">extended for you</span>}
                </Td>
                {staff && (
                  <Td className="w-40 text-[0.8125rem]">
                    {a.progress && a.progress.total > 0 ? (
                      <div className="flex flex-col gap-1">
                        <span className="tabular">
                          {a.progress.ready} of {a.progress.total} ready
                          {a.progress.failed > 0 && <span className="font-medium text-danger"> · {a.progress.failed} failed</span>}
                        </span>
                        <ProgressBar ready={a.progress.ready} failed={a.progress.failed} total={a.progress.total} label={`References of ${a.title}`} />
                      </div>
                    ) : (
                      <span className="text-muted">{a.status === 'draft' ? 'at publishing' : '—'}</span>
                    )}
                  </Td>
                )}
              </tr>
            ))}
          </tbody>
        </Table>
      )}
    </section>
  );
}
