import { zodResolver } from '@hookform/resolvers/zod';
import type { ColumnFiltersState } from '@tanstack/react-table';
import { useEffect, useMemo, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import type { Role } from '../../../../shared/api';
import { decisionBody, scoreReasonLabels, type DecisionBody, type StaffSubmission } from '../../../../shared/submission';
import { Button } from '../../../components/Button';
import { DataTable, dataColumnHelper } from '../../../components/DataTable';
import { EmptyState } from '../../../components/EmptyState';
import { ErrorBanner, Notice } from '../../../components/ErrorBanner';
import { InputField, RadioGroup, SelectField, TextAreaField } from '../../../components/inputs';
import { Loading } from '../../../components/Loading';
import { MatchPlanePlot, type MatchPoint } from '../../../components/plots/MatchPlanePlot';
import { Table, Td, Th } from '../../../components/Table';
import { formatDateTime } from '../../../lib/format';
import { useCopyEvidence, useDecision, useStaffSubmissions } from '../api';
import { FlagTag, formatPoints, LateTag, ReportView, SubmissionStatusTag } from './bits';
import { RegradeForm } from './Regrade';

const col = dataColumnHelper<StaffSubmission>();

const statusOptions = [
  ['', 'Any state'],
  ['scored', 'Scored'],
  ['received', 'Waiting'],
  ['grading', 'Being scored'],
  ['failed', 'Not scored'],
] as const;
const markerOptions = [
  ['', 'Any'],
  ['flagged', 'Flagged'],
  ['late', 'Late'],
  ['review', 'Waiting for review'],
] as const;

const openFlags = (s: StaffSubmission) => s.flags.filter((f) => f.open).length;
const openReviews = (s: StaffSubmission) => s.reviews.filter((r) => r.state === 'open').length;

/**
 * Staff: every attempt on an assignment in a sortable, filterable table; the
 * chosen one opens below with its report, flags, score history, decision form
 * and copy evidence.
 */
export function StaffSubmissionsPanel({ courseId, assignmentId, role, selected, onSelect }: { courseId: number; assignmentId: number; role: Role; selected: number | null; onSelect: (id: number | null) => void }) {
  const subs = useStaffSubmissions(courseId, assignmentId);
  const [search, setSearch] = useState('');
  const [status, setStatus] = useState('');
  const [marker, setMarker] = useState('');

  const columns = useMemo(
    () =>
      col.columns([
        col.accessor((s) => `${s.student.displayName} ${s.student.email}`, {
          id: 'student',
          header: 'Student',
          sortFn: 'text',
          cell: (c) => (
            <button type="button" className="text-left font-medium text-accent hover:underline" onClick={() => onSelect(c.row.original.id)} aria-label={`Open attempt ${c.row.original.attempt} of ${c.row.original.student.displayName}`}>
              {c.row.original.student.displayName}
              <span className="block text-xs font-normal text-muted">{c.row.original.student.email}</span>
            </button>
          ),
        }),
        col.accessor('attempt', { header: 'Attempt', meta: { numeric: true }, enableGlobalFilter: false }),
        col.accessor('receivedAt', {
          header: 'Received',
          sortFn: 'alphanumeric',
          enableGlobalFilter: false,
          cell: (c) => <time dateTime={c.getValue()} className="tabular text-xs whitespace-nowrap">{formatDateTime(c.getValue())}</time>,
        }),
        col.accessor((s) => s.points ?? undefined, {
          id: 'points',
          header: 'Points',
          meta: { numeric: true },
          sortUndefined: 'last',
          enableGlobalFilter: false,
          cell: (c) => (
            <span className="whitespace-nowrap">
              {c.row.original.points === null ? '—' : formatPoints(c.row.original.points)}
              {c.row.original.maxPoints !== null && <span className="text-muted"> / {formatPoints(c.row.original.maxPoints)}</span>}
            </span>
          ),
        }),
        col.accessor((s) => [s.late ? 'late' : '', openFlags(s) ? 'flagged' : '', openReviews(s) ? 'review' : ''].join(' '), {
          id: 'markers',
          header: 'Marks',
          enableSorting: false,
          enableGlobalFilter: false,
          filterFn: 'includesString',
          cell: (c) => {
            const s = c.row.original;
            return (
              <span className="flex flex-wrap gap-1">
                {s.late && <LateTag days={s.daysLate} />}
                {openFlags(s) > 0 && <FlagTag count={openFlags(s)} />}
                {openReviews(s) > 0 && openFlags(s) === 0 && <FlagTag word="second look" />}
              </span>
            );
          },
        }),
        col.accessor('status', { header: 'State', filterFn: 'equals', enableGlobalFilter: false, cell: (c) => <SubmissionStatusTag status={c.getValue()} /> }),
      ]),
    [onSelect],
  );
  const columnFilters = useMemo<ColumnFiltersState>(
    () => [...(status ? [{ id: 'status', value: status }] : []), ...(marker ? [{ id: 'markers', value: marker }] : [])],
    [status, marker],
  );

  if (subs.isPending) return <Loading what="submissions" />;
  if (subs.error) return <ErrorBanner error={subs.error} title="The submissions could not be loaded" />;
  const current = subs.data.find((s) => s.id === selected) ?? null;

  return (
    <div className="flex flex-col gap-4">
      {subs.data.length === 0 ? (
        <EmptyState title="Nothing handed in yet">
          Students see the hand-in form on their page of this assignment. Attempts appear here as they arrive, scored by the autograder within seconds.
        </EmptyState>
      ) : (
        <>
          <div className="flex flex-wrap items-end gap-3" role="search" aria-label="Filter submissions">
            <InputField label="Student" placeholder="Name or e-mail" value={search} onChange={(e) => setSearch(e.target.value)} type="search" />
            <SelectField label="State" value={status} onChange={(e) => setStatus(e.target.value)} options={statusOptions} />
            <SelectField label="Marks" value={marker} onChange={(e) => setMarker(e.target.value)} options={markerOptions} />
            <p className="pb-2 text-xs text-muted tabular">{subs.data.length} attempts</p>
          </div>
          <DataTable
            caption="Submissions"
            columns={columns}
            data={subs.data}
            globalFilter={search}
            columnFilters={columnFilters}
            initialSorting={[{ id: 'receivedAt', desc: true }]}
            rowId={(s) => String(s.id)}
            selectedId={selected === null ? null : String(selected)}
          />
        </>
      )}
      {current && <SubmissionDetail key={current.id} courseId={courseId} assignmentId={assignmentId} s={current} role={role} onClose={() => onSelect(null)} />}
    </div>
  );
}

function SubmissionDetail({ courseId, assignmentId, s, role, onClose }: { courseId: number; assignmentId: number; s: StaffSubmission; role: Role; onClose: () => void }) {
  const [evidenceFor, setEvidenceFor] = useState<number | null>(null);
  const ref = useRef<HTMLElement>(null);
  // Opened from the table, the queue or a link: bring it into view.
  useEffect(() => ref.current?.scrollIntoView({ block: 'start' }), []);
  return (
    <section ref={ref} aria-labelledby={`sub-${s.id}`} className="flex flex-col gap-4 rounded-lg border-2 border-accent/40 bg-surface-raised p-4" data-testid="submission-detail">
      <div className="flex flex-wrap items-baseline gap-x-3 gap-y-1">
        <h3 id={`sub-${s.id}`} className="text-base font-semibold">
          {s.student.displayName}, attempt {s.attempt}
        </h3>
        <SubmissionStatusTag status={s.status} long />
        {s.late && <LateTag days={s.daysLate} />}
        <span className="text-xs text-muted">
          <span className="font-mono">{s.fileName}</span> · received <time dateTime={s.receivedAt}>{formatDateTime(s.receivedAt)}</time>
        </span>
        <Button variant="subtle" size="sm" className="ml-auto" onClick={onClose}>
          Close
        </Button>
      </div>
      {s.points !== null && (
        <p className="text-sm">
          <span className="tabular text-lg font-semibold">
            {formatPoints(s.points)} of {formatPoints(s.maxPoints)}
          </span>{' '}
          points now <span className="text-muted">(the latest score row below; provisional until released)</span>
        </p>
      )}
      {s.message && <p className="rounded-md border border-line bg-surface-sunken/60 px-3 py-2 text-sm">{s.message}</p>}

      {s.flags.length > 0 && (
        <div className="flex flex-col gap-2">
          <h4 className="text-sm font-semibold">Flags</h4>
          <ul className="flex flex-col gap-2">
            {s.flags.map((f) => (
              <li key={f.id} className={`flex flex-col gap-1 rounded-md border px-3 py-2 text-sm ${f.open ? 'border-flagged/40' : 'border-line text-muted'}`}>
                <span className="flex flex-wrap items-center gap-2">
                  <FlagTag word={f.open ? 'open' : 'settled'} />
                  <span>{f.message}</span>
                </span>
                {f.otherStudent && f.otherSubmissionId !== undefined && f.otherSubmissionId !== null && (
                  <span>
                    <Button variant="quiet" size="sm" onClick={() => setEvidenceFor(evidenceFor === f.id ? null : f.id)} aria-expanded={evidenceFor === f.id}>
                      {evidenceFor === f.id ? 'Hide the evidence' : `Compare with ${f.otherStudent.displayName} side by side`}
                    </Button>
                  </span>
                )}
                {evidenceFor === f.id && <Evidence courseId={courseId} assignmentId={assignmentId} submissionId={s.id} flagId={f.id} />}
              </li>
            ))}
          </ul>
        </div>
      )}

      {s.report ? (
        <details open className="rounded-md border border-line">
          <summary className="cursor-pointer px-3 py-2 text-sm font-semibold">How the score was computed</summary>
          <div className="border-t border-line p-3">
            <ReportView report={s.report} audience="staff" />
          </div>
        </details>
      ) : (
        <p className="text-sm text-muted">No report yet: the autograder has not scored this attempt.</p>
      )}

      <ScoreHistory s={s} />
      {s.reviews.length > 0 && <Reviews s={s} />}
      <div className="grid grid-cols-[minmax(0,1fr)] gap-4 lg:grid-cols-2">
        {s.status === 'scored' && <DecisionForm courseId={courseId} assignmentId={assignmentId} s={s} />}
        {role === 'instructor' && (
          <div className="rounded-md border border-line p-3">
            <h4 className="mb-2 text-sm font-semibold">Score this attempt again</h4>
            <RegradeForm courseId={courseId} assignmentId={assignmentId} submissionId={s.id} />
          </div>
        )}
      </div>
    </section>
  );
}

function ScoreHistory({ s }: { s: StaffSubmission }) {
  if (s.scores.length === 0) return null;
  return (
    <Table caption="Score history: every row kept, the latest counts">
      <thead>
        <tr>
          <Th>When</Th>
          <Th numeric>Points</Th>
          <Th>Reason</Th>
          <Th>By</Th>
          <Th>Comment</Th>
        </tr>
      </thead>
      <tbody>
        {[...s.scores]
          .sort((a, b) => b.createdAt.localeCompare(a.createdAt) || b.id - a.id)
          .map((r) => (
            <tr key={r.id}>
              <Td className="tabular text-xs whitespace-nowrap">
                <time dateTime={r.createdAt}>{formatDateTime(r.createdAt)}</time>
              </Td>
              <Td numeric className="whitespace-nowrap">
                {formatPoints(r.points)} / {formatPoints(r.maxPoints)}
                {r.latePenalty > 0 && <span className="block text-xs text-muted">−{Math.round(r.latePenalty * 100)}% late</span>}
              </Td>
              <Td className="text-xs">
                {scoreReasonLabels[r.reason]}
                <span className="block text-muted">version {r.assignmentVersion}</span>
              </Td>
              <Td className="text-xs">{r.author ?? 'the autograder'}</Td>
              <Td className="text-xs whitespace-pre-wrap">{r.comment ?? ''}</Td>
            </tr>
          ))}
      </tbody>
    </Table>
  );
}

const reviewStateWords = { open: 'open', accepted: 'accepted', overridden: 'points set', returned: 'returned to the student', answered: 'answered' } as const;

function Reviews({ s }: { s: StaffSubmission }) {
  return (
    <div className="flex flex-col gap-2">
      <h4 className="text-sm font-semibold">Reviews</h4>
      <ul className="flex flex-col gap-2 text-sm">
        {s.reviews.map((r) => (
          <li key={r.id} className="rounded-md border border-line px-3 py-2">
            <p className="text-xs text-muted">
              {r.kind === 'flag' ? 'Flag review' : 'Second look asked by the student'} · {reviewStateWords[r.state]} · opened{' '}
              <time dateTime={r.createdAt}>{formatDateTime(r.createdAt)}</time>
            </p>
            {r.requestComment && <p className="whitespace-pre-wrap">“{r.requestComment}”</p>}
            {r.decisionComment && (
              <p className="mt-1 whitespace-pre-wrap">
                <span className="text-xs text-muted">
                  {r.decidedBy ?? 'Staff'}
                  {r.decidedAt ? `, ${formatDateTime(r.decidedAt)}` : ''}:
                </span>{' '}
                {r.decisionComment}
              </p>
            )}
          </li>
        ))}
      </ul>
    </div>
  );
}

const actionOptions = [
  { value: 'accept' as const, label: 'Accept the score', note: 'The flags are settled; the points stay as they are.' },
  { value: 'override' as const, label: 'Set the points', note: 'A new score row with your points and a comment that explains them.' },
  { value: 'return' as const, label: 'Return to the student', note: 'The student reads your comment and may hand in again.' },
];

function DecisionForm({ courseId, assignmentId, s }: { courseId: number; assignmentId: number; s: StaffSubmission }) {
  const decide = useDecision(courseId, assignmentId);
  const [done, setDone] = useState<string | null>(null);
  const f = useForm<DecisionBody>({ resolver: zodResolver(decisionBody), defaultValues: { action: 'accept', comment: '', points: s.points ?? undefined } });
  const action = f.watch('action');
  const onSubmit = f.handleSubmit((body) => {
    setDone(null);
    const sent: DecisionBody = body.action === 'override' ? body : { action: body.action, comment: body.comment };
    decide.mutate({ submissionId: s.id, body: sent }, { onSuccess: () => setDone(body.action === 'accept' ? 'Accepted.' : body.action === 'override' ? 'Points set.' : 'Returned to the student.') });
  });
  return (
    <form noValidate onSubmit={onSubmit} className="flex flex-col gap-3 rounded-md border border-line p-3" aria-label="Decision">
      <h4 className="text-sm font-semibold">Decision</h4>
      <RadioGroup legend="What to do" name={`action-${s.id}`} value={action} onChange={(v) => f.setValue('action', v, { shouldValidate: f.formState.isSubmitted })} options={actionOptions} />
      {action === 'override' && (
        <InputField
          label="Points"
          type="number"
          step="any"
          min={0}
          max={s.maxPoints ?? undefined}
          suffix={s.maxPoints !== null ? `of ${formatPoints(s.maxPoints)}` : undefined}
          error={f.formState.errors.points?.message}
          {...f.register('points', { setValueAs: (v: string) => (v === '' || v === undefined ? undefined : Number(v)) })}
        />
      )}
      <TextAreaField
        label={action === 'accept' ? 'Comment (optional)' : 'Comment (required)'}
        hint={action === 'override' ? 'Why these points: kept with the new score row, under your name.' : action === 'return' ? 'What the student should change.' : undefined}
        error={f.formState.errors.comment?.message}
        className="[&_textarea]:min-h-[5rem] [&_textarea]:font-sans"
        {...f.register('comment')}
      />
      {decide.error && <ErrorBanner error={decide.error} title="The decision was not saved" />}
      {done && !decide.error && <Notice>{done} A new score row records it.</Notice>}
      <div>
        <Button type="submit" busy={decide.isPending}>
          {action === 'accept' ? 'Accept' : action === 'override' ? 'Set the points' : 'Return to the student'}
        </Button>
      </div>
    </form>
  );
}

/** Both spectra against both references: one complex plane per reference. */
function Evidence({ courseId, assignmentId, submissionId, flagId }: { courseId: number; assignmentId: number; submissionId: number; flagId: number }) {
  const ev = useCopyEvidence(courseId, assignmentId, submissionId, flagId);
  if (ev.isPending) return <Loading what="the evidence" />;
  if (ev.error) return <ErrorBanner error={ev.error} title="The evidence could not be loaded" />;
  const sides = ev.data.sides;
  if (sides.length < 2) return <p className="text-sm text-muted">The other submission is no longer there to compare.</p>;
  return (
    <div className="flex flex-col gap-3 pt-2" data-testid="copy-evidence">
      <div className="grid grid-cols-[minmax(0,1fr)] gap-4 md:grid-cols-2">
        {sides.map((ref, ri) => {
          const other = sides[1 - ri];
          const pts: MatchPoint[] = [
            ...ref.reference.map((v, i) => ({ re: v.re, im: v.im, mark: 'reference' as const, label: `${ref.student.displayName}'s reference ${i + 1}` })),
            ...ref.submitted.map((v, i) => ({ re: v.re, im: v.im, mark: 'matched' as const, label: `${ref.student.displayName}'s value ${i + 1}` })),
            ...other.submitted.map((v, i) => ({ re: v.re, im: v.im, mark: 'other' as const, label: `${other.student.displayName}'s value ${i + 1}` })),
          ];
          return (
            <figure key={ri} className="min-w-0">
              <figcaption className="mb-1 text-sm font-medium">Against {ref.student.displayName}&apos;s reference</figcaption>
              <MatchPlanePlot
                points={pts}
                label={`${ref.student.displayName}'s reference with both students' values on the complex plane`}
                legendLabels={{ reference: `${ref.student.displayName}'s reference`, matched: `${ref.student.displayName}'s values`, other: `${other.student.displayName}'s values` }}
              />
            </figure>
          );
        })}
      </div>
      <Table caption="Points of each file against each reference">
        <thead>
          <tr>
            <Th>File of</Th>
            <Th numeric>Against own reference</Th>
            <Th numeric>Against the other&apos;s</Th>
          </tr>
        </thead>
        <tbody>
          {sides.map((sd) => (
            <tr key={sd.student.id}>
              <Td>{sd.student.displayName}</Td>
              <Td numeric>
                {formatPoints(sd.pointsOwn)} / {formatPoints(sd.maxPoints)}
              </Td>
              <Td numeric>
                {formatPoints(sd.pointsOther)} / {formatPoints(sd.maxPoints)}
              </Td>
            </tr>
          ))}
        </tbody>
      </Table>
    </div>
  );
}
