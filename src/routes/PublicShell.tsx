import type { ReactNode } from 'react';
import { Link } from 'react-router-dom';

/**
 * The frame of the pages reachable when signed out: the mark, one card, and a line under it
 * (by default a way back to sign-in).
 */
export function PublicShell({
  title,
  children,
  below = (
    <p className="mt-4 text-center text-sm text-muted">
      <Link to="/" className="text-accent hover:underline">
        ← Back to sign-in
      </Link>
    </p>
  ),
}: {
  title: string;
  children: ReactNode;
  below?: ReactNode;
}) {
  return (
    <main id="main" className="flex min-h-screen items-center justify-center px-4 py-12">
      <div className="w-full max-w-sm">
        <div className="mb-6 text-center">
          <p className="text-2xl font-semibold tracking-tight text-ink">
            <Mark /> Modewright
          </p>
          <p className="mt-1 text-sm text-muted">Assignments and spectra for data-driven dynamics courses</p>
        </div>
        <div className="rounded-lg border border-line bg-surface-raised p-6 shadow-[0_1px_0_rgba(21,57,60,0.06)]">
          <h1 className="mb-4 text-lg font-semibold">{title}</h1>
          {children}
        </div>
        {below}
      </div>
    </main>
  );
}

/** The product mark: a circle with a point on it (an eigenvalue on the unit circle). */
export function Mark({ className = 'h-[1em] w-[1em]' }: { className?: string }) {
  return (
    <svg viewBox="0 0 24 24" aria-hidden="true" className={`inline-block -translate-y-px align-middle ${className}`}>
      <circle cx="12" cy="12" r="8.5" fill="none" stroke="currentColor" strokeWidth="1.8" />
      <line x1="2" y1="12" x2="22" y2="12" stroke="currentColor" strokeWidth="1" opacity="0.45" />
      <circle cx="18.01" cy="6" r="2.6" fill="var(--color-accent)" />
    </svg>
  );
}
