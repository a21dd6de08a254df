import { Link, useParams } from 'react-router-dom';
import { ErrorBanner } from '../components/ErrorBanner';
import { Loading } from '../components/Loading';
import { useCourse } from '../features/courses/api';
import { ReviewQueue } from '../features/submissions/components/ReviewQueue';
import { PageHeader } from './PageHeader';

export function ReviewQueuePage() {
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
        <PageHeader title="Review queue" eyebrow={eyebrow} />
        <p className="text-sm">The review queue is for the course staff. Your own attempts and any answers to them are on each assignment&apos;s page.</p>
      </>
    );
  return (
    <>
      <PageHeader title="Review queue" eyebrow={eyebrow}>
        Flagged submissions and students&apos; requests for a second look. Each decision adds a score row with your name and comment; no score is ever edited.
      </PageHeader>
      <ReviewQueue courseId={id} />
    </>
  );
}
