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
import { onEntryOnly } from '@/app/loaders/prefetch';
import { ErrorPage } from '@/components/errors/error-page';
import { PageLoader } from '@/components/ui/spinner';
import { loginHref, paths } from '@/config/paths';
import { getMeQueryOptions, safeNextPath } from '@/lib/auth';
import { queryClient } from '@/lib/query-client';

/** A route module: a default-exported screen. */
interface RouteModule {
  default: ComponentType;
}

/**
 * Each screen is its own chunk, fetched the first time someone goes there. A screen with a loader (in
 * app/loaders, a chunk of its own) fetches its data at the same time as its code, not after it.
 */
const lazy = (load: () => Promise<RouteModule>, loader?: () => Promise<LoaderFunction>) => ({
  Component: async () => (await load()).default,
  ...(loader ? { loader } : {}),
});

/** The loaders' chunks, one per section. */
const loaders = {
  today: () => import('@/app/loaders/today'),
  cellar: () => import('@/app/loaders/cellar'),
  batches: () => import('@/app/loaders/batches'),
  kegs: () => import('@/app/loaders/kegs'),
  sanitation: () => import('@/app/loaders/sanitation'),
  billing: () => import('@/app/loaders/billing'),
  members: () => import('@/app/loaders/members'),
  bookings: () => import('@/app/loaders/bookings'),
  settings: () => import('@/app/loaders/settings'),
  audit: () => import('@/app/loaders/audit'),
};

/** A section with tabs: its layout at `path`, the screens under it. */
const section = (path: string, layout: () => Promise<RouteModule>, children: RouteObject[]) => ({ path: path.slice(1), lazy: lazy(layout), children });

/** A screen's route with its data fetched ahead by the loader `name` of a loaders chunk. */
const screen = <K extends string>(load: () => Promise<RouteModule>, from: () => Promise<Record<K, LoaderFunction>>, name: K) => ({
  lazy: lazy(load, async () => (await from())[name]),
  shouldRevalidate: onEntryOnly,
});

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
        lazy: { Component: async () => (await import('@/components/layouts/app-frame')).AppFrame },
        children: [
          {
            // Errors inside a screen keep the frame and its navigation around them.
            errorElement: <ErrorPage inFrame />,
            children: [
              { index: true, ...screen(() => import('@/app/routes/today'), loaders.today, 'todayLoader') },
              { path: paths.profile.slice(1), lazy: lazy(() => import('@/app/routes/profile')) },
              section(paths.members, () => import('@/app/routes/members/members-layout'), [
                { index: true, ...screen(() => import('@/app/routes/members/members'), loaders.members, 'membersLoader') },
                { path: 'outbox', ...screen(() => import('@/app/routes/members/outbox'), loaders.members, 'outboxLoader') },
              ]),
              { path: paths.cellar.slice(1), ...screen(() => import('@/app/routes/cellar/cellar'), loaders.cellar, 'cellarLoader') },
              { path: `${paths.cellar.slice(1)}/maintenance`, ...screen(() => import('@/app/routes/cellar/maintenance'), loaders.cellar, 'maintenanceLoader') },
              { path: `${paths.cellar.slice(1)}/:equipmentId`, ...screen(() => import('@/app/routes/cellar/equipment'), loaders.cellar, 'equipmentLoader') },
              section(paths.bookings, () => import('@/app/routes/bookings/bookings-layout'), [
                { index: true, ...screen(() => import('@/app/routes/bookings/calendar'), loaders.cellar, 'calendarLoader') },
                { path: 'mine', ...screen(() => import('@/app/routes/bookings/mine'), loaders.bookings, 'myBookingsLoader') },
                { path: 'all', ...screen(() => import('@/app/routes/bookings/all'), loaders.bookings, 'allBookingsLoader') },
              ]),
              { path: paths.batches.slice(1), ...screen(() => import('@/app/routes/batches/batches'), loaders.batches, 'batchesLoader') },
              { path: `${paths.batches.slice(1)}/:batchId`, ...screen(() => import('@/app/routes/batches/batch'), loaders.batches, 'batchLoader') },
              { path: `${paths.batches.slice(1)}/:batchId/import`, lazy: lazy(() => import('@/app/routes/batches/import')) },
              {
                path: paths.productionRecords.slice(1),
                ...screen(() => import('@/app/routes/batches/production-records'), loaders.batches, 'productionRecordsLoader'),
              },
              { path: paths.traceReport.slice(1), ...screen(() => import('@/app/routes/batches/trace-report'), loaders.batches, 'traceReportLoader') },
              { path: paths.settings.slice(1), ...screen(() => import('@/app/routes/settings/settings'), loaders.settings, 'settingsLoader') },
              { path: paths.audit.slice(1), ...screen(() => import('@/app/routes/audit/audit'), loaders.audit, 'auditLoader') },
              section(paths.sanitation, () => import('@/app/routes/sanitation/sanitation-layout'), [
                { index: true, ...screen(() => import('@/app/routes/sanitation/vessels'), loaders.sanitation, 'vesselsLoader') },
                { path: 'log', ...screen(() => import('@/app/routes/sanitation/log'), loaders.sanitation, 'cyclesLoader') },
                { path: 'audit', lazy: lazy(() => import('@/app/routes/sanitation/audit')) },
              ]),
              { path: `${paths.sanitation.slice(1)}/new`, lazy: lazy(() => import('@/app/routes/sanitation/new')) },
              section(paths.kegs, () => import('@/app/routes/kegs/kegs-layout'), [
                { index: true, ...screen(() => import('@/app/routes/kegs/whereabouts'), loaders.kegs, 'kegsLoader') },
                { path: 'overdue', ...screen(() => import('@/app/routes/kegs/overdue'), loaders.kegs, 'overdueLoader') },
                { path: 'tap-board', ...screen(() => import('@/app/routes/kegs/tap-board'), loaders.kegs, 'tapBoardLoader') },
              ]),
              { path: `${paths.kegs.slice(1)}/:kegId`, ...screen(() => import('@/app/routes/kegs/keg'), loaders.kegs, 'kegLoader') },
              { path: `${paths.kegs.slice(1)}/:kegId/carbonation`, lazy: lazy(() => import('@/app/routes/kegs/carbonation')) },
              { path: 'transfers/new', lazy: lazy(() => import('@/app/routes/transfers/new')) },
              section(paths.billing, () => import('@/app/routes/billing/billing-layout'), [
                { index: true, ...screen(() => import('@/app/routes/billing/overview'), loaders.billing, 'billingOverviewLoader') },
                { path: 'invoices', ...screen(() => import('@/app/routes/billing/invoices'), loaders.billing, 'invoicesLoader') },
                { path: 'invoices/:invoiceId', ...screen(() => import('@/app/routes/billing/invoice'), loaders.billing, 'invoiceLoader') },
                { path: 'run', lazy: lazy(() => import('@/app/routes/billing/run')) },
                { path: 'prices', lazy: lazy(() => import('@/app/routes/billing/prices')) },
                { path: 'exports', lazy: lazy(() => import('@/app/routes/billing/exports')) },
                { path: 'my-invoices', ...screen(() => import('@/app/routes/billing/my-invoices'), loaders.billing, 'myInvoicesLoader') },
                { path: 'my-invoices/:invoiceId', ...screen(() => import('@/app/routes/billing/my-invoice'), loaders.billing, 'invoiceLoader') },
              ]),
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
