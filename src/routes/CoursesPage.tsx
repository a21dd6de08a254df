import { Card } from '../components/Card';
import { EmptyState } from '../components/EmptyState';
import { ErrorBanner } from '../components/ErrorBanner';
import { Loading } from '../components/Loading';
import { useCourses } from '../features/courses/api';
import { CourseList } from '../features/courses/components/CourseList';
import { CreateCourseForm } from '../features/courses/components/CreateCourseForm';
import { JoinCourseForm } from '../features/courses/components/JoinCourseForm';
import { useCurrentUser } from './Layout';
import { PageHeader } from './PageHeader';

export function CoursesPage() {
  const user = useCurrentUser();
  const courses = useCourses();

  return (
    <>
      <PageHeader title="Your courses" />
      <div className="grid grid-cols-[minmax(0,1fr)] gap-6 lg:grid-cols-[minmax(0,1fr)_20rem]">
        <section aria-label="Course list">
          {courses.isPending ? (
            <Loading what="your courses" />
          ) : courses.error ? (
            <ErrorBanner error={courses.error} title="Your courses could not be loaded" />
          ) : courses.data.length === 0 ? (
            <EmptyState title="You are not in any course yet">
              {user.canTeach ? (
                <p>Create your first course with the form beside this list, or join one with the code a colleague gave you.</p>
              ) : (
                <p>Ask your instructor for the course’s join code and enter it under “Join a course”.</p>
              )}
            </EmptyState>
          ) : (
            <CourseList courses={courses.data} />
          )}
        </section>
        <div className="flex flex-col gap-5">
          <Card title="Join a course" headingLevel={2}>
            <JoinCourseForm />
          </Card>
          {user.canTeach && (
            <Card title="Create a course" headingLevel={2}>
              <p className="mb-3 text-sm text-muted">You become its instructor and get a join code to hand out.</p>
              <CreateCourseForm />
            </Card>
          )}
        </div>
      </div>
    </>
  );
}
