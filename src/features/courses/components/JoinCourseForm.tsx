import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { useNavigate } from 'react-router-dom';
import { joinCourseBody } from '../../../../shared/api';
import { Button } from '../../../components/Button';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { Field } from '../../../components/Field';
import { hasServerFieldErrors, showServerFieldErrors } from '../../../lib/forms';
import { useJoinCourse } from '../api';

const fields = ['code'] as const;

export function JoinCourseForm() {
  const form = useForm({ resolver: zodResolver(joinCourseBody), defaultValues: { code: '' } });
  const { errors } = form.formState;
  const join = useJoinCourse();
  const navigate = useNavigate();

  const onSubmit = form.handleSubmit(({ code }) =>
    join.mutate(
      { code: code.toUpperCase() },
      {
        onSuccess: (course) => navigate(`/courses/${course.id}`),
        onError: (err) => showServerFieldErrors(err, form.setError, fields),
      },
    ),
  );

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-3">
      <Field
        label="Join code"
        autoComplete="off"
        spellCheck={false}
        placeholder="e.g. WORD-1234"
        hint="Your instructor hands this out. Letters and digits; case does not matter."
        {...form.register('code')}
        error={errors.code?.message}
        inputClassName="font-mono uppercase placeholder:normal-case"
      />
      {join.error && !hasServerFieldErrors(join.error, fields) && <ErrorBanner error={join.error} />}
      <div>
        <Button type="submit" busy={join.isPending}>
          {join.isPending ? 'Joining…' : 'Join course'}
        </Button>
      </div>
    </form>
  );
}
