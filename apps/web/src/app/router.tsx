import { lazy, Suspense } from 'react';
import { createBrowserRouter, Outlet, RouterProvider } from 'react-router-dom';
import { AppShell } from '../components/layout/app-shell';
import { ScreenPending } from '../components/layout/screen-pending';
import { paths } from '../config/paths';
import { HomeForRole, RequireRole } from '../features/auth/components/require-role';
import { SignedOutPage, SignInPage } from '../features/auth/components/sign-in-page';
import { UsersAdmin } from '../features/auth/components/users-admin';
import { SCREEN_ACCESS } from '../features/auth/permissions';
import { StatusPage } from '../features/health/components/status-page';

const Caseload = lazy(() =>
  import('../features/caseload/components/caseload-screen').then((m) => ({
    default: m.CaseloadScreen,
  })),
);
function LazyCaseload() {
  return (
    <Suspense fallback={<p className="text-slate-600">Loading the caseload…</p>}>
      <Caseload />
    </Suspense>
  );
}

const router = createBrowserRouter([
  {
    path: '/',
    element: <AppShell />,
    children: [
      {
        index: true,
        element: <HomeForRole clinical={<LazyCaseload />} />,
      },
      {
        element: (
          <RequireRole allow={SCREEN_ACCESS.patients}>
            <Outlet />
          </RequireRole>
        ),
        children: [
          {
            path: paths.patients.path,
            lazy: () =>
              import('../features/patients/components/patients-screen').then((m) => ({
                Component: m.PatientsScreen,
              })),
          },
          {
            path: paths.patient.path,
            lazy: () =>
              import('../features/patients/components/patient-screen').then((m) => ({
                Component: m.PatientScreen,
              })),
          },
        ],
      },
      {
        // Courses: clinical staff, and trainees for teaching cases (the API scopes what they get).
        path: paths.course.path,
        element: (
          <RequireRole allow={SCREEN_ACCESS.teaching}>
            <Outlet />
          </RequireRole>
        ),
        children: [
          {
            lazy: () =>
              import('../features/courses/components/course-layout').then((m) => ({
                Component: m.CourseLayout,
              })),
            children: [
              {
                index: true,
                lazy: () =>
                  import('../features/courses/components/course-record').then((m) => ({
                    Component: m.CourseRecord,
                  })),
              },
              {
                path: 'fit',
                lazy: () =>
                  import('../features/fit/components/fit-screen').then((m) => ({
                    Component: m.FitScreen,
                  })),
              },
              {
                path: 'regimens',
                lazy: () =>
                  import('../features/regimens/components/regimen-explorer').then((m) => ({
                    Component: m.RegimenExplorer,
                  })),
              },
              {
                path: 'import',
                lazy: () =>
                  import('../features/imports/components/import-screen').then((m) => ({
                    Component: m.ImportScreen,
                  })),
              },
              {
                path: 'plans/:planId',
                lazy: () =>
                  import('../features/plans/components/plan-screen').then((m) => ({
                    Component: m.PlanScreen,
                  })),
              },
            ],
          },
        ],
      },
      {
        path: paths.reviews.path,
        element: (
          <RequireRole allow={SCREEN_ACCESS.reviews}>
            <Outlet />
          </RequireRole>
        ),
        children: [
          {
            index: true,
            lazy: () =>
              import('../features/reviews/components/review-queue').then((m) => ({
                Component: m.ReviewQueue,
              })),
          },
          {
            path: ':planId',
            lazy: () =>
              import('../features/reviews/components/countersign-screen').then((m) => ({
                Component: m.CountersignScreen,
              })),
          },
        ],
      },
      {
        path: paths.teaching.path,
        element: (
          <RequireRole allow={[...SCREEN_ACCESS.teaching, 'admin']}>
            <Outlet />
          </RequireRole>
        ),
        children: [
          {
            index: true,
            lazy: () =>
              import('../features/teaching/components/teaching-list').then((m) => ({
                Component: m.TeachingList,
              })),
          },
          {
            path: ':caseId',
            lazy: () =>
              import('../features/teaching/components/teaching-case-screen').then((m) => ({
                Component: m.TeachingCaseScreen,
              })),
          },
        ],
      },
      {
        path: paths.drugModels.path,
        element: (
          <RequireRole allow={SCREEN_ACCESS.drugModels}>
            <Outlet />
          </RequireRole>
        ),
        children: [
          {
            index: true,
            lazy: () =>
              import('../features/drug-models/components/drug-models-screen').then((m) => ({
                Component: m.DrugModelsScreen,
              })),
          },
          {
            path: ':modelId',
            lazy: () =>
              import('../features/drug-models/components/drug-model-screen').then((m) => ({
                Component: m.DrugModelScreen,
              })),
          },
        ],
      },
      {
        path: paths.audit.path,
        element: (
          <RequireRole allow={SCREEN_ACCESS.audit}>
            <Outlet />
          </RequireRole>
        ),
        children: [
          {
            index: true,
            lazy: () =>
              import('../features/audit/components/audit-screen').then((m) => ({
                Component: m.AuditScreen,
              })),
          },
        ],
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
