import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link } from 'react-router-dom';
import type { z } from 'zod';
import { answerSecondLookBody, type ReviewQueueItem } from '../../../../shared/submission';
import { Button } from '../../../components/Button';
import { EmptyState } from '../../../components/EmptyState';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { InputField, SelectField, TextAreaField } from '../../../components/inputs';
import { Loading } from '../../../components/Loading';
import { formatDateTime } from '../../../lib/format';
import { useAnswerSecondLook, useReviewQueue } from '../api';
import { FlagTag, formatPoints } from './bits';

/** Every flagged submission and second-look request of the course, oldest first, each reason in a sentence and the next step one click away. */
export function ReviewQueue({ courseId }: { courseId: number }) {
  const q = useReviewQueue(courseId);
  const [kind, setKind] = useState('');
  const [assignment, setAssignment] = useState('');
  if (q.isPending) return <Loading what="the review queue" />;
  if (q.error) return <ErrorBanner error={q.error} title="The review queue could not be loaded" />;
  if (q.data.length === 0)
    return (
      <EmptyState
        title="Nothing waits for review"
        action={
          <Link to={`/courses/${courseId}`} className="text-sm font-medium text-accent hover:underline">
            Back to the course dashboard
          </Link>
        }
      >
        Flagged submissions and students&apos; requests for a second look appear here. When the queue is empty, the instructor can release the scores.
      </EmptyState>
    );
  const assignments = [...new Map(q.data.map((i) => [i.assignment.id, i.assignment.title])).entries()];
  const items = q.data
    .filter((i) => (!kind || i.kind === kind) && (!assignment || String(i.assignment.id) === assignment))
    .sort((a, b) => a.createdAt.localeCompare(b.createdAt));
  return (
    <div className="flex flex-col gap-4">
      <div className="flex flex-wrap items-end gap-3" role="search" aria-label="Filter the queue">
        <SelectField
          label="Kind"
          value={kind}
          onChange={(e) => setKind(e.target.value)}
          options={[
            ['', 'Flags and second looks'],
            ['flag', 'Flags'],
            ['second-look', 'Second looks'],
          ]}
        />
        <SelectField label="Assignment" value={assignment} onChange={(e) => setAssignment(e.target.value)} options={[['', 'All assignments'], ...assignments.map(([id, t]) => [String(id), t] as const)]} />
        <p className="pb-2 text-xs text-muted tabular">
          {items.length} of {q.data.length} waiting
        </p>
      </div>
      <ol className="flex flex-col gap-3" aria-label="Waiting for review">
        {items.map((i) => (
          <QueueItem key={i.reviewId} courseId={courseId} item={i} />
        ))}
      </ol>
    </div>
  );
}

function QueueItem({ courseId, item }: { courseId: number; item: ReviewQueueItem }) {
  const [answering, setAnswering] = useState(false);
  const link = `/courses/${courseId}/assignments/${item.assignment.id}?submission=${item.submissionId}#submissions`;
  return (
    <li className="flex flex-col gap-2 rounded-lg border border-line bg-surface-raised p-3 sm:p-4">
      <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
        {item.kind === 'flag' ? <FlagTag /> : <FlagTag word="second look" />}
        <span className="font-semibold">{item.student.displayName}</span>
        <span className="text-sm text-muted">
          {item.assignment.title}, attempt {item.attempt}
        </span>
        {item.points !== null && (
          <span className="tabular text-sm">
            {formatPoints(item.points)} / {formatPoints(item.maxPoints)} points
          </span>
        )}
        <span className="ml-auto text-xs text-muted">
          since <time dateTime={item.createdAt}>{formatDateTime(item.createdAt)}</time>
        </span>
      </div>
      <ul className="list-disc pl-5 text-sm">
        {item.reasons.map((r, k) => (
          <li key={k}>{r}</li>
        ))}
      </ul>
      <div className="flex flex-wrap gap-2">
        <Link to={link} className="inline-flex items-center rounded-md border border-accent bg-accent px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-strong">
          {item.kind === 'flag' ? 'Review the submission' : 'Open the submission'}
          <span className="sr-only">
            {' '}
            of {item.student.displayName}, {item.assignment.title}
          </span>
        </Link>
        {item.kind === 'second-look' && !answering && (
          <Button variant="secondary" size="md" onClick={() => setAnswering(true)}>
            Answer here…
          </Button>
        )}
      </div>
      {answering && <AnswerForm courseId={courseId} item={item} onDone={() => setAnswering(false)} />}
    </li>
  );
}

function AnswerForm({ courseId, item, onDone }: { courseId: number; item: ReviewQueueItem; onDone: () => void }) {
  const answer = useAnswerSecondLook(courseId);
  const f = useForm<z.input<typeof answerSecondLookBody>>({ resolver: zodResolver(answerSecondLookBody), defaultValues: { comment: '' } });
  return (
    <form noValidate className="flex flex-col gap-2 border-t border-line pt-2" onSubmit={f.handleSubmit((v) => answer.mutate({ reviewId: item.reviewId, ...v }, { onSuccess: onDone }))}>
      <TextAreaField label="Your answer to the student" error={f.formState.errors.comment?.message} className="[&_textarea]:min-h-[5rem] [&_textarea]:font-sans" {...f.register('comment')} />
      <InputField
        label="New points (leave empty to keep them)"
        type="number"
        step="any"
        min={0}
        suffix={item.maxPoints !== null ? `of ${formatPoints(item.maxPoints)}` : undefined}
        error={f.formState.errors.points?.message}
        {...f.register('points', { setValueAs: (v: string) => (v === '' || v === undefined ? undefined : Number(v)) })}
      />
      {answer.error && <ErrorBanner error={answer.error} title="The answer was not saved" />}
      <div className="flex gap-2">
        <Button type="submit" busy={answer.isPending}>
          Send the answer
        </Button>
        <Button variant="secondary" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
