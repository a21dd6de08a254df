import { AuditLog } from '../features/accounts/components/AuditLog';
import { CourseStaffPage } from './CourseStaffPage';

export function AuditPage() {
  return (
    <CourseStaffPage
      title="Audit log"
      allowed={(role) => role === 'instructor'}
      deniedNote="Only the course's instructors see its audit log."
      intro={(course) => <>Who changed what in {course.code}, and when, with the value before and after. Entries are never edited or removed.</>}
    >
      {(id) => <AuditLog courseId={id} />}
    </CourseStaffPage>
  );
}
