import { ApiError } from '../lib/http';

/** A readable error: the server's message, or a plain one for anything else. */
export function ErrorBanner({ error, title }: { error: unknown; title?: string }) {
  if (!error) return null;
  const message =
    error instanceof ApiError ? error.message : error instanceof Error ? error.message : 'Something went wrong. Try again.';
  return (
    <div role="alert" className="flex gap-2.5 rounded-md border border-danger/40 bg-danger-soft px-3.5 py-2.5 text-sm text-danger">
      <span aria-hidden="true" className="mt-px font-semibold">
        !
      </span>
      <div>
        {title && <p className="font-semibold">{title}</p>}
        <p>{message}</p>
      </div>
    </div>
  );
}

/** A short success note, announced politely. */
export function Notice({ children }: { children: React.ReactNode }) {
  return (
    <p role="status" className="rounded-md border border-ok/30 bg-ok-soft px-3.5 py-2 text-sm text-ok">
      {children}
    </p>
  );
}
