import { useState, type FormEvent } from 'react';
import { useNavigate } from 'react-router';
import { joinCourseBody } from '../../../../shared/api';
import { Button } from '../../../components/Button';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { Field } from '../../../components/Field';
import { ApiError } from '../../../lib/http';
import { useJoinCourse } from '../api';

export function JoinCourseForm() {
  const [code, setCode] = useState('');
  const [error, setError] = useState<string>();
  const join = useJoinCourse();
  const navigate = useNavigate();

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = joinCourseBody.safeParse({ code: code.toUpperCase() });
    if (!parsed.success) {
      setError(parsed.error.issues[0]?.message);
      return;
    }
    setError(undefined);
    join.mutate(parsed.data, { onSuccess: (course) => navigate(`/courses/${course.id}`) });
  };

  const server = join.error instanceof ApiError ? join.error : null;
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-3">
      <Field
        label="Join code"
        name="code"
        autoComplete="off"
        spellCheck={false}
        placeholder="e.g. WORD-1234"
        hint="Your instructor hands this out. Letters and digits; case does not matter."
        value={code}
        onChange={(e) => setCode(e.target.value)}
        error={error ?? server?.fieldErrors.code}
        inputClassName="font-mono uppercase placeholder:normal-case"
      />
      {server && !server.fieldErrors.code && <ErrorBanner error={server} />}
      <div>
        <Button type="submit" busy={join.isPending}>
          {join.isPending ? 'Joining…' : 'Join course'}
        </Button>
      </div>
    </form>
  );
}
