import type { ReactNode } from 'react';
import { Link, useParams } from 'react-router-dom';
import type { CourseDetail, Role } from '../../shared/api';
import { ErrorBanner } from '../components/ErrorBanner';
import { Loading } from '../components/Loading';
import { useCourse } from '../features/courses/api';
import { PageHeader } from './PageHeader';

/**
 * A course page for some of its members (gradebook, review queue, audit log): loads the
 * course named in the address, links back to it, and tells anyone else whose page it is.
 */
export function CourseStaffPage({
  title,
  allowed,
  deniedNote,
  intro,
  children,
}: {
  title: string;
  /** Whether a member with this role in the course sees the page. */
  allowed: (role: Role) => boolean;
  /** Shown under the title to the members who do not. */
  deniedNote: ReactNode;
  /** Line under the title for those who do. */
  intro: (course: CourseDetail) => ReactNode;
  children: (courseId: number) => ReactNode;
}) {
  const id = Number(useParams().courseId);
  const course = useCourse(id);
  if (course.isPending) return <Loading what="the course" />;
  if (course.error) return <ErrorBanner error={course.error} title="The course could not be loaded" />;
  const eyebrow = (
    <Link to={`/courses/${id}`} className="hover:text-accent hover:underline">
      ← {course.data.title}
    </Link>
  );
  if (!allowed(course.data.role))
    return (
      <>
        <PageHeader title={title} eyebrow={eyebrow} />
        <p className="text-sm">{deniedNote}</p>
      </>
    );
  return (
    <>
      <PageHeader title={title} eyebrow={eyebrow}>
        {intro(course.data)}
      </PageHeader>
      {children(id)}
    </>
  );
}
