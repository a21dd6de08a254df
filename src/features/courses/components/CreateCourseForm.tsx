import { useState, type FormEvent } from 'react';
import { useNavigate } from 'react-router';
import { createCourseBody } from '../../../../shared/api';
import { Button } from '../../../components/Button';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { Field } from '../../../components/Field';
import { fieldErrorsOf } from '../../../lib/forms';
import { ApiError } from '../../../lib/http';
import { useCreateCourse } from '../api';

export function CreateCourseForm() {
  const [title, setTitle] = useState('');
  const [code, setCode] = useState('');
  const [term, setTerm] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const create = useCreateCourse();
  const navigate = useNavigate();

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = createCourseBody.safeParse({ title, code, term });
    if (!parsed.success) {
      setErrors(fieldErrorsOf(parsed.error));
      return;
    }
    setErrors({});
    create.mutate(parsed.data, { onSuccess: (course) => navigate(`/courses/${course.id}`) });
  };

  const server = create.error instanceof ApiError ? create.error.fieldErrors : {};
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-3">
      <Field label="Title" name="title" value={title} onChange={(e) => setTitle(e.target.value)} error={errors.title ?? server.title} />
      <div className="grid grid-cols-2 gap-3">
        <Field
          label="Course code"
          name="code"
          hint="As in your timetable"
          value={code}
          onChange={(e) => setCode(e.target.value)}
          error={errors.code ?? server.code}
        />
        <Field label="Term" name="term" hint="e.g. Autumn 2027" value={term} onChange={(e) => setTerm(e.target.value)} error={errors.term ?? server.term} />
      </div>
      {create.error && Object.keys(server).length === 0 && <ErrorBanner error={create.error} title="The course was not created" />}
      <div>
        <Button type="submit" busy={create.isPending}>
          {create.isPending ? 'Creating…' : 'Create course'}
        </Button>
      </div>
    </form>
  );
}
