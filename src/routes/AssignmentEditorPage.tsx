import { Link, useNavigate, useParams } from 'react-router-dom';
import { Card } from '../components/Card';
import { ErrorBanner } from '../components/ErrorBanner';
import { Loading } from '../components/Loading';
import { isApiError } from '../lib/http';
import { useCourse } from '../features/courses/api';
import { useAssignment } from '../features/assignments/api';
import { AssignmentForm, initialFromDetail, newAssignmentDefaults } from '../features/assignments/components/AssignmentForm';
import { AssignmentStatusTag } from '../features/assignments/components/bits';
import { ReferenceProgressPanel } from '../features/assignments/components/ReferenceProgressPanel';
import { PageHeader } from './PageHeader';
import { useMemo } from 'react';

/** New assignment (no :assignmentId) or the authoring form of a saved one. Instructors edit; teaching assistants read. */
export function AssignmentEditorPage() {
  const { courseId, assignmentId } = useParams();
  const cid = Number(courseId);
  const aid = assignmentId === undefined ? undefined : Number(assignmentId);
  const course = useCourse(cid);
  const assignment = useAssignment(cid, aid ?? 0);
  const navigate = useNavigate();
  const fresh = useMemo(() => newAssignmentDefaults(), []);

  if (course.isPending || (aid !== undefined && assignment.isPending)) return <Loading what="the assignment" />;
  if (course.error) return <ErrorBanner error={course.error} title="The course could not be loaded" />;
  if (aid !== undefined && assignment.error)
    return <ErrorBanner error={assignment.error} title={isApiError(assignment.error, 404) ? 'No such assignment in this course' : 'The assignment could not be loaded'} />;
  const c = course.data;
  const a = aid !== undefined ? assignment.data : undefined;
  const back = (
    <Link to={a ? `/courses/${cid}/assignments/${a.id}` : `/courses/${cid}`} className="hover:text-accent hover:underline">
      ← {a ? a.title : c.title}
    </Link>
  );
  if (c.role === 'student' || (c.role === 'teaching_assistant' && !a)) {
    return (
      <>
        <PageHeader title="Only the instructor writes assignments" eyebrow={back} />
        <p className="text-sm">Ask the course’s instructor to create or change one.</p>
      </>
    );
  }
  const readOnly = c.role !== 'instructor';
  return (
    <>
      <PageHeader title={a ? (readOnly ? a.title : `Edit: ${a.title}`) : 'New assignment'} eyebrow={back}>
        {a ? (
          <span className="inline-flex flex-wrap items-center gap-2">
            <AssignmentStatusTag status={a.status} /> version {a.version}
            {readOnly && <span>· you can read this, only the instructor can change it</span>}
            {a.status !== 'draft' && !readOnly && <span>· saving makes a new version; a change to the data or method recomputes the references</span>}
          </span>
        ) : (
          <span>Saved as a draft until you publish it. Students see nothing of a draft.</span>
        )}
      </PageHeader>
      {a && a.status !== 'draft' && (
        <Card className="mb-5" title="References">
          <ReferenceProgressPanel courseId={cid} assignmentId={a.id} canRetry={!readOnly} />
        </Card>
      )}
      <AssignmentForm
        key={a ? `${a.id}-${a.version}` : 'new'}
        courseId={cid}
        assignment={a}
        initial={a ? initialFromDetail(a) : fresh}
        readOnly={readOnly}
        onCreated={(n) => navigate(`/courses/${cid}/assignments/${n.id}/edit`, { replace: true })}
        onPublished={(n) => navigate(`/courses/${cid}/assignments/${n.id}`)}
      />
    </>
  );
}
