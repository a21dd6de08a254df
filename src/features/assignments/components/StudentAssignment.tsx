import type { ReactNode } from 'react';
import type { AssignmentDetail } from '../../../../shared/assignment';
import { Card } from '../../../components/Card';
import { Markdown } from '../../../components/Markdown';
import { browserTimeZone, formatInZone } from '../../../lib/timezones';
import { datasetDownloadUrl } from '../api';
import { Countdown } from './bits';
import { HandInFormats, TaskDescription } from './TaskDescription';

const dl =
  'inline-flex items-center gap-1.5 rounded-md border border-line-strong bg-surface-raised px-3 py-1.5 text-sm font-medium text-ink hover:bg-surface-sunken';

/**
 * A student's page: statement, due date in their own zone, the task, formats, their own data,
 * and the hand-in (passed in by the page: it belongs to the submissions feature). Never a reference value before release.
 */
export function StudentAssignment({ courseId, a, handIn }: { courseId: number; a: AssignmentDetail; handIn?: ReactNode }) {
  const own = browserTimeZone();
  const closed = a.status === 'closed';
  return (
    <div className="flex flex-col gap-5">
      <Card>
        <div className="flex flex-col gap-1 text-sm">
          <p className="flex flex-wrap items-baseline justify-between gap-2 text-base font-semibold">
            {closed ? 'Closed' : <Countdown dueAt={a.dueAt} />}
            {handIn && (
              <a href="#hand-in" className="text-sm font-medium text-accent hover:underline">
                Hand in and see your attempts ↓
              </a>
            )}
          </p>
          <p>
            Due <time dateTime={a.dueAt} className="tabular font-medium">{formatInZone(a.dueAt, own)}</time> your time ({own})
          </p>
          {a.timeZone !== own && (
            <p className="text-muted">
              The course keeps time in {a.timeZone}: <span className="tabular">{formatInZone(a.dueAt, a.timeZone)}</span>
            </p>
          )}
          <p className="text-muted">
            {a.attempts} attempt{a.attempts === 1 ? '' : 's'} allowed.{' '}
            {a.latePolicy.cutoffDays > 0
              ? `Late work loses ${a.latePolicy.penaltyPerDay}% of the points per started day, and is not accepted more than ${a.latePolicy.cutoffDays} day${a.latePolicy.cutoffDays === 1 ? '' : 's'} after the due date.`
              : 'Late work is not accepted.'}{' '}
            {a.feedback === 'nothing'
              ? 'You see your score when the staff release it.'
              : a.feedback === 'score'
                ? 'After handing in you see a provisional score.'
                : 'After handing in you see a provisional score and whether each value matched, never the reference values.'}
          </p>
        </div>
      </Card>

      {a.statement.trim() && (
        <Card title="The task">
          <Markdown>{a.statement}</Markdown>
        </Card>
      )}

      <Card title="Your data">
        {a.variant ? (
          <div className="flex flex-col gap-3 text-sm">
            <p>
              This copy is yours alone: other students have their own, slightly different data, so their values will not match yours.{' '}
              {a.dataset.pairs ? 'It comes as two matrices of pairs, X and Y (Y holds the snapshot one step after each column of X).' : ''}
            </p>
            <div className="flex flex-wrap gap-2" aria-label="Downloads">
              <a className={dl} href={datasetDownloadUrl(courseId, a.id, 'npy')} download>
                {a.dataset.pairs ? 'X as .npy' : 'Data as .npy'}
              </a>
              <a className={dl} href={datasetDownloadUrl(courseId, a.id, 'csv')} download>
                {a.dataset.pairs ? 'X as CSV' : 'Data as CSV'}
              </a>
              {a.dataset.pairs && (
                <>
                  <a className={dl} href={datasetDownloadUrl(courseId, a.id, 'npy', { part: 'y' })} download>
                    Y as .npy
                  </a>
                  <a className={dl} href={datasetDownloadUrl(courseId, a.id, 'csv', { part: 'y' })} download>
                    Y as CSV
                  </a>
                </>
              )}
              <a className={dl} href={datasetDownloadUrl(courseId, a.id, 'json')} download>
                Metadata (JSON)
              </a>
            </div>
            <p className="text-xs text-muted">
              float64, {a.dataset.n} states × {a.dataset.snapshots} snapshots, one snapshot per {a.dataset.layout === 'columns' ? 'column' : 'row'}
              {a.variant.checksum && (
                <>
                  {' '}
                  · sha256 <span className="font-mono">{a.variant.checksum.slice(0, 16)}…</span>
                </>
              )}
              . The metadata holds the shape, layout, dt and checksum.
            </p>
          </div>
        ) : (
          <p className="text-sm text-muted">Your copy of the data is being prepared. Reload this page in a minute.</p>
        )}
      </Card>

      <Card title="What to compute">
        <TaskDescription task={a.task} dataset={a.dataset} />
      </Card>

      <Card title="What to hand in">
        <HandInFormats task={a.task} />
      </Card>

      {handIn}
    </div>
  );
}
