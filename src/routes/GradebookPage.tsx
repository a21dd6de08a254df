import { Link, useParams } from 'react-router-dom';
import { ErrorBanner } from '../components/ErrorBanner';
import { Loading } from '../components/Loading';
import { useCourse } from '../features/courses/api';
import { Gradebook } from '../features/submissions/components/Gradebook';
import { PageHeader } from './PageHeader';

export function GradebookPage() {
  const { courseId } = useParams();
  const id = Number(courseId);
  const course = useCourse(id);
  if (course.isPending) return <Loading what="the course" />;
  if (course.error) return <ErrorBanner error={course.error} title="The course could not be loaded" />;
  const eyebrow = (
    <Link to={`/courses/${id}`} className="hover:text-accent hover:underline">
      ← {course.data.title}
    </Link>
  );
  if (course.data.role === 'student')
    return (
      <>
        <PageHeader title="Gradebook" eyebrow={eyebrow} />
        <p className="text-sm">The gradebook is for the course staff. Your own scores are on each assignment&apos;s page.</p>
      </>
    );
  return (
    <>
      <PageHeader title="Gradebook" eyebrow={eyebrow}>
        {course.data.code} · {course.data.term}
      </PageHeader>
      <Gradebook courseId={id} />
    </>
  );
}
