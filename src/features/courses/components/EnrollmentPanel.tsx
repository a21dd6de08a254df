import type { ReactNode } from 'react';
import { roleLabels, type Enrollment } from '../../../../shared/api';
import { Card } from '../../../components/Card';
import { EmptyState } from '../../../components/EmptyState';
import { formatDate } from '../../../lib/format';

/** A student's own view of a course: their enrollment and the course's assignments (passed in by the page). */
export function EnrollmentPanel({ enrollment, assignments }: { enrollment: Enrollment; assignments?: ReactNode }) {
  return (
    <div className="flex max-w-3xl flex-col gap-5">
      <Card title="Your enrollment">
        <dl className="grid grid-cols-[max-content_1fr] gap-x-6 gap-y-1.5 text-sm">
          <dt className="text-muted">Role</dt>
          <dd className="font-medium">{roleLabels[enrollment.role]}</dd>
          <dt className="text-muted">Enrolled since</dt>
          <dd className="tabular">
            <time dateTime={enrollment.joinedAt}>{formatDate(enrollment.joinedAt)}</time>
          </dd>
        </dl>
      </Card>
      {assignments ?? (
        <section aria-labelledby="assignments-heading">
          <h2 id="assignments-heading" className="mb-2 text-base font-semibold">
            Assignments
          </h2>
          <EmptyState title="No assignments have been published yet">
            <p>
              When your instructor publishes one, it appears here with its due date and your own copy of the dataset to download.
              You compute the spectrum in the tool you already use and upload your eigenvalues here; your score stays provisional
              until the course staff release it.
            </p>
          </EmptyState>
        </section>
      )}
    </div>
  );
}
