import type { QueryClient } from '@tanstack/react-query';
import { useMemo } from 'react';
import { createBrowserRouter, Outlet, RouterProvider } from 'react-router-dom';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { toRoute } from '@/app/route-module';
import { RouteErrorPage } from '@/app/routes/route-error';

export function createAppRouter(queryClient: QueryClient) {
  const convert = toRoute(queryClient);
  return createBrowserRouter([
    {
      path: paths.home.path,
      Component: Outlet,
      HydrateFallback: () => <PageLoader label="Opening Phasewright" />,
      ErrorBoundary: RouteErrorPage,
      children: [
        { path: paths.auth.signIn.path, lazy: () => import('@/app/routes/auth/sign-in').then(convert) },
        { path: paths.auth.signUp.path, lazy: () => import('@/app/routes/auth/sign-up').then(convert) },
        { path: paths.auth.forgotPassword.path, lazy: () => import('@/app/routes/auth/forgot-password').then(convert) },
        { path: paths.auth.resetPassword.path, lazy: () => import('@/app/routes/auth/reset-password').then(convert) },
        { path: paths.auth.welcome.path, lazy: () => import('@/app/routes/auth/welcome').then(convert) },
        // A share link shows one run read-only, without the app's chrome or an account.
        { path: paths.shared.path, lazy: () => import('@/app/routes/shared/shared-run').then(convert) },
        // The design report prints without the app's chrome, so it sits outside the app layout.
        { path: paths.projects.runReport.path, lazy: () => import('@/app/routes/report/run-report').then(convert) },
        {
          lazy: () => import('@/app/routes/app/root').then(convert),
          children: [
            { index: true, lazy: () => import('@/app/routes/app/dashboard').then(convert) },
            {
              path: paths.projects.detail.path,
              lazy: () => import('@/app/routes/app/project/project-layout').then(convert),
              children: [
                { index: true, lazy: () => import('@/app/routes/app/project/overview').then(convert) },
                { path: 'members', lazy: () => import('@/app/routes/app/project/members').then(convert) },
                { path: 'design', lazy: () => import('@/app/routes/app/project/design').then(convert) },
                { path: 'revisions', lazy: () => import('@/app/routes/app/project/revisions').then(convert) },
                { path: 'revisions/compare', lazy: () => import('@/app/routes/app/project/compare-revisions').then(convert) },
                { path: 'runs', lazy: () => import('@/app/routes/app/project/runs').then(convert) },
                { path: 'runs/compare', lazy: () => import('@/app/routes/app/project/compare-runs').then(convert) },
                { path: 'runs/:runId', lazy: () => import('@/app/routes/app/project/run').then(convert) },
                { path: 'runs/:runId/layout', lazy: () => import('@/app/routes/app/project/run-layout').then(convert) },
                { path: 'atom-libraries', lazy: () => import('@/app/routes/app/project/atom-libraries').then(convert) },
                { path: 'atom-libraries/builds/:buildId', lazy: () => import('@/app/routes/app/project/library-build').then(convert) },
                { path: 'atom-libraries/:libraryId', lazy: () => import('@/app/routes/app/project/atom-library').then(convert) },
              ],
            },
            { path: paths.settings.path, lazy: () => import('@/app/routes/app/settings').then(convert) },
            { path: paths.admin.path, lazy: () => import('@/app/routes/app/admin').then(convert) },
            { path: paths.audit.path, lazy: () => import('@/app/routes/app/audit').then(convert) },
          ],
        },
        { path: '*', lazy: () => import('@/app/routes/not-found').then(convert) },
      ],
    },
  ]);
}

export function AppRouter({ queryClient }: { queryClient: QueryClient }) {
  const router = useMemo(() => createAppRouter(queryClient), [queryClient]);
  return <RouterProvider router={router} />;
}
