import { Link } from 'react-router-dom';
import { PageHeader } from './PageHeader';

export function NotFoundPage() {
  return (
    <div className="max-w-prose">
      <PageHeader title="No page here" />
      <p className="text-sm">
        The address may be mistyped or out of date.{' '}
        <Link to="/" className="text-accent underline">
          Go to your courses
        </Link>
        .
      </p>
    </div>
  );
}
