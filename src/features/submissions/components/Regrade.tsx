import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import { regradeBody } from '../../../../shared/submission';
import { Button } from '../../../components/Button';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { InputField } from '../../../components/inputs';
import { ProgressBar } from '../../../components/ProgressBar';
import { useRegradeProgress, useStartRegrade } from '../api';

type Form = z.input<typeof regradeBody>;

/**
 * Score one submission (or, without submissionId, every submission of the
 * assignment) again as a job; a bar shows its progress. Earlier scores stay:
 * each regrade adds a row with its reason.
 */
export function RegradeForm({ courseId, assignmentId, submissionId }: { courseId: number; assignmentId: number; submissionId?: number }) {
  const start = useStartRegrade(courseId, assignmentId);
  const [regradeId, setRegradeId] = useState<number | null>(null);
  const progress = useRegradeProgress(courseId, assignmentId, regradeId);
  const f = useForm<Form>({ resolver: zodResolver(regradeBody), defaultValues: { reason: '', submissionId } });
  const p = progress.data;
  const running = p?.state === 'running';
  return (
    <form
      noValidate
      className="flex flex-col gap-2"
      onSubmit={f.handleSubmit((body) => start.mutate({ ...body, submissionId }, { onSuccess: (r) => setRegradeId(r.id) }))}
    >
      <InputField
        label="Why"
        wide
        placeholder={submissionId ? 'e.g. scored before the tolerance fix' : 'e.g. relative tolerance raised to 1e-3'}
        hint="Kept with each new score row; earlier scores stay in the history."
        error={f.formState.errors.reason?.message}
        {...f.register('reason')}
      />
      {start.error && <ErrorBanner error={start.error} title="The regrade did not start" />}
      {progress.error && <ErrorBanner error={progress.error} title="The regrade's progress could not be read" />}
      {p && (
        <div className="flex flex-col gap-1 text-sm" data-testid="regrade-progress">
          <ProgressBar ready={p.done} failed={p.failed} total={p.total} label="Submissions scored again" />
          <p role="status" className="tabular text-xs text-muted">
            {p.state === 'finished' ? 'Finished: ' : 'Scoring again: '}
            {p.done} of {p.total} done{p.failed ? `, ${p.failed} could not be scored` : ''}.
          </p>
        </div>
      )}
      <div>
        <Button type="submit" variant="secondary" busy={start.isPending || running}>
          {submissionId ? 'Score this attempt again' : 'Score every submission again'}
        </Button>
      </div>
    </form>
  );
}
