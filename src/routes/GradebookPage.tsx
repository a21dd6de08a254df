import { Gradebook } from '../features/submissions/components/Gradebook';
import { CourseStaffPage } from './CourseStaffPage';

export function GradebookPage() {
  return (
    <CourseStaffPage
      title="Gradebook"
      allowed={(role) => role !== 'student'}
      deniedNote="The gradebook is for the course staff. Your own scores are on each assignment's page."
      intro={(course) => (
        <>
          {course.code} · {course.term}
        </>
      )}
    >
      {(id) => <Gradebook courseId={id} />}
    </CourseStaffPage>
  );
}
