import { scaleBand, scaleLinear } from 'd3-scale';
import { useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import type { GradebookResponse } from '../../../../shared/submission';
import { Button } from '../../../components/Button';
import { Card } from '../../../components/Card';
import { DataTable, dataColumnHelper } from '../../../components/DataTable';
import { EmptyState } from '../../../components/EmptyState';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { InputField, SelectField } from '../../../components/inputs';
import { Loading } from '../../../components/Loading';
import { tickLabel } from '../../../components/plots/axes';
import { Table, Td, Th } from '../../../components/Table';
import { formatDateTime } from '../../../lib/format';
import { gradebookCsvUrl, useGradebook, useStudentHistory } from '../api';
import { FlagTag, formatPoints, LateTag, SubmissionStatusTag } from './bits';

type Student = GradebookResponse['students'][number];
type Cell = Student['cells'][number];
type Assignment = GradebookResponse['assignments'][number];

const col = dataColumnHelper<Student>();

function marks(s: Student): string {
  const late = s.cells.filter((c) => c.late).length;
  const flagged = s.cells.filter((c) => c.flagged).length;
  // Not handed in counts as missing only once the student's due date has passed.
  const none = s.cells.filter((c) => c.status === 'none' && !c.open).length;
  return [late ? `${late} late` : '', flagged ? `${flagged} flagged` : '', none ? `${none} missing` : ''].filter(Boolean).join(', ');
}

/** Staff: students × assignments with points and markers, sortable and filterable; per-student history; per-assignment statistics; CSV. */
export function Gradebook({ courseId }: { courseId: number }) {
  const gb = useGradebook(courseId);
  const [search, setSearch] = useState('');
  const [only, setOnly] = useState('');
  const [student, setStudent] = useState<number | null>(null);

  const columns = useMemo(() => {
    const a = gb.data?.assignments ?? [];
    return col.columns([
      col.accessor((s) => `${s.displayName} ${s.email}`, {
        id: 'student',
        header: 'Student',
        sortFn: 'text',
        cell: (c) => (
          <button type="button" className="text-left font-medium text-accent hover:underline" onClick={() => setStudent(c.row.original.id)} aria-label={`History of ${c.row.original.displayName}`}>
            {c.row.original.displayName}
            <span className="block text-xs font-normal text-muted">{c.row.original.email}</span>
          </button>
        ),
      }),
      ...a.map((asg, i) =>
        col.accessor((s) => s.cells[i]?.points ?? undefined, {
          id: `a${asg.id}`,
          header: asg.title,
          meta: { numeric: true, label: asg.title },
          sortUndefined: 'last',
          enableGlobalFilter: false,
          cell: (c) => <GradeCell cell={c.row.original.cells[i]} max={asg.maxPoints} />,
        }),
      ),
      col.accessor((s) => s.cells.reduce((n, c) => n + (c.points ?? 0), 0), {
        id: 'total',
        header: 'Total',
        meta: { numeric: true, label: 'Total' },
        enableGlobalFilter: false,
        cell: (c) => (
          <span className="font-semibold whitespace-nowrap">
            {formatPoints(c.getValue())}
            <span className="font-normal text-muted"> / {formatPoints(a.reduce((n, x) => n + x.maxPoints, 0))}</span>
          </span>
        ),
      }),
      col.accessor(marks, { id: 'marks', header: 'Marks', enableSorting: false, enableGlobalFilter: false, filterFn: 'includesString', cell: (c) => <span className="text-xs text-muted">{c.getValue()}</span> }),
    ]);
  }, [gb.data]);
  const columnFilters = useMemo(() => (only ? [{ id: 'marks', value: only }] : []), [only]);

  if (gb.isPending) return <Loading what="the gradebook" />;
  if (gb.error) return <ErrorBanner error={gb.error} title="The gradebook could not be loaded" />;
  const { assignments, students, stats } = gb.data;
  if (assignments.length === 0)
    return (
      <EmptyState title="No assignments to grade yet">
        Publish an assignment from the course page; once students hand in, their points fill this table.
      </EmptyState>
    );
  if (students.length === 0) return <EmptyState title="No students enrolled yet">Hand out the course&apos;s join code or invite students from the course page.</EmptyState>;
  const chosen = students.find((s) => s.id === student) ?? null;

  return (
    <div className="flex flex-col gap-6">
      <div className="flex flex-wrap items-end gap-3" role="search" aria-label="Filter the gradebook">
        <InputField label="Student" type="search" placeholder="Name or e-mail" value={search} onChange={(e) => setSearch(e.target.value)} />
        <SelectField
          label="Show"
          value={only}
          onChange={(e) => setOnly(e.target.value)}
          options={[
            ['', 'Every student'],
            ['flagged', 'With a flagged submission'],
            ['late', 'With a late submission'],
            ['missing', 'With an assignment not handed in'],
          ]}
        />
        <a href={gradebookCsvUrl(courseId)} download className="mb-px inline-flex items-center rounded-md border border-line-strong bg-surface-raised px-3 py-1.5 text-sm font-medium text-ink hover:bg-surface-sunken">
          Download as CSV
        </a>
      </div>
      <DataTable caption="Gradebook: students by assignments" columns={columns} data={students} globalFilter={search} columnFilters={columnFilters} rowId={(s) => String(s.id)} selectedId={student === null ? null : String(student)} initialSorting={[{ id: 'student', desc: false }]} />
      <p className="-mt-4 text-xs text-muted">
        Points after any late penalty; “—” not handed in by the due date; “open” not handed in yet, due date still ahead. Scores of assignments not yet released are provisional. Click a student for their submissions across assignments.
      </p>
      {chosen && <StudentHistory courseId={courseId} assignments={assignments} student={chosen} onClose={() => setStudent(null)} />}
      <section aria-labelledby="stats-heading" className="flex flex-col gap-3">
        <h2 id="stats-heading" className="text-base font-semibold">
          Per assignment
        </h2>
        <div className="grid grid-cols-[minmax(0,1fr)] gap-4 md:grid-cols-2">
          {assignments.map((a) => {
            const st = stats.find((x) => x.assignmentId === a.id);
            return (
              <Card key={a.id} title={a.title} headingLevel={3} aside={<span className="text-xs text-muted">{a.released ? 'released' : 'provisional'}</span>}>
                {st ? <Stats a={a} st={st} students={students.length} /> : <p className="text-sm text-muted">No statistics yet.</p>}
              </Card>
            );
          })}
        </div>
      </section>
    </div>
  );
}

function GradeCell({ cell, max }: { cell: Cell | undefined; max: number }) {
  if (cell?.status === 'none' && cell.open) return <span className="text-xs text-muted">open</span>;
  if (!cell || cell.status === 'none') return <span className="text-muted">—</span>;
  return (
    <span className="inline-flex flex-col items-end gap-0.5">
      <span className="whitespace-nowrap">
        {cell.status === 'waiting' ? <span className="text-xs text-muted">being scored</span> : cell.status === 'failed' ? <span className="text-xs text-danger">not scored</span> : formatPoints(cell.points)}
        {cell.status === 'scored' && <span className="text-xs text-muted"> / {formatPoints(cell.maxPoints ?? max)}</span>}
      </span>
      {(cell.late || cell.flagged) && (
        <span className="flex gap-1">
          {cell.late && <LateTag />}
          {cell.flagged && <FlagTag />}
        </span>
      )}
    </span>
  );
}

function StudentHistory({ courseId, assignments, student, onClose }: { courseId: number; assignments: Assignment[]; student: Student; onClose: () => void }) {
  const results = useStudentHistory(
    courseId,
    assignments.map((a) => a.id),
    student.id,
  );
  return (
    <section aria-labelledby="history-heading" className="flex flex-col gap-3 rounded-lg border-2 border-accent/40 bg-surface-raised p-4" data-testid="student-history">
      <div className="flex flex-wrap items-baseline gap-3">
        <h2 id="history-heading" className="text-base font-semibold">
          {student.displayName}: every submission
        </h2>
        <span className="text-xs text-muted">{student.email}</span>
        <Button variant="subtle" size="sm" className="ml-auto" onClick={onClose}>
          Close
        </Button>
      </div>
      {assignments.map((a, i) => {
        const r = results[i];
        return (
          <div key={a.id} className="flex flex-col gap-1">
            <h3 className="text-sm font-semibold">{a.title}</h3>
            {r.isPending ? (
              <Loading what="submissions" />
            ) : r.error ? (
              <ErrorBanner error={r.error} />
            ) : r.data.length === 0 ? (
              <p className="text-sm text-muted">Nothing handed in.</p>
            ) : (
              <Table caption={`${student.displayName}'s attempts on ${a.title}`} captionHidden>
                <thead>
                  <tr>
                    <Th numeric>Attempt</Th>
                    <Th>Received</Th>
                    <Th numeric>Points</Th>
                    <Th>Marks</Th>
                    <Th>State</Th>
                    <Th>
                      <span className="sr-only">Open</span>
                    </Th>
                  </tr>
                </thead>
                <tbody>
                  {[...r.data]
                    .sort((x, y) => x.attempt - y.attempt)
                    .map((s) => (
                      <tr key={s.id}>
                        <Td numeric>{s.attempt}</Td>
                        <Td className="tabular text-xs whitespace-nowrap">{formatDateTime(s.receivedAt)}</Td>
                        <Td numeric className="whitespace-nowrap">
                          {formatPoints(s.points)}
                          {s.maxPoints !== null && <span className="text-muted"> / {formatPoints(s.maxPoints)}</span>}
                        </Td>
                        <Td>
                          <span className="flex flex-wrap gap-1">
                            {s.late && <LateTag days={s.daysLate} />}
                            {s.flags.some((f) => f.open) && <FlagTag />}
                            {s.scores.length > 1 && <span className="text-xs text-muted">{s.scores.length} score rows</span>}
                          </span>
                        </Td>
                        <Td>
                          <SubmissionStatusTag status={s.status} />
                        </Td>
                        <Td>
                          <Link to={`/courses/${courseId}/assignments/${a.id}?submission=${s.id}#submissions`} className="text-sm text-accent hover:underline">
                            Open<span className="sr-only"> attempt {s.attempt} on {a.title}</span>
                          </Link>
                        </Td>
                      </tr>
                    ))}
                </tbody>
              </Table>
            )}
          </div>
        );
      })}
    </section>
  );
}

const W = 320;
const H = 150;
const HM = { top: 10, right: 8, bottom: 34, left: 34 };

/** Counts, mean and median, and a histogram of scores in ten bins from 0 to the maximum (the table below it says the same). */
function Stats({ a, st, students }: { a: Assignment; st: GradebookResponse['stats'][number]; students: number }) {
  const bins = st.histogram.map((n, i) => ({ n, lo: (a.maxPoints * i) / st.histogram.length, hi: (a.maxPoints * (i + 1)) / st.histogram.length }));
  const x = scaleBand<number>()
    .domain(bins.map((_, i) => i))
    .range([HM.left, W - HM.right])
    .padding(0.12);
  const top = Math.max(1, ...st.histogram);
  const y = scaleLinear().domain([0, top]).range([H - HM.bottom, HM.top]).nice();
  const yTicks = y.ticks(Math.min(4, top)).filter((t) => Number.isInteger(t));
  return (
    <div className="flex flex-col gap-2 text-sm">
      <dl className="grid grid-cols-3 gap-2">
        <div>
          <dt className="text-xs text-muted">handed in</dt>
          <dd className="tabular">
            {st.submitted} / {students}
          </dd>
        </div>
        <div>
          <dt className="text-xs text-muted">mean</dt>
          <dd className="tabular">{formatPoints(st.mean)}</dd>
        </div>
        <div>
          <dt className="text-xs text-muted">median</dt>
          <dd className="tabular">{formatPoints(st.median)}</dd>
        </div>
      </dl>
      <figure>
        <svg viewBox={`0 0 ${W} ${H}`} className="block h-auto w-full max-w-[24rem]" role="img" aria-label={`Histogram of scores on ${a.title}: ${bins.map((b) => `${b.n} between ${formatPoints(b.lo)} and ${formatPoints(b.hi)}`).join('; ')}`}>
          {yTicks.map((t) => (
            <g key={t}>
              <line x1={HM.left} x2={W - HM.right} y1={y(t)} y2={y(t)} stroke="var(--color-line)" strokeWidth={0.6} />
              <text x={HM.left - 5} y={y(t)} dy="0.32em" textAnchor="end" fontSize={10} fill="var(--color-muted)" className="tabular">
                {t}
              </text>
            </g>
          ))}
          {bins.map((b, i) => (
            <g key={i}>
              <rect x={x(i)} y={y(b.n)} width={x.bandwidth()} height={y(0) - y(b.n)} fill="var(--color-matched)">
                <title>
                  {b.n} score{b.n === 1 ? '' : 's'} from {formatPoints(b.lo)} to {formatPoints(b.hi)}
                </title>
              </rect>
              {b.n > 0 && (
                <text x={(x(i) ?? 0) + x.bandwidth() / 2} y={y(b.n) - 2} textAnchor="middle" fontSize={9.5} fill="var(--color-ink)" className="tabular">
                  {b.n}
                </text>
              )}
            </g>
          ))}
          <line x1={HM.left} x2={W - HM.right} y1={y(0)} y2={y(0)} stroke="var(--color-muted)" />
          {[0, bins.length / 2, bins.length].map((k) => (
            <text key={k} x={HM.left + ((W - HM.right - HM.left) * k) / bins.length} y={H - HM.bottom + 13} textAnchor="middle" fontSize={10} fill="var(--color-muted)" className="tabular">
              {tickLabel((a.maxPoints * k) / bins.length)}
            </text>
          ))}
          <text x={(HM.left + W - HM.right) / 2} y={H - 4} textAnchor="middle" fontSize={11} fill="var(--color-ink)">
            points (of {formatPoints(a.maxPoints)})
          </text>
          <text transform={`translate(10,${(H - HM.bottom + HM.top) / 2}) rotate(-90)`} textAnchor="middle" fontSize={11} fill="var(--color-ink)">
            students
          </text>
        </svg>
        <details className="mt-1 text-xs">
          <summary className="cursor-pointer text-muted">The histogram as a table</summary>
          <Table caption={`Scores on ${a.title} by range`} captionHidden>
            <thead>
              <tr>
                <Th>Points</Th>
                <Th numeric>Students</Th>
              </tr>
            </thead>
            <tbody>
              {bins.map((b, i) => (
                <tr key={i}>
                  <Td className="tabular">
                    {formatPoints(b.lo)} to {i === bins.length - 1 ? '' : 'under '}
                    {formatPoints(b.hi)}
                  </Td>
                  <Td numeric>{b.n}</Td>
                </tr>
              ))}
            </tbody>
          </Table>
        </details>
      </figure>
    </div>
  );
}
