import { createBrowserRouter } from 'react-router';
import { AppShell } from './app-shell.tsx';
import { RequireAuth, RequireRole } from './guards.tsx';
import { RouteError } from '../components/errors/route-error.tsx';
import { NotFound } from '../components/errors/not-found.tsx';
import { SignInPage } from '../features/auth/sign-in-page.tsx';
import { ChangePasswordPage } from '../features/auth/change-password-page.tsx';
import { HomePage } from '../features/home/home-page.tsx';
import { Spinner } from '../components/ui/feedback.tsx';
import { inventoryRoutes } from '../features/inventory/routes.tsx';

/**
 * Route table. The calculation page pulls in the metrology core (mf-parser, decimal.js), and the
 * users page is admin-only, so both load on demand and stay out of the first bundle.
 */
export const router = createBrowserRouter([
  { path: '/sign-in', Component: SignInPage, errorElement: <RouteError /> },
  {
    Component: RequireAuth,
    errorElement: <RouteError />,
    // Shown while a lazy page's code loads on the first visit (e.g. a reload on /calculate).
    HydrateFallback: () => <Spinner label="Loading Tarebook…" />,
    children: [
      {
        Component: AppShell,
        children: [
          { index: true, Component: HomePage },
          {
            path: 'calculate',
            lazy: async () => ({ Component: (await import('../features/calculate/calculate-page.tsx')).CalculatePage }),
          },
          {
            path: 'buoyancy',
            lazy: async () => ({ Component: (await import('../features/buoyancy/buoyancy-page.tsx')).BuoyancyPage }),
          },
          {
            path: 'preparations',
            children: [
              { index: true, lazy: async () => ({ Component: (await import('../features/preparations/preparations-page.tsx')).PreparationsPage }) },
              {
                element: <RequireRole roles={['chemist']} />,
                children: [{ path: 'new', lazy: async () => ({ Component: (await import('../features/preparations/plan-page.tsx')).PlanPage }) }],
              },
              { path: ':identifier', lazy: async () => ({ Component: (await import('../features/preparations/detail-page.tsx')).DetailPage }) },
              {
                element: <RequireRole roles={['chemist']} />,
                children: [{ path: ':identifier/verify', lazy: async () => ({ Component: (await import('../features/signatures/verify-page.tsx')).VerifyPage }) }],
              },
              {
                element: <RequireRole roles={['chemist', 'technician']} />,
                children: [{ path: ':identifier/bench', lazy: async () => ({ Component: (await import('../features/preparations/bench-page.tsx')).BenchPage }) }],
              },
              {
                element: <RequireRole roles={['chemist', 'technician', 'qa']} />,
                children: [{ path: ':identifier/print', lazy: async () => ({ Component: (await import('../features/printing/print-page.tsx')).PrintPage }) }],
              },
              {
                element: <RequireRole roles={['chemist']} />,
                children: [
                  { path: ':identifier/dilute', lazy: async () => ({ Component: (await import('../features/lineage/dilute-page.tsx')).DilutePage }) },
                  { path: ':identifier/series', lazy: async () => ({ Component: (await import('../features/lineage/series-page.tsx')).SeriesPage }) },
                ],
              },
            ],
          },
          {
            path: 'series',
            children: [
              { index: true, lazy: async () => ({ Component: (await import('../features/series/series-list-page.tsx')).SeriesListPage }) },
              { path: ':identifier', lazy: async () => ({ Component: (await import('../features/series/series-detail-page.tsx')).SeriesDetailPage }) },
            ],
          },
          {
            path: 'glassware',
            children: [
              { index: true, lazy: async () => ({ Component: (await import('../features/glassware/glassware-list-page.tsx')).GlasswareListPage }) },
              {
                element: <RequireRole roles={['chemist', 'technician']} />,
                children: [{ path: 'new', lazy: async () => ({ Component: (await import('../features/glassware/plan-page.tsx')).CheckPlanPage }) }],
              },
              { path: ':identifier', lazy: async () => ({ Component: (await import('../features/glassware/check-page.tsx')).CheckPage }) },
            ],
          },
          {
            path: 'mixes',
            element: <RequireRole roles={['chemist']} />,
            children: [{ path: 'new', lazy: async () => ({ Component: (await import('../features/mixes/mix-page.tsx')).MixPage }) }],
          },
          {
            path: 'trace',
            element: <RequireRole roles={['qa', 'admin', 'chemist']} />,
            children: [{ index: true, lazy: async () => ({ Component: (await import('../features/trace/trace-page.tsx')).TracePage }) }],
          },
          { path: 'account/password', Component: ChangePasswordPage },
          {
            path: 'sessions',
            element: <RequireRole roles={['qa', 'admin']} />,
            children: [{ index: true, lazy: async () => ({ Component: (await import('../features/sessions/sessions-page.tsx')).SessionsPage }) }],
          },
          {
            path: 'audit',
            element: <RequireRole roles={['qa', 'admin']} />,
            children: [{ index: true, lazy: async () => ({ Component: (await import('../features/audit/audit-page.tsx')).AuditPage }) }],
          },
          { path: 'inventory', children: inventoryRoutes },
          {
            path: 'admin',
            element: <RequireRole roles={['admin']} />,
            children: [
              {
                path: 'users',
                lazy: async () => ({ Component: (await import('../features/users/users-page.tsx')).UsersPage }),
              },
              { path: 'outbox', lazy: async () => ({ Component: (await import('../features/outbox/outbox-page.tsx')).OutboxPage }) },
              { path: 'settings', lazy: async () => ({ Component: (await import('../features/settings/settings-page.tsx')).SettingsPage }) },
              {
                path: 'label-templates',
                lazy: async () => ({ Component: (await import('../features/printing/label-templates-page.tsx')).LabelTemplatesPage }),
              },
            ],
          },
          { path: '*', Component: NotFound },
        ],
      },
    ],
  },
]);
