import { createBrowserRouter, RouterProvider } from 'react-router-dom';
import { AppShell } from '../components/layout/app-shell';
import { ScreenPending } from '../components/layout/screen-pending';
import { paths } from '../config/paths';
import { HomeForRole, RequireRole } from '../features/auth/components/require-role';
import { SignedOutPage, SignInPage } from '../features/auth/components/sign-in-page';
import { UsersAdmin } from '../features/auth/components/users-admin';
import { SCREEN_ACCESS } from '../features/auth/permissions';
import { StatusPage } from '../features/health/components/status-page';

const router = createBrowserRouter([
  {
    path: '/',
    element: <AppShell />,
    children: [
      {
        index: true,
        element: (
          <HomeForRole
            clinical={<ScreenPending title="Caseload" arrives="it comes with casework." />}
          />
        ),
      },
      {
        path: paths.patients.path,
        element: (
          <RequireRole allow={SCREEN_ACCESS.patients}>
            <ScreenPending title="Patients" arrives="it comes with casework." />
          </RequireRole>
        ),
      },
      {
        path: paths.reviews.path,
        element: (
          <RequireRole allow={SCREEN_ACCESS.reviews}>
            <ScreenPending title="Review queue" arrives="it comes with plans and sign-off." />
          </RequireRole>
        ),
      },
      {
        path: paths.teaching.path,
        element: (
          <RequireRole allow={SCREEN_ACCESS.teaching}>
            <ScreenPending title="Teaching cases" arrives="it comes with plans and sign-off." />
          </RequireRole>
        ),
      },
      {
        path: paths.drugModels.path,
        element: (
          <RequireRole allow={SCREEN_ACCESS.drugModels}>
            <ScreenPending title="Drug models" arrives="it comes with the kinetics engine." />
          </RequireRole>
        ),
      },
      {
        path: paths.audit.path,
        element: (
          <RequireRole allow={SCREEN_ACCESS.audit}>
            <ScreenPending title="Audit trail" arrives="it comes with plans and sign-off." />
          </RequireRole>
        ),
      },
      {
        path: paths.users.path,
        element: (
          <RequireRole allow={SCREEN_ACCESS.users}>
            <UsersAdmin />
          </RequireRole>
        ),
      },
      { path: paths.signIn.path, element: <SignInPage /> },
      { path: paths.signedOut.path, element: <SignedOutPage /> },
      { path: paths.status.path, element: <StatusPage /> },
      { path: '*', element: <ScreenPending title="Page not found" arrives="check the address." /> },
    ],
  },
]);

export function AppRouter() {
  return <RouterProvider router={router} />;
}
