import { useEffect, useState } from 'react';
import { assignmentStatusLabels, type AssignmentStatus } from '../../../../shared/assignment';
import { browserTimeZone, describeDuration, formatInZone } from '../../../lib/timezones';

const statusStyles: Record<AssignmentStatus, { cls: string; mark: string }> = {
  draft: { cls: 'border-line-strong bg-surface-sunken text-ink', mark: '○' },
  published: { cls: 'border-ok/40 bg-ok-soft text-ok', mark: '●' },
  closed: { cls: 'border-line-strong bg-surface-raised text-muted', mark: '■' },
};

/** The state of an assignment in a word (with a mark, so it never rests on colour). */
export function AssignmentStatusTag({ status }: { status: AssignmentStatus }) {
  const s = statusStyles[status];
  return (
    <span className={`inline-flex items-center gap-1 rounded border px-1.5 py-px text-xs font-medium whitespace-nowrap ${s.cls}`}>
      <span aria-hidden="true" className="text-[0.6rem]">
        {s.mark}
      </span>
      {assignmentStatusLabels[status]}
    </span>
  );
}

/** The due date in the assignment's (course's) zone, and in the reader's own zone when that differs. */
export function DueDate({ dueAt, timeZone, compact = false }: { dueAt: string; timeZone: string; compact?: boolean }) {
  const own = browserTimeZone();
  const same = formatInZone(dueAt, own) === formatInZone(dueAt, timeZone);
  return (
    <span className="inline-flex flex-col">
      <time dateTime={dueAt} className="tabular">
        {formatInZone(dueAt, timeZone)}
        {!compact && <span className="text-muted"> ({timeZone})</span>}
      </time>
      {!same && <span className="tabular text-xs text-muted">your time: {formatInZone(dueAt, own)}</span>}
    </span>
  );
}

/** "Due in 3 days 4 hours" / "Was due 2 hours ago" (a heading), refreshed every 30 seconds. */
export function Countdown({ dueAt }: { dueAt: string }) {
  const [now, setNow] = useState(() => Date.now());
  useEffect(() => {
    const t = window.setInterval(() => setNow(Date.now()), 30_000);
    return () => window.clearInterval(t);
  }, []);
  const left = Date.parse(dueAt) - now;
  if (Number.isNaN(left)) return null;
  return left >= 0 ? <span>Due in {describeDuration(left)}</span> : <span>Was due {describeDuration(left)} ago</span>;
}

export { ProgressBar } from '../../../components/ProgressBar';
