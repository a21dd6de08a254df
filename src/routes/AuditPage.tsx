import { Link, useParams } from 'react-router-dom';
import { ErrorBanner } from '../components/ErrorBanner';
import { Loading } from '../components/Loading';
import { AuditLog } from '../features/accounts/components/AuditLog';
import { useCourse } from '../features/courses/api';
import { PageHeader } from './PageHeader';

export function AuditPage() {
  const id = Number(useParams().courseId);
  const course = useCourse(id);
  if (course.isPending) return <Loading what="the course" />;
  if (course.error) return <ErrorBanner error={course.error} title="The course could not be loaded" />;
  const back = (
    <Link to={`/courses/${id}`} className="hover:text-accent hover:underline">
      ← {course.data.title}
    </Link>
  );
  if (course.data.role !== 'instructor') {
    return (
      <>
        <PageHeader title="Audit log" eyebrow={back} />
        <p className="text-sm">Only the course's instructors see its audit log.</p>
      </>
    );
  }
  return (
    <>
      <PageHeader title="Audit log" eyebrow={back}>
        Who changed what in {course.data.code}, and when, with the value before and after. Entries are never edited or removed.
      </PageHeader>
      <AuditLog courseId={id} />
    </>
  );
}
