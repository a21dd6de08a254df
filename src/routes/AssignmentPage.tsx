import { useCallback, useEffect, useState } from 'react';
import { Link, useLocation, useParams, useSearchParams } from 'react-router-dom';
import { toleranceConfig, type AssignmentConfig } from '../../shared/assignment';
import { Button } from '../components/Button';
import { Card } from '../components/Card';
import { ErrorBanner } from '../components/ErrorBanner';
import { Loading } from '../components/Loading';
import { Markdown } from '../components/Markdown';
import { isApiError } from '../lib/http';
import { useCourse, useMembers } from '../features/courses/api';
import { useAssignment, useAssignmentAction } from '../features/assignments/api';
import { AssignmentStatusTag, DueDate } from '../features/assignments/components/bits';
import { ConfirmDialog } from '../features/assignments/components/inputs';
import { PreviewPanel, VariantsTable } from '../features/assignments/components/PreviewPanel';
import { ReferenceProgressPanel } from '../features/assignments/components/ReferenceProgressPanel';
import { StudentAssignment } from '../features/assignments/components/StudentAssignment';
import { HandInFormats, TaskDescription } from '../features/assignments/components/TaskDescription';
import { methodLabels } from '../features/assignments/labels';
import { ExtensionForm, ReleasePanel } from '../features/submissions/components/AssignmentTools';
import { HandInPanel } from '../features/submissions/components/HandIn';
import { RegradeForm } from '../features/submissions/components/Regrade';
import { StaffSubmissionsPanel } from '../features/submissions/components/StaffSubmissions';
import { PageHeader } from './PageHeader';

const linkButton = 'inline-flex items-center rounded-md border border-line-strong bg-surface-raised px-3 py-1.5 text-sm font-medium text-ink hover:bg-surface-sunken';

export function AssignmentPage() {
  const { courseId, assignmentId } = useParams();
  const cid = Number(courseId);
  const aid = Number(assignmentId);
  const course = useCourse(cid);
  const assignment = useAssignment(cid, aid);
  const action = useAssignmentAction(cid);
  const [ask, setAsk] = useState<null | 'publish' | 'close'>(null);
  const members = useMembers(cid, course.data?.role === 'instructor');
  // The open submission lives in the address (?submission=ID), so the review queue and the gradebook can link to it.
  const [params, setParams] = useSearchParams();
  const selected = Number(params.get('submission')) || null;
  const onSelect = useCallback((id: number | null) => setParams(id ? { submission: String(id) } : {}, { replace: true, preventScrollReset: true }), [setParams]);
  const { hash } = useLocation();
  const loaded = assignment.isSuccess;
  useEffect(() => {
    if (loaded && hash && !selected) document.getElementById(hash.slice(1))?.scrollIntoView({ block: 'start' });
  }, [loaded, hash, selected]);

  if (course.isPending || assignment.isPending) return <Loading what="the assignment" />;
  if (course.error) return <ErrorBanner error={course.error} title="The course could not be loaded" />;
  if (assignment.error) {
    const missing = isApiError(assignment.error, 404) || isApiError(assignment.error, 403);
    return (
      <>
        <PageHeader
          title={missing ? 'Assignment not found' : 'The assignment could not be loaded'}
          eyebrow={
            <Link to={`/courses/${cid}`} className="hover:text-accent hover:underline">
              ← {course.data.title}
            </Link>
          }
        />
        {missing ? <p className="text-sm">It may not be published yet, or it belongs to another course.</p> : <ErrorBanner error={assignment.error} />}
      </>
    );
  }
  const c = course.data;
  const a = assignment.data;
  const staff = c.role !== 'student';
  const eyebrow = (
    <Link to={`/courses/${cid}`} className="hover:text-accent hover:underline">
      ← {c.title}
    </Link>
  );

  if (!staff) {
    return (
      <>
        <PageHeader title={a.title} eyebrow={eyebrow}>
          {methodLabels[a.method]}
        </PageHeader>
        <StudentAssignment courseId={cid} a={a} handIn={a.status !== 'draft' ? <HandInPanel courseId={cid} a={a} /> : undefined} />
      </>
    );
  }

  const config = a.config as AssignmentConfig | undefined;
  const spreadLimit = config?.tolerances?.unstableSpreadLimit ?? toleranceConfig.parse({}).unstableSpreadLimit;
  const instructor = c.role === 'instructor';
  return (
    <>
      <PageHeader title={a.title} eyebrow={eyebrow}>
        <span className="inline-flex flex-wrap items-center gap-x-3 gap-y-1">
          <AssignmentStatusTag status={a.status} />
          <span>version {a.version}</span>
          <span>{methodLabels[a.method]}</span>
          <span className="inline-flex items-baseline gap-1">
            due <DueDate dueAt={a.dueAt} timeZone={a.timeZone} />
          </span>
        </span>
      </PageHeader>
      <div className="mb-5 flex flex-wrap gap-2">
        <Link to={`/courses/${cid}/assignments/${a.id}/edit`} className={linkButton}>
          {instructor ? 'Edit' : 'Read the configuration'}
        </Link>
        {instructor && a.status === 'draft' && <Button onClick={() => setAsk('publish')}>Publish…</Button>}
        {instructor && a.status === 'published' && (
          <Button variant="secondary" onClick={() => setAsk('close')}>
            Close…
          </Button>
        )}
      </div>
      {action.error && <ErrorBanner error={action.error} title={`The assignment was not ${ask === 'close' ? 'closed' : 'published'}`} />}

      <div className="flex flex-col gap-5">
        {a.status !== 'draft' && (
          <div id="submissions" className="scroll-mt-4">
            <Card title="Submissions">
              <StaffSubmissionsPanel courseId={cid} assignmentId={a.id} role={c.role} selected={selected} onSelect={onSelect} />
            </Card>
          </div>
        )}
        {a.status !== 'draft' && instructor && (
          <div className="grid grid-cols-[minmax(0,1fr)] gap-5 lg:grid-cols-3">
            <Card title="Release scores">
              <ReleasePanel courseId={cid} assignmentId={a.id} />
            </Card>
            <Card title="Extension for one student">
              <ExtensionForm
                courseId={cid}
                assignmentId={a.id}
                timeZone={a.timeZone}
                dueAt={a.dueAt}
                students={(members.data ?? []).filter((m) => m.role === 'student').map((m) => ({ id: m.userId, displayName: m.displayName }))}
              />
            </Card>
            <Card title="Score every submission again">
              <p className="mb-2 text-sm text-muted">After a change of tolerances or configuration. Every submission gets a new score row; none is edited.</p>
              <RegradeForm courseId={cid} assignmentId={a.id} />
            </Card>
          </div>
        )}
        {a.status !== 'draft' && (
          <Card title="References">
            <ReferenceProgressPanel courseId={cid} assignmentId={a.id} canRetry={instructor} />
          </Card>
        )}
        <Card title="Preview on the dataset as uploaded">
          <PreviewPanel courseId={cid} assignmentId={a.id} unstableSpreadLimit={spreadLimit} title={a.title} />
        </Card>
        <Card title="Variants">
          <VariantsTable courseId={cid} assignmentId={a.id} />
        </Card>
        <Card title="What students are asked">
          {a.statement.trim() && (
            <div className="mb-4 border-b border-line pb-4">
              <Markdown>{a.statement}</Markdown>
            </div>
          )}
          <TaskDescription task={a.task} dataset={a.dataset} />
          <div className="mt-4">
            <HandInFormats task={a.task} />
          </div>
        </Card>
        {a.versions && a.versions.length > 0 && (
          <Card title="Versions">
            <ol className="flex flex-col gap-1 text-sm">
              {a.versions.map((v) => (
                <li key={v.version} className="tabular">
                  Version {v.version} · {new Date(v.createdAt).toLocaleString('en-GB')} {v.author ? `· ${v.author}` : ''}
                  {v.altersReferences && <span className="text-muted"> · recomputed references</span>}
                </li>
              ))}
            </ol>
          </Card>
        )}
      </div>
      <ConfirmDialog
        open={ask !== null}
        title={ask === 'close' ? 'Close this assignment?' : 'Publish this assignment?'}
        confirmLabel={ask === 'close' ? 'Close' : 'Publish'}
        busy={action.isPending}
        onCancel={() => setAsk(null)}
        onConfirm={() => ask && action.mutate({ id: a.id, action: ask }, { onSettled: () => setAsk(null) })}
      >
        {ask === 'close' ? (
          <p>Students can still read it and download their data, but no longer hand in.</p>
        ) : (
          <p>Every enrolled student gets their data at once, and their references are computed. Later edits make a new version.</p>
        )}
      </ConfirmDialog>
    </>
  );
}
