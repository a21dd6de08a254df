import { Link } from 'react-router-dom';
import { SignInForm } from '../features/auth/components/SignInForm';
import { PublicShell } from './PublicShell';

export function SignInPage() {
  return (
    <PublicShell
      title="Sign in"
      below={
        <p className="mt-4 text-center text-sm text-muted">
          New to Modewright?{' '}
          <Link to="/sign-up" className="font-medium text-accent hover:underline">
            Create an account
          </Link>
        </p>
      }
    >
      <SignInForm />
      <p className="mt-3 text-center text-sm">
        <Link to="/forgot-password" className="text-accent hover:underline">
          Forgot your password?
        </Link>
      </p>
    </PublicShell>
  );
}
