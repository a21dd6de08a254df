import { lazy, Suspense } from 'react';
import { Route, Routes } from 'react-router-dom';
import { ErrorBanner } from './components/ErrorBanner';
import { Loading } from './components/Loading';
import { useMe } from './features/auth/api';
import { AccountPage } from './routes/AccountPage';
import { CoursePage } from './routes/CoursePage';
import { CoursesPage } from './routes/CoursesPage';
import { DevMailPage } from './routes/DevMailPage';
import { Layout } from './routes/Layout';
import { NotFoundPage } from './routes/NotFoundPage';
import { InvitationPage, SignedInConfirmPage, SignedInResetPasswordPage, SignedOutRoutes } from './routes/AccountPages';

const AssignmentEditorPage = lazy(() => import('./routes/AssignmentEditorPage').then((m) => ({ default: m.AssignmentEditorPage })));
const AssignmentPage = lazy(() => import('./routes/AssignmentPage').then((m) => ({ default: m.AssignmentPage })));
const StudentReferencePage = lazy(() => import('./routes/StudentReferencePage').then((m) => ({ default: m.StudentReferencePage })));
const AuditPage = lazy(() => import('./routes/AuditPage').then((m) => ({ default: m.AuditPage })));
const GradebookPage = lazy(() => import('./routes/GradebookPage').then((m) => ({ default: m.GradebookPage })));
const ReviewQueuePage = lazy(() => import('./routes/ReviewQueuePage').then((m) => ({ default: m.ReviewQueuePage })));
// Pages with the heavy parts (Markdown and KaTeX, plots, tables) load on first visit, so sign-in and the course list stay small.

/** A page loaded on first visit, with the layout kept while it arrives. */
const later = (page: React.ReactNode) => <Suspense fallback={<Loading what="the page" />}>{page}</Suspense>;

/** Signed out (401 from /api/auth/me) shows the sign-in page at whatever address was asked for, except the account pages (sign-up, links from e-mail). */
export function App() {
  const me = useMe();
  if (me.isPending) {
    return (
      <main id="main" className="mx-auto max-w-6xl px-6">
        <Loading what="Modewright" />
      </main>
    );
  }
  if (me.error) {
    return (
      <main id="main" className="mx-auto max-w-xl px-6 py-12">
        <ErrorBanner error={me.error} title="Modewright could not reach its server" />
        <p className="mt-3 text-sm text-muted">Reload the page in a moment.</p>
      </main>
    );
  }
  if (!me.data) return <SignedOutRoutes />;
  return (
    <Routes>
      <Route element={<Layout user={me.data} />}>
        <Route index element={<CoursesPage />} />
        <Route path="courses/:courseId" element={<CoursePage />} />
        <Route path="courses/:courseId/assignments/new" element={later(<AssignmentEditorPage />)} />
        <Route path="courses/:courseId/assignments/:assignmentId" element={later(<AssignmentPage />)} />
        <Route path="courses/:courseId/assignments/:assignmentId/edit" element={later(<AssignmentEditorPage />)} />
        <Route path="courses/:courseId/assignments/:assignmentId/reference/:studentId" element={later(<StudentReferencePage />)} />
        <Route path="courses/:courseId/audit" element={later(<AuditPage />)} />
        <Route path="courses/:courseId/reviews" element={later(<ReviewQueuePage />)} />
        <Route path="courses/:courseId/gradebook" element={later(<GradebookPage />)} />
        <Route path="invitation" element={<InvitationPage />} />
        <Route path="confirm" element={<SignedInConfirmPage />} />
        <Route path="reset-password" element={<SignedInResetPasswordPage />} />
        <Route path="account" element={<AccountPage />} />
        <Route path="dev/mail" element={<DevMailPage />} />
        <Route path="*" element={<NotFoundPage />} />
      </Route>
    </Routes>
  );
}
