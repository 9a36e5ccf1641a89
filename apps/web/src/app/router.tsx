import { createBrowserRouter, RouterProvider } from 'react-router-dom';
import { AppShell } from '../components/layout/app-shell';
import { ScreenPending } from '../components/layout/screen-pending';
import { paths } from '../config/paths';
import { StatusPage } from '../features/health/components/status-page';

const router = createBrowserRouter([
  {
    path: '/',
    element: <AppShell />,
    children: [
      {
        index: true,
        element: <ScreenPending title="Caseload" arrives="it comes with casework." />,
      },
      {
        path: paths.patients.path,
        element: <ScreenPending title="Patients" arrives="it comes with casework." />,
      },
      {
        path: paths.reviews.path,
        element: <ScreenPending title="Review queue" arrives="it comes with plans and sign-off." />,
      },
      {
        path: paths.teaching.path,
        element: (
          <ScreenPending title="Teaching cases" arrives="it comes with plans and sign-off." />
        ),
      },
      {
        path: paths.drugModels.path,
        element: <ScreenPending title="Drug models" arrives="it comes with the kinetics engine." />,
      },
      {
        path: paths.audit.path,
        element: <ScreenPending title="Audit trail" arrives="it comes with plans and sign-off." />,
      },
      { path: paths.status.path, element: <StatusPage /> },
      { path: '*', element: <ScreenPending title="Page not found" arrives="check the address." /> },
    ],
  },
]);

export function AppRouter() {
  return <RouterProvider router={router} />;
}
