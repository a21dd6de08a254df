import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useState } from 'react';
import { useDropzone } from 'react-dropzone';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import type { AssignmentDetail } from '../../../../shared/assignment';
import { pasteSubmissionBody, secondLookBody, type MySubmission, type MySubmissionsResponse } from '../../../../shared/submission';
import { Button } from '../../../components/Button';
import { Card } from '../../../components/Card';
import { ErrorBanner, Notice } from '../../../components/ErrorBanner';
import { TextAreaField } from '../../../components/inputs';
import { Loading } from '../../../components/Loading';
import { formatDateTime } from '../../../lib/format';
import { ApiError, isApiError } from '../../../lib/http';
import { formatBytes } from '../../../lib/numbers';
import { browserTimeZone, describeDuration, formatInZone } from '../../../lib/timezones';
import { useAskSecondLook, useHandIn, useMySubmissions } from '../api';
import { formatPoints, LateTag, ProvisionalNote, ReportView, SubmissionStatusTag, ValueStatusView } from './bits';

const fileForm = z.object({ file: z.instanceof(File, { message: 'Choose a file, or drop one on the box' }) });
type FileForm = z.infer<typeof fileForm>;
type PasteForm = z.infer<typeof pasteSubmissionBody>;

/**
 * The student's hand-in: attempts left, due date and cut-off, the upload or
 * paste form, and every attempt with its feedback as the policy allows.
 */
export function HandInPanel({ courseId, a }: { courseId: number; a: AssignmentDetail }) {
  const mine = useMySubmissions(courseId, a.id);
  return (
    <div id="hand-in" className="scroll-mt-4">
    <Card title="Hand in your answer">
      <p className="mb-3 text-sm text-muted">
        Automated scores are provisional until the course staff release them: staff may look at any score, and a flagged one is checked by a person first.
      </p>
      {mine.isPending ? (
        <Loading what="your attempts" />
      ) : mine.error ? (
        <ErrorBanner error={mine.error} title="Your attempts could not be loaded" />
      ) : (
        <HandInBody courseId={courseId} a={a} data={mine.data} />
      )}
    </Card>
    </div>
  );
}

function HandInBody({ courseId, a, data }: { courseId: number; a: AssignmentDetail; data: MySubmissionsResponse }) {
  const own = browserTimeZone();
  const [now, setNow] = useState(() => Date.now());
  useEffect(() => {
    const t = window.setInterval(() => setNow(Date.now()), 30_000);
    return () => window.clearInterval(t);
  }, []);
  const due = data.extendedTo ?? data.dueAt;
  const pastCutoff = now > Date.parse(data.cutoffAt);
  const late = now > Date.parse(due);
  const used = data.submissions.length;
  const closed = a.status === 'closed';
  const canHandIn = !closed && !pastCutoff && data.attemptsLeft > 0 && !data.released;

  return (
    <div className="flex flex-col gap-5">
      <dl className="grid grid-cols-[minmax(0,1fr)] gap-x-6 gap-y-2 text-sm sm:grid-cols-3">
        <div>
          <dt className="text-xs text-muted">Attempts left</dt>
          <dd className="tabular text-base font-semibold" data-testid="attempts-left">
            {data.attemptsLeft} of {used + data.attemptsLeft}
          </dd>
        </div>
        <div>
          <dt className="text-xs text-muted">{data.extendedTo ? 'Due (your extension)' : 'Due'}</dt>
          <dd className="tabular">
            <time dateTime={due}>{formatInZone(due, own)}</time>
            {data.extendedTo && (
              <span className="block text-xs text-muted">
                was <time dateTime={data.dueAt}>{formatInZone(data.dueAt, own)}</time>
              </span>
            )}
          </dd>
        </div>
        <div>
          <dt className="text-xs text-muted">Cut-off (nothing accepted after)</dt>
          <dd className="tabular">
            <time dateTime={data.cutoffAt}>{formatInZone(data.cutoffAt, own)}</time>
          </dd>
        </div>
      </dl>

      {data.released ? (
        <p className="rounded-md border border-ok/30 bg-ok-soft px-3.5 py-2 text-sm text-ok">Staff have released the scores: what you see below is final, and you can ask for a second look.</p>
      ) : closed ? (
        <p className="rounded-md border border-line bg-surface-sunken/60 px-3.5 py-2 text-sm">The assignment is closed: nothing more can be handed in.</p>
      ) : pastCutoff ? (
        <p className="rounded-md border border-line bg-surface-sunken/60 px-3.5 py-2 text-sm">
          The cut-off passed {describeDuration(now - Date.parse(data.cutoffAt))} ago: nothing more can be handed in. Ask the instructor if you need an extension.
        </p>
      ) : data.attemptsLeft <= 0 ? (
        <p className="rounded-md border border-line bg-surface-sunken/60 px-3.5 py-2 text-sm">You have used every attempt. Your last scored attempt is the one that counts.</p>
      ) : late ? (
        <p className="rounded-md border border-near-miss/50 bg-accent-soft px-3.5 py-2 text-sm">
          The due date has passed: an attempt handed in now is late and loses {a.latePolicy.penaltyPerDay}% of its points per started day.
        </p>
      ) : null}

      {canHandIn && <HandInForms courseId={courseId} assignmentId={a.id} attemptsLeft={data.attemptsLeft} />}

      <section aria-labelledby="attempts-heading" className="flex flex-col gap-3">
        <h3 id="attempts-heading" className="text-sm font-semibold">
          Your attempts
        </h3>
        {data.submissions.length === 0 ? (
          <p className="text-sm text-muted">Nothing handed in yet. Compute the eigenvalues from your own data, then upload the file or paste what your tool printed.</p>
        ) : (
          <ol className="flex flex-col gap-3">
            {[...data.submissions]
              .sort((x, y) => y.attempt - x.attempt)
              .map((s, i) => (
                <Attempt key={s.id} courseId={courseId} assignmentId={a.id} s={s} released={data.released} open={i === 0} />
              ))}
          </ol>
        )}
      </section>
    </div>
  );
}

function HandInForms({ courseId, assignmentId, attemptsLeft }: { courseId: number; assignmentId: number; attemptsLeft: number }) {
  const [mode, setMode] = useState<'file' | 'paste'>('file');
  const handIn = useHandIn(courseId, assignmentId);
  const [done, setDone] = useState<number | null>(null);
  const fileF = useForm<FileForm>({ resolver: zodResolver(fileForm) });
  const pasteF = useForm<PasteForm>({ resolver: zodResolver(pasteSubmissionBody), defaultValues: { text: '' } });
  const file = fileF.watch('file');

  const dz = useDropzone({
    multiple: false,
    maxFiles: 1,
    noClick: true,
    onDrop: (accepted) => {
      if (accepted[0]) {
        fileF.setValue('file', accepted[0], { shouldValidate: true });
        handIn.reset();
      }
    },
  });

  // A located reader error (400/422 naming `file` or `text`) goes next to its field; 409 and the rest in the banner.
  const fieldError = (name: 'file' | 'text') => (handIn.error instanceof ApiError ? handIn.error.fieldErrors[name] : undefined);
  const located = fieldError('file') ?? fieldError('text');
  const isReaderError = isApiError(handIn.error) && (handIn.error.status === 400 || handIn.error.status === 422);

  const submitted = (r: { submission: { attempt: number } }) => {
    setDone(r.submission.attempt);
    fileF.reset();
    pasteF.reset({ text: '' });
  };
  const onFile = fileF.handleSubmit((v) => {
    setDone(null);
    handIn.mutate({ file: v.file }, { onSuccess: submitted });
  });
  const onPaste = pasteF.handleSubmit((v) => {
    setDone(null);
    handIn.mutate({ text: v.text }, { onSuccess: submitted });
  });

  const noAttemptUsed = (message: string | undefined) => (
    <span className="block font-normal text-ink">{/no attempt/i.test(message ?? '') ? 'Fix it and hand it in again.' : 'No attempt was used: fix it and hand it in again.'}</span>
  );

  return (
    <div className="flex flex-col gap-3">
      <div role="radiogroup" aria-label="How to hand in" className="inline-flex w-fit rounded-md border border-line-strong p-0.5 text-sm">
        {(
          [
            ['file', 'Upload a file'],
            ['paste', 'Paste values'],
          ] as const
        ).map(([m, label]) => (
          <button
            key={m}
            type="button"
            role="radio"
            aria-checked={mode === m}
            onClick={() => {
              setMode(m);
              handIn.reset();
            }}
            className={`rounded px-3 py-1 ${mode === m ? 'bg-accent text-white' : 'text-ink hover:bg-surface-sunken'}`}
          >
            {label}
          </button>
        ))}
      </div>

      {mode === 'file' ? (
        <form onSubmit={onFile} noValidate className="flex flex-col gap-2">
          <div
            {...dz.getRootProps({
              className: `flex flex-col items-center justify-center gap-2 rounded-lg border-2 border-dashed px-4 py-6 text-center text-sm ${
                dz.isDragActive ? 'border-accent bg-accent-soft' : fileF.formState.errors.file || fieldError('file') ? 'border-danger bg-danger-soft/40' : 'border-line-strong bg-surface'
              }`,
            })}
          >
            <input {...dz.getInputProps({ 'aria-label': 'Your answer file' })} />
            {file ? (
              <p>
                <span className="font-medium">{file.name}</span> <span className="tabular text-muted">({formatBytes(file.size)})</span>
              </p>
            ) : (
              <p>{dz.isDragActive ? 'Drop the file to choose it' : 'Drop your answer file here: CSV, JSON, NumPy-printed text or .npy'}</p>
            )}
            <Button variant="secondary" size="sm" onClick={dz.open}>
              {file ? 'Choose another file…' : 'Choose a file…'}
            </Button>
          </div>
          {(fileF.formState.errors.file || fieldError('file')) && (
            <p role="alert" className="rounded-md border border-danger/40 bg-danger-soft px-3 py-2 text-sm font-medium text-danger" data-testid="reader-error">
              {fieldError('file') ?? fileF.formState.errors.file?.message}
              {fieldError('file') && noAttemptUsed(fieldError('file'))}
            </p>
          )}
          <div className="flex flex-wrap items-center gap-3">
            <Button type="submit" busy={handIn.isPending} disabled={!file}>
              Hand in this file
            </Button>
            <span className="text-xs text-muted">
              Uses one of your {attemptsLeft} attempt{attemptsLeft === 1 ? '' : 's'} left, unless the file cannot be read.
            </span>
          </div>
        </form>
      ) : (
        <form onSubmit={onPaste} noValidate className="flex flex-col gap-2">
          <TextAreaField
            label="What your tool printed"
            hint="re,im lines, a JSON list of [re, im] pairs, or a NumPy complex array as printed."
            error={pasteF.formState.errors.text?.message}
            placeholder={'[0.98123+0.18567j 0.98123-0.18567j\n 0.61004+0.j     ]'}
            {...pasteF.register('text')}
          />
          {fieldError('text') && (
            <p role="alert" className="rounded-md border border-danger/40 bg-danger-soft px-3 py-2 text-sm font-medium text-danger" data-testid="reader-error">
              {fieldError('text')}
              {noAttemptUsed(fieldError('text'))}
            </p>
          )}
          <div className="flex flex-wrap items-center gap-3">
            <Button type="submit" busy={handIn.isPending}>
              Hand in these values
            </Button>
            <span className="text-xs text-muted">
              Uses one of your {attemptsLeft} attempt{attemptsLeft === 1 ? '' : 's'} left, unless the values cannot be read.
            </span>
          </div>
        </form>
      )}
      {handIn.error && !located && (
        <ErrorBanner
          error={handIn.error}
          title={isApiError(handIn.error, 409) ? 'Not handed in' : isReaderError ? 'Your answer could not be read (no attempt was used)' : 'Not handed in'}
        />
      )}
      {done !== null && !handIn.error && <Notice>Attempt {done} received. The autograder scores it in a moment; this page updates by itself.</Notice>}
    </div>
  );
}

function Attempt({ courseId, assignmentId, s, released, open }: { courseId: number; assignmentId: number; s: MySubmission; released: boolean; open: boolean }) {
  const hasScore = s.points !== undefined && s.maxPoints !== undefined;
  return (
    <li className="rounded-lg border border-line bg-surface-raised">
      <details open={open} className="group">
        <summary className="flex cursor-pointer flex-wrap items-center gap-x-3 gap-y-1 px-3 py-2 text-sm">
          <span className="font-semibold">Attempt {s.attempt}</span>
          <SubmissionStatusTag status={s.status} />
          {s.late && <LateTag days={s.daysLate} />}
          {hasScore && (
            <span className="tabular font-medium">
              {formatPoints(s.points)} of {formatPoints(s.maxPoints)} points
            </span>
          )}
          {hasScore && <ProvisionalNote released={!s.provisional} />}
          <span className="ml-auto text-xs text-muted">
            <span className="font-mono">{s.fileName}</span> · <time dateTime={s.receivedAt}>{formatDateTime(s.receivedAt)}</time>
          </span>
        </summary>
        <div className="flex flex-col gap-4 border-t border-line px-3 py-3">
          {s.status === 'received' || s.status === 'grading' ? (
            <p role="status" className="text-sm text-muted">
              {s.status === 'received' ? 'Waiting for the autograder…' : 'Being scored…'} This updates by itself.
            </p>
          ) : s.status === 'failed' ? (
            <p className="text-sm">This attempt could not be scored. The staff have been told and will score it again; it is kept exactly as you handed it in.</p>
          ) : s.report ? (
            <ReportView report={s.report} audience="student" />
          ) : s.values && s.values.length > 0 ? (
            <ValueStatusView values={s.values} />
          ) : hasScore ? (
            <p className="text-sm text-muted">
              {released ? 'The details of how this score was computed are not available; ask for a second look if you want them explained.' : 'The course shows the score now and the details when staff release the scores.'}
            </p>
          ) : (
            <p className="text-sm text-muted">Scored. The course shows scores when staff release them.</p>
          )}
          {s.report && s.points !== undefined && Math.abs(s.report.points - s.points) > 1e-9 && !s.late && (
            <p className="text-sm">
              The autograder gave {formatPoints(s.report.points)} of {formatPoints(s.report.maxPoints)}; the course staff set the points to {formatPoints(s.points)}.
            </p>
          )}
          {s.late && s.status === 'scored' && (
            <p className="text-xs text-muted">
              Handed in {s.daysLate} day{s.daysLate === 1 ? '' : 's'} late: the late penalty is already taken off the points above.
            </p>
          )}
          {s.staffComment && (
            <blockquote className="rounded-md border-l-4 border-accent bg-accent-soft/60 px-3 py-2 text-sm">
              <p className="text-xs font-semibold text-muted">From the course staff</p>
              <p className="whitespace-pre-wrap">{s.staffComment}</p>
            </blockquote>
          )}
          {s.reviews && s.reviews.filter((r) => r.kind === 'second-look').length > 0 && (
            <ul className="flex flex-col gap-2 text-sm">
              {s.reviews
                .filter((r) => r.kind === 'second-look')
                .map((r) => (
                  <li key={r.id} className="rounded-md border border-line px-3 py-2">
                    <p className="text-xs text-muted">
                      You asked for a second look on <time dateTime={r.createdAt}>{formatDateTime(r.createdAt)}</time>
                    </p>
                    <p className="whitespace-pre-wrap">{r.requestComment}</p>
                    {r.state === 'open' ? (
                      <p className="mt-1 text-xs font-medium">Waiting for the staff&apos;s answer.</p>
                    ) : (
                      <p className="mt-1 border-t border-line pt-1">
                        <span className="text-xs text-muted">
                          Answered by {r.decidedBy ?? 'staff'}
                          {r.decidedAt && (
                            <>
                              {' '}
                              on <time dateTime={r.decidedAt}>{formatDateTime(r.decidedAt)}</time>
                            </>
                          )}
                          :
                        </span>{' '}
                        <span className="whitespace-pre-wrap">{r.decisionComment}</span>
                      </p>
                    )}
                  </li>
                ))}
            </ul>
          )}
          {released && s.canAskSecondLook && <SecondLookForm courseId={courseId} assignmentId={assignmentId} submissionId={s.id} />}
        </div>
      </details>
    </li>
  );
}

function SecondLookForm({ courseId, assignmentId, submissionId }: { courseId: number; assignmentId: number; submissionId: number }) {
  const [open, setOpen] = useState(false);
  const ask = useAskSecondLook(courseId, assignmentId);
  const f = useForm<z.input<typeof secondLookBody>>({ resolver: zodResolver(secondLookBody), defaultValues: { comment: '' } });
  if (!open)
    return (
      <div>
        <Button variant="secondary" size="sm" onClick={() => setOpen(true)}>
          Ask for a second look…
        </Button>
      </div>
    );
  return (
    <form
      noValidate
      className="flex flex-col gap-2 rounded-md border border-line p-3"
      onSubmit={f.handleSubmit((v) => ask.mutate({ submissionId, comment: v.comment }, { onSuccess: () => setOpen(false) }))}
    >
      <TextAreaField
        label="What would you like the staff to look at?"
        hint="A person reads this and answers here. Say which value or part, and why you think the score is off."
        error={f.formState.errors.comment?.message}
        className="[&_textarea]:min-h-[6rem] [&_textarea]:font-sans"
        {...f.register('comment')}
      />
      {ask.error && <ErrorBanner error={ask.error} title="The request was not sent" />}
      <div className="flex gap-2">
        <Button type="submit" size="sm" busy={ask.isPending}>
          Send the request
        </Button>
        <Button variant="secondary" size="sm" onClick={() => setOpen(false)}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
