import { zodResolver } from '@hookform/resolvers/zod';
import { useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { extensionBody } from '../../../../shared/submission';
import { Button } from '../../../components/Button';
import { ConfirmDialog, InputField, SelectField } from '../../../components/inputs';
import { ErrorBanner, Notice } from '../../../components/ErrorBanner';
import { formatDateTime } from '../../../lib/format';
import { formatInZone, isoToZonedWall, zonedWallToIso } from '../../../lib/timezones';
import { useDashboard, useGrantExtension, useRelease } from '../api';

/** The extension form: the body's own fields, with the due date as wall time in the course's zone. */
const extensionForm = extensionBody.omit({ dueAt: true, userId: true }).extend({
  userId: z.coerce.number<string>().int().positive('Pick a student'),
  local: z.string().regex(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}/, 'Pick a date and a time'),
});
type ExtensionForm = z.input<typeof extensionForm>;
type ExtensionValues = z.output<typeof extensionForm>;

/** Instructor: give one student a later due date, read in the course's time zone. */
export function ExtensionForm({ courseId, assignmentId, students, timeZone, dueAt }: { courseId: number; assignmentId: number; students: { id: number; displayName: string }[]; timeZone: string; dueAt: string }) {
  const grant = useGrantExtension(courseId, assignmentId);
  const [done, setDone] = useState<string | null>(null);
  const f = useForm<ExtensionForm, unknown, ExtensionValues>({ resolver: zodResolver(extensionForm), defaultValues: { userId: '', local: isoToZonedWall(dueAt, timeZone), comment: '' } });
  const onSubmit = f.handleSubmit((v) => {
    const iso = zonedWallToIso(v.local, timeZone);
    if (!iso) return f.setError('local', { message: 'Pick a date and a time' });
    if (Date.parse(iso) <= Date.parse(dueAt)) return f.setError('local', { message: 'An extension moves the due date later than it is now' });
    const body = extensionBody.parse({ userId: v.userId, dueAt: iso, comment: v.comment ?? '' });
    const who = students.find((s) => s.id === body.userId)?.displayName ?? 'The student';
    setDone(null);
    grant.mutate(body, { onSuccess: () => setDone(`${who} may now hand in until ${formatInZone(iso, timeZone)}.`) });
  });
  if (students.length === 0) return <p className="text-sm text-muted">No students are enrolled yet.</p>;
  return (
    <form noValidate onSubmit={onSubmit} className="flex flex-col gap-3" aria-label="Extension">
      <div className="flex flex-wrap items-start gap-3">
        <SelectField label="Student" error={f.formState.errors.userId?.message} options={[['', 'Pick a student…'], ...students.map((s) => [String(s.id), s.displayName] as const)]} {...f.register('userId')} />
        <InputField label="New due date" type="datetime-local" suffix={timeZone} error={f.formState.errors.local?.message} {...f.register('local')} />
      </div>
      <InputField label="Note (optional)" wide hint="Kept in the audit log." {...f.register('comment')} />
      {grant.error && <ErrorBanner error={grant.error} title="The extension was not granted" />}
      {done && !grant.error && <Notice>{done}</Notice>}
      <div>
        <Button type="submit" variant="secondary" busy={grant.isPending}>
          Grant the extension
        </Button>
      </div>
    </form>
  );
}

/** Instructor: release the assignment's scores; each student gets an e-mail with their score and per-part breakdown. */
export function ReleasePanel({ courseId, assignmentId }: { courseId: number; assignmentId: number }) {
  const dash = useDashboard(courseId);
  const release = useRelease(courseId, assignmentId);
  const [ask, setAsk] = useState(false);
  const result = useRef<{ releasedAt: string; messages: number } | null>(null);
  const row = dash.data?.assignments.find((a) => a.id === assignmentId);
  const released = row?.released ?? false;
  const waiting = row ? row.waitingForReview : 0;
  return (
    <div className="flex flex-col gap-2 text-sm">
      {released ? (
        <p>
          <span aria-hidden="true">✓ </span>Scores are released: students see their final scores, their reference values and the per-part breakdown, and can ask for a second look.
        </p>
      ) : (
        <p>
          Until you release them, every score is provisional and students see only what the feedback policy allows.
          {row && ` ${row.scored} of ${row.students} students have a score.`}
          {waiting > 0 && ` ${waiting} submission${waiting === 1 ? ' waits' : 's wait'} for review.`}
        </p>
      )}
      {result.current && !release.error && (
        <Notice>
          Released {formatDateTime(result.current.releasedAt)}: {result.current.messages} e-mail{result.current.messages === 1 ? '' : 's'} on their way.
        </Notice>
      )}
      {release.error && <ErrorBanner error={release.error} title="The scores were not released" />}
      <div>
        <Button onClick={() => setAsk(true)} variant={released ? 'secondary' : 'primary'}>
          {released ? 'Release again…' : 'Release scores…'}
        </Button>
      </div>
      <ConfirmDialog
        open={ask}
        title="Release the scores and e-mail every student?"
        confirmLabel="Release and send the e-mails"
        busy={release.isPending}
        onCancel={() => setAsk(false)}
        onConfirm={() =>
          release.mutate(undefined, {
            onSuccess: (r) => {
              result.current = r;
            },
            onSettled: () => setAsk(false),
          })
        }
      >
        <p>
          An e-mail goes to every student who has a score{row ? ` (${row.scored} of ${row.students})` : ''}, with their score, the per-part breakdown and a link. Scores stop being provisional and students
          see their own reference values.
        </p>
        {waiting > 0 && (
          <p className="mt-2 font-medium">
            {waiting} submission{waiting === 1 ? ' still waits' : 's still wait'} for review: their current points go out as they are.
          </p>
        )}
        {released && <p className="mt-2">The scores were released before; releasing again sends the current scores.</p>}
      </ConfirmDialog>
    </div>
  );
}
