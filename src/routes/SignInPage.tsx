import { Link } from 'react-router-dom';
import { SignInForm } from '../features/auth/components/SignInForm';

export function SignInPage() {
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
          <h1 className="mb-4 text-lg font-semibold">Sign in</h1>
          <SignInForm />
          <p className="mt-3 text-center text-sm">
            <Link to="/forgot-password" className="text-accent hover:underline">
              Forgot your password?
            </Link>
          </p>
        </div>
        <p className="mt-4 text-center text-sm text-muted">
          New to Modewright?{' '}
          <Link to="/sign-up" className="font-medium text-accent hover:underline">
            Create an account
          </Link>
        </p>
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
