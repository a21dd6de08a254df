import { Route, Routes } from 'react-router-dom';
import { ErrorBanner } from './components/ErrorBanner';
import { Loading } from './components/Loading';
import { useMe } from './features/auth/api';
import { AccountPage } from './routes/AccountPage';
import { AssignmentEditorPage } from './routes/AssignmentEditorPage';
import { AssignmentPage } from './routes/AssignmentPage';
import { StudentReferencePage } from './routes/StudentReferencePage';
import { CoursePage } from './routes/CoursePage';
import { CoursesPage } from './routes/CoursesPage';
import { DevMailPage } from './routes/DevMailPage';
import { Layout } from './routes/Layout';
import { NotFoundPage } from './routes/NotFoundPage';
import { InvitationPage, SignedInConfirmPage, SignedInResetPasswordPage, SignedOutRoutes } from './routes/AccountPages';
import { AuditPage } from './routes/AuditPage';
import { GradebookPage } from './routes/GradebookPage';
import { ReviewQueuePage } from './routes/ReviewQueuePage';

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
        <Route path="courses/:courseId/assignments/new" element={<AssignmentEditorPage />} />
        <Route path="courses/:courseId/assignments/:assignmentId" element={<AssignmentPage />} />
        <Route path="courses/:courseId/assignments/:assignmentId/edit" element={<AssignmentEditorPage />} />
        <Route path="courses/:courseId/assignments/:assignmentId/reference/:studentId" element={<StudentReferencePage />} />
        <Route path="courses/:courseId/audit" element={<AuditPage />} />
        <Route path="courses/:courseId/reviews" element={<ReviewQueuePage />} />
        <Route path="courses/:courseId/gradebook" element={<GradebookPage />} />
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
