import { Link } from 'react-router-dom';
import type { CourseSummary } from '../../../../shared/api';
import { RoleTag } from '../../../components/RoleTag';

/** The caller's courses, one row each, with their role in it. */
export function CourseList({ courses }: { courses: CourseSummary[] }) {
  return (
    <ul className="divide-y divide-line overflow-hidden rounded-lg border border-line bg-surface-raised" aria-label="Your courses">
      {courses.map((c) => (
        <li key={c.id}>
          <Link
            to={`/courses/${c.id}`}
            className="group flex flex-wrap items-center gap-x-4 gap-y-1 px-4 py-3 hover:bg-accent-soft/50 focus-visible:bg-accent-soft/50"
          >
            <span className="min-w-0 flex-1">
              <span className="block font-semibold text-ink group-hover:text-accent-strong group-hover:underline">{c.title}</span>
              <span className="block text-sm text-muted">
                <span className="font-mono text-[0.8125rem]">{c.code}</span> · {c.term}
              </span>
            </span>
            <span className="tabular text-sm text-muted">
              {c.memberCount} {c.memberCount === 1 ? 'member' : 'members'}
            </span>
            <span className="w-36 text-right">
              <span className="sr-only">Your role: </span>
              <RoleTag role={c.role} />
            </span>
          </Link>
        </li>
      ))}
    </ul>
  );
}
