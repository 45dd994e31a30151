import type { QueryClient } from '@tanstack/react-query';
import type { ComponentType } from 'react';
import {
  createBrowserRouter,
  Outlet,
  redirect,
  RouterProvider,
  ScrollRestoration,
  type LoaderFunction,
  type LoaderFunctionArgs,
  type RouteObject,
} from 'react-router-dom';
import { ErrorPage } from '@/components/errors/error-page';
import { PageLoader } from '@/components/ui/spinner';
import { loginHref, paths } from '@/config/paths';
import { getMeQueryOptions, safeNextPath } from '@/lib/auth';
import { queryClient } from '@/lib/query-client';

/** A route module: a default-exported screen, and optionally a loader that prefetches its data. */
interface RouteModule {
  default: ComponentType;
  clientLoader?: (queryClient: QueryClient) => LoaderFunction;
}

/** Each screen is its own chunk, fetched the first time someone goes there. */
const lazy = (load: () => Promise<RouteModule>) => async () => {
  const module = await load();
  return {
    Component: module.default,
    ...(module.clientLoader ? { loader: module.clientLoader(queryClient) } : {}),
  };
};

async function requireUser({ request }: LoaderFunctionArgs) {
  const user = await queryClient.ensureQueryData(getMeQueryOptions());
  if (!user) {
    const url = new URL(request.url);
    throw redirect(loginHref(`${url.pathname}${url.search}`));
  }
  return null;
}

async function redirectIfSignedIn({ request }: LoaderFunctionArgs) {
  const user = await queryClient.ensureQueryData(getMeQueryOptions());
  if (user) throw redirect(safeNextPath(new URL(request.url).searchParams.get('next')) ?? paths.today);
  return null;
}

const Root = () => (
  <>
    <Outlet />
    <ScrollRestoration />
  </>
);

export const routes: RouteObject[] = [
  {
    id: 'root',
    element: <Root />,
    errorElement: <ErrorPage />,
    hydrateFallbackElement: (
      <div className="flex min-h-dvh items-center justify-center">
        <PageLoader />
      </div>
    ),
    children: [
      { path: paths.login, loader: redirectIfSignedIn, lazy: lazy(() => import('@/app/routes/auth/login')) },
      { path: paths.forgotPassword, lazy: lazy(() => import('@/app/routes/auth/forgot-password')) },
      { path: paths.resetPassword, lazy: lazy(() => import('@/app/routes/auth/reset-password')) },
      { path: paths.invitation, lazy: lazy(() => import('@/app/routes/auth/invitation')) },
      { path: paths.unlock, lazy: lazy(() => import('@/app/routes/auth/unlock')) },
      {
        id: 'app',
        path: paths.today,
        loader: requireUser,
        lazy: async () => ({ Component: (await import('@/components/layouts/app-frame')).AppFrame }),
        children: [
          {
            // Errors inside a screen keep the frame and its navigation around them.
            errorElement: <ErrorPage inFrame />,
            children: [
              { index: true, lazy: lazy(() => import('@/app/routes/today')) },
              { path: paths.profile.slice(1), lazy: lazy(() => import('@/app/routes/profile')) },
              {
                path: paths.members.slice(1),
                lazy: lazy(() => import('@/app/routes/members/members-layout')),
                children: [
                  { index: true, lazy: lazy(() => import('@/app/routes/members/members')) },
                  { path: 'outbox', lazy: lazy(() => import('@/app/routes/members/outbox')) },
                ],
              },
              { path: paths.cellar.slice(1), lazy: lazy(() => import('@/app/routes/cellar/cellar')) },
              { path: `${paths.cellar.slice(1)}/maintenance`, lazy: lazy(() => import('@/app/routes/cellar/maintenance')) },
              { path: `${paths.cellar.slice(1)}/:equipmentId`, lazy: lazy(() => import('@/app/routes/cellar/equipment')) },
              {
                path: paths.bookings.slice(1),
                lazy: lazy(() => import('@/app/routes/bookings/bookings-layout')),
                children: [
                  { index: true, lazy: lazy(() => import('@/app/routes/bookings/calendar')) },
                  { path: 'mine', lazy: lazy(() => import('@/app/routes/bookings/mine')) },
                  { path: 'all', lazy: lazy(() => import('@/app/routes/bookings/all')) },
                ],
              },
              { path: paths.batches.slice(1), lazy: lazy(() => import('@/app/routes/batches/batches')) },
              { path: `${paths.batches.slice(1)}/:batchId`, lazy: lazy(() => import('@/app/routes/batches/batch')) },
              { path: `${paths.batches.slice(1)}/:batchId/import`, lazy: lazy(() => import('@/app/routes/batches/import')) },
              { path: paths.productionRecords.slice(1), lazy: lazy(() => import('@/app/routes/batches/production-records')) },
              { path: paths.traceReport.slice(1), lazy: lazy(() => import('@/app/routes/batches/trace-report')) },
              { path: paths.settings.slice(1), lazy: lazy(() => import('@/app/routes/settings/settings')) },
              { path: paths.audit.slice(1), lazy: lazy(() => import('@/app/routes/audit/audit')) },
              {
                path: paths.sanitation.slice(1),
                lazy: lazy(() => import('@/app/routes/sanitation/sanitation-layout')),
                children: [
                  { index: true, lazy: lazy(() => import('@/app/routes/sanitation/vessels')) },
                  { path: 'log', lazy: lazy(() => import('@/app/routes/sanitation/log')) },
                  { path: 'audit', lazy: lazy(() => import('@/app/routes/sanitation/audit')) },
                ],
              },
              { path: `${paths.sanitation.slice(1)}/new`, lazy: lazy(() => import('@/app/routes/sanitation/new')) },
              {
                path: paths.kegs.slice(1),
                lazy: lazy(() => import('@/app/routes/kegs/kegs-layout')),
                children: [
                  { index: true, lazy: lazy(() => import('@/app/routes/kegs/whereabouts')) },
                  { path: 'overdue', lazy: lazy(() => import('@/app/routes/kegs/overdue')) },
                  { path: 'tap-board', lazy: lazy(() => import('@/app/routes/kegs/tap-board')) },
                ],
              },
              { path: `${paths.kegs.slice(1)}/:kegId`, lazy: lazy(() => import('@/app/routes/kegs/keg')) },
              { path: `${paths.kegs.slice(1)}/:kegId/carbonation`, lazy: lazy(() => import('@/app/routes/kegs/carbonation')) },
              { path: 'transfers/new', lazy: lazy(() => import('@/app/routes/transfers/new')) },
              {
                path: paths.billing.slice(1),
                lazy: lazy(() => import('@/app/routes/billing/billing-layout')),
                children: [
                  { index: true, lazy: lazy(() => import('@/app/routes/billing/overview')) },
                  { path: 'invoices', lazy: lazy(() => import('@/app/routes/billing/invoices')) },
                  { path: 'invoices/:invoiceId', lazy: lazy(() => import('@/app/routes/billing/invoice')) },
                  { path: 'run', lazy: lazy(() => import('@/app/routes/billing/run')) },
                  { path: 'prices', lazy: lazy(() => import('@/app/routes/billing/prices')) },
                  { path: 'exports', lazy: lazy(() => import('@/app/routes/billing/exports')) },
                  { path: 'my-invoices', lazy: lazy(() => import('@/app/routes/billing/my-invoices')) },
                  { path: 'my-invoices/:invoiceId', lazy: lazy(() => import('@/app/routes/billing/my-invoice')) },
                ],
              },
              { path: '*', lazy: lazy(() => import('@/app/routes/not-found')) },
            ],
          },
        ],
      },
    ],
  },
];

const router = createBrowserRouter(routes);

export const AppRouter = () => <RouterProvider router={router} />;
