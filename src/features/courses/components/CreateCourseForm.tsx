import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { useNavigate } from 'react-router-dom';
import { createCourseBody } from '../../../../shared/api';
import { Button } from '../../../components/Button';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { Field } from '../../../components/Field';
import { hasServerFieldErrors, showServerFieldErrors } from '../../../lib/forms';
import { useCreateCourse } from '../api';

const fields = ['title', 'code', 'term'] as const;

export function CreateCourseForm() {
  const form = useForm({ resolver: zodResolver(createCourseBody), defaultValues: { title: '', code: '', term: '' } });
  const { errors } = form.formState;
  const create = useCreateCourse();
  const navigate = useNavigate();

  const onSubmit = form.handleSubmit((data) =>
    create.mutate(data, {
      onSuccess: (course) => navigate(`/courses/${course.id}`),
      // e.g. 409 "You already teach DDS-301 in Winter 2027" next to the code.
      onError: (err) => showServerFieldErrors(err, form.setError, fields),
    }),
  );

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-3">
      <Field label="Title" {...form.register('title')} error={errors.title?.message} />
      <div className="grid grid-cols-2 gap-3">
        <Field label="Course code" hint="As in your timetable" {...form.register('code')} error={errors.code?.message} />
        <Field label="Term" hint="e.g. Autumn 2027" {...form.register('term')} error={errors.term?.message} />
      </div>
      {create.error && !hasServerFieldErrors(create.error, fields) && <ErrorBanner error={create.error} title="The course was not created" />}
      <div>
        <Button type="submit" busy={create.isPending}>
          {create.isPending ? 'Creating…' : 'Create course'}
        </Button>
      </div>
    </form>
  );
}
