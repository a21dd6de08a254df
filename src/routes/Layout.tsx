import { Link, NavLink, Outlet, useLocation, useOutletContext } from 'react-router-dom';
import type { UserSummary } from '../../shared/api';
import { Button } from '../components/Button';
import { ErrorBanner } from '../components/ErrorBanner';
import { useSignOut } from '../features/auth/api';
import { Mark } from './PublicShell';

const navClass = ({ isActive }: { isActive: boolean }) =>
  `rounded-md px-2.5 py-1.5 text-sm ${isActive ? 'bg-surface-sunken font-medium text-ink' : 'text-muted hover:text-ink'}`;

export function Layout({ user }: { user: UserSummary }) {
  const signOut = useSignOut();
  const { pathname } = useLocation();
  return (
    <div className="flex min-h-screen flex-col">
      <a
        href="#main"
        className="sr-only focus:not-sr-only focus:fixed focus:top-2 focus:left-2 focus:z-50 focus:rounded-md focus:bg-ink focus:px-3 focus:py-2 focus:text-white"
      >
        Skip to main content
      </a>
      <header className="border-b border-line bg-surface-raised">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-2.5 sm:px-6">
          <Link to="/" className="text-lg font-semibold tracking-tight text-ink">
            <Mark /> Modewright
          </Link>
          <nav aria-label="Main" className="flex items-center gap-1">
            <NavLink to="/" className={() => navClass({ isActive: pathname === '/' || pathname.startsWith('/courses') })}>
              Courses
            </NavLink>
            <NavLink to="/account" className={navClass}>
              Account
            </NavLink>
            <NavLink to="/dev/mail" className={navClass}>
              Mail (development)
            </NavLink>
          </nav>
          <div className="ml-auto flex items-center gap-3">
            <span className="text-sm">
              <span className="sr-only">Signed in as </span>
              <span className="font-medium">{user.displayName}</span>
            </span>
            <Button variant="secondary" size="sm" busy={signOut.isPending} onClick={() => signOut.mutate()}>
              Sign out
            </Button>
          </div>
        </div>
      </header>
      {signOut.error && (
        <div className="mx-auto w-full max-w-6xl px-4 pt-3 sm:px-6">
          <ErrorBanner error={signOut.error} />
        </div>
      )}
      <main id="main" tabIndex={-1} className="mx-auto w-full max-w-6xl flex-1 px-4 py-6 outline-none sm:px-6 sm:py-8">
        <Outlet context={user} />
      </main>
      <footer className="border-t border-line">
        <p className="mx-auto max-w-6xl px-4 py-3 text-xs text-muted sm:px-6">Modewright · scores stay provisional until course staff release them</p>
      </footer>
    </div>
  );
}

/** The signed-in person, for pages rendered inside the layout. */
export function useCurrentUser(): UserSummary {
  return useOutletContext<UserSummary>();
}
