import { Link, useParams } from 'react-router-dom';
import { Card } from '../components/Card';
import { ErrorBanner } from '../components/ErrorBanner';
import { Loading } from '../components/Loading';
import { RoleTag } from '../components/RoleTag';
import { isApiError } from '../lib/http';
import { useCourse, useEnrollment, useMembers } from '../features/courses/api';
import { EnrollmentPanel } from '../features/courses/components/EnrollmentPanel';
import { JoinCodePanel } from '../features/courses/components/JoinCodePanel';
import { MembersTable } from '../features/courses/components/MembersTable';
import { CourseAssignments } from '../features/assignments/components/CourseAssignments';
import { CourseDashboard } from '../features/submissions/components/CourseDashboard';
import { InvitationsPanel } from '../features/accounts/components/InvitationsPanel';
import { OutboxPanel } from '../features/accounts/components/OutboxPanel';
import { useCurrentUser } from './Layout';
import { PageHeader } from './PageHeader';

export function CoursePage() {
  const { courseId } = useParams();
  const id = Number(courseId);
  const user = useCurrentUser();
  const course = useCourse(id);
  const role = course.data?.role;
  const isStaff = role === 'instructor' || role === 'teaching_assistant';
  const members = useMembers(id, isStaff);
  const enrollment = useEnrollment(id, role === 'student');

  if (!Number.isInteger(id) || id <= 0) return <NotACourse />;
  if (course.isPending) return <Loading what="the course" />;
  if (course.error) {
    if (isApiError(course.error, 404) || isApiError(course.error, 403)) return <NotACourse />;
    return <ErrorBanner error={course.error} title="The course could not be loaded" />;
  }
  const c = course.data;

  return (
    <>
      <PageHeader
        title={c.title}
        eyebrow={
          <Link to="/" className="hover:text-accent hover:underline">
            ← Your courses
          </Link>
        }
      >
        <span className="inline-flex flex-wrap items-center gap-x-3 gap-y-1">
          <span className="font-mono text-[0.8125rem]">{c.code}</span>
          <span>{c.term}</span>
          <span className="tabular">
            {c.memberCount} {c.memberCount === 1 ? 'member' : 'members'}
          </span>
          <span>
            You are <RoleTag role={c.role} />
          </span>
        </span>
      </PageHeader>

      {isStaff ? (
        <div className="grid grid-cols-[minmax(0,1fr)] gap-6 lg:grid-cols-[minmax(0,1fr)_19rem]">
          <div className="flex min-w-0 flex-col gap-8">
            <CourseDashboard courseId={c.id} role={c.role} />
            <CourseAssignments courseId={c.id} role={c.role} />
            <section aria-labelledby="members-heading" className="min-w-0">
              <h2 id="members-heading" className="mb-3 text-base font-semibold">
                Members
              </h2>
              {members.isPending ? (
                <Loading what="members" />
              ) : members.error ? (
                <ErrorBanner error={members.error} title="The member list could not be loaded" />
              ) : (
                <MembersTable
                  courseId={c.id}
                  members={members.data}
                  selfId={user.id}
                  canGrantTeaching={c.role === 'instructor' && user.canTeach}
                  canChangeRoles={c.role === 'instructor'}
                />
              )}
            </section>
          </div>
          <aside className="flex flex-col gap-5" aria-label="Course settings">
            {c.role === 'instructor' ? (
              <>
                <JoinCodePanel course={c} />
                <InvitationsPanel courseId={c.id} />
                <OutboxPanel courseId={c.id} />
                <Card title="Audit log">
                  <p className="text-sm text-muted">Every change to roles, the join code and invitations: who, when, before and after.</p>
                  <Link to={`/courses/${c.id}/audit`} className="mt-2 inline-block text-sm font-medium text-accent hover:underline">
                    Open the audit log →
                  </Link>
                </Card>
              </>
            ) : (
              <Card title="Join code">
                <p className="text-sm text-muted">The instructor hands out the join code and can change it. Ask them if a student cannot get in.</p>
              </Card>
            )}
          </aside>
        </div>
      ) : enrollment.isPending ? (
        <Loading what="your enrollment" />
      ) : enrollment.error ? (
        <ErrorBanner error={enrollment.error} title="Your enrollment could not be loaded" />
      ) : (
        <EnrollmentPanel enrollment={enrollment.data} assignments={<CourseAssignments courseId={c.id} role={c.role} />} />
      )}
    </>
  );
}

function NotACourse() {
  return (
    <div className="max-w-prose">
      <PageHeader title="Course not found" />
      <p className="text-sm">
        Either this course does not exist or you are not a member of it. If you were given a join code, enter it on{' '}
        <Link to="/" className="text-accent underline">
          your course list
        </Link>
        .
      </p>
    </div>
  );
}
