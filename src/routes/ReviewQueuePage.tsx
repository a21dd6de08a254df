import { ReviewQueue } from '../features/submissions/components/ReviewQueue';
import { CourseStaffPage } from './CourseStaffPage';

export function ReviewQueuePage() {
  return (
    <CourseStaffPage
      title="Review queue"
      allowed={(role) => role !== 'student'}
      deniedNote="The review queue is for the course staff. Your own attempts and any answers to them are on each assignment's page."
      intro={() => "Flagged submissions and students' requests for a second look. Each decision adds a score row with your name and comment; no score is ever edited."}
    >
      {(id) => <ReviewQueue courseId={id} />}
    </CourseStaffPage>
  );
}
