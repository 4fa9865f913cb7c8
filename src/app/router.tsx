import type { FetchQueryOptions } from '@tanstack/react-query';
import type { ComponentType } from 'react';
import { createBrowserRouter, Navigate, type LoaderFunctionArgs, type RouteObject } from 'react-router';
import { AppShell } from '../components/layout/app-shell';
import { PageLoading } from '../components/ui/page';
import { paths } from '../config/paths';
import { adminQueries } from '../features/admin/api';
import { authQueries } from '../features/auth/api';
import { layoutQueries } from '../features/layout/api';
import { cutterQueries } from '../features/cutters/api';
import { driveDataQueries } from '../features/drive-data/api';
import { forecastQueries } from '../features/forecast/api';
import { projectQueries } from '../features/projects/api';
import { roundQueries } from '../features/rounds/api';
import { downtimeQueries, eventFiltersFrom, periodFrom } from '../features/downtime/api';
import { demandFiltersFrom, partQueries } from '../features/parts/api';
import { stopListStatus, stopPlanOverrides, stopQueries } from '../features/stops/api';
import { geologyQueries } from '../lib/geology-queries';
import { queryClient } from '../lib/query-client';
import { RouteError } from './route-error';

type Params = LoaderFunctionArgs['params'];
/** Any feature's queryOptions (their data types differ; the loader only starts them). */
type Prefetch = { queryKey: readonly unknown[] };
/**
 * What a page reads first, from the address's ids and its query text (read by the same function
 * the page uses, e.g. `stopPlanOverrides`, so the keys match): started together by its loader
 * (below), so the page does not wait for one query after another.
 */
type PageQueries = (params: Params, search: URLSearchParams) => Prefetch[];

/**
 * A page: its module loaded lazily (so the first load stays small) and, when it names them, its
 * queries started in parallel by a loader as soon as the address matches — without waiting for
 * them, so the page's own suspense shows the progress. Nothing is fetched for a visitor who is not
 * signed in (the AppShell sends them to sign in).
 */
function page(pattern: string, load: () => Promise<ComponentType>, queries?: PageQueries): RouteObject {
  return {
    path: pattern,
    lazy: async () => ({ Component: await load() }),
    loader: queries
      ? async ({ params, request }) => {
          // A failure here is the AppShell's to show ("could not reach its server").
          const me = await queryClient.ensureQueryData(authQueries.me()).catch(() => null);
          const search = new URL(request.url).searchParams;
          if (me) for (const q of queries(params, search)) void queryClient.prefetchQuery(q as FetchQueryOptions);
          return null;
        }
      : undefined,
  };
}

const project = (params: Params) => projectQueries.detail(params.projectId ?? '');
const withProject =
  (more: (projectId: string, params: Params, search: URLSearchParams) => Prefetch[]): PageQueries =>
  (params, search) => [project(params), ...more(params.projectId ?? '', params, search)];

/** The parts page's open tab (?tab=, the stock tab unless named) and what it reads first. */
function partsTabQueries(projectId: string, search: URLSearchParams): Prefetch[] {
  switch (search.get('tab')) {
    case 'orders':
      return [partQueries.orders(projectId)];
    case 'catalogue':
      return [partQueries.list(projectId)];
    case 'workshop':
      return [partQueries.workshop(projectId), partQueries.list(projectId)];
    default:
      return [partQueries.demand(projectId, demandFiltersFrom(search))];
  }
}

/** Every route; patterns come from `paths` (src/config/paths.ts), never written here. */
export const router = createBrowserRouter([
  {
    // One fallback for the first load of any page (React Router renders it while lazy modules and loaders run).
    HydrateFallback: PageLoading,
    children: [
      page(paths.signIn, async () => (await import('../features/auth/routes/sign-in')).SignInRoute),
      page(paths.requestReset, async () => (await import('../features/auth/routes/request-reset')).RequestResetRoute),
      page(paths.setPassword, async () => (await import('../features/auth/routes/set-password')).SetPasswordRoute),
      {
        path: paths.home,
        Component: AppShell,
        errorElement: <RouteError />,
        children: [
          {
            index: true,
            lazy: async () => ({ Component: (await import('../features/projects/routes/project-picker')).ProjectPickerRoute }),
          },
          page(paths.account, async () => (await import('../features/auth/routes/account')).AccountRoute),
          page(
            paths.project.pattern,
            async () => (await import('../features/projects/routes/project-home')).ProjectHomeRoute,
            withProject(() => []),
          ),
          page(
            paths.cutterhead.pattern,
            async () => (await import('../features/layout/routes/cutterhead')).CutterheadRoute,
            withProject((id) => [layoutQueries.list(id)]),
          ),
          page(
            paths.layout.pattern,
            async () => (await import('../features/layout/routes/layout')).LayoutRoute,
            withProject((id) => [layoutQueries.list(id)]),
          ),
          page(
            paths.position.pattern,
            async () => (await import('../features/layout/routes/position')).PositionRoute,
            withProject((id, p) => [layoutQueries.detail(id, p.positionId ?? '')]),
          ),
          page(
            paths.cutters.pattern,
            async () => (await import('../features/cutters/routes/cutters')).CuttersRoute,
            withProject(() => []),
          ),
          page(
            paths.cutter.pattern,
            async () => (await import('../features/cutters/routes/cutter')).CutterRoute,
            withProject((id, p) => [cutterQueries.detail(id, p.cutterId ?? '')]),
          ),
          page(
            paths.rounds.pattern,
            async () => (await import('../features/rounds/routes/rounds')).RoundsRoute,
            withProject((id) => [roundQueries.list(id)]),
          ),
          page(
            paths.round.pattern,
            async () => (await import('../features/rounds/routes/round')).RoundRoute,
            withProject((id, p) => [roundQueries.detail(id, p.roundId ?? '')]),
          ),
          page(
            paths.forecast.pattern,
            async () => (await import('../features/forecast/routes/forecast')).ForecastRoute,
            withProject((id) => [
              forecastQueries.forecast(id),
              geologyQueries.geology(id),
              geologyQueries.groundTypes(id),
              forecastQueries.settings(id),
            ]),
          ),
          page(
            paths.wearFits.pattern,
            async () => (await import('../features/forecast/routes/wear-fits')).WearFitsRoute,
            withProject((id) => [forecastQueries.wearFit(id)]),
          ),
          page(
            paths.advanceLog.pattern,
            async () => (await import('../features/drive-data/routes/advance-log')).AdvanceLogRoute,
            withProject((id) => [driveDataQueries.daily(id), driveDataQueries.mapping(id)]),
          ),
          page(
            paths.geology.pattern,
            async () => (await import('../features/drive-data/routes/geology')).GeologyRoute,
            withProject((id) => [geologyQueries.geology(id), geologyQueries.groundTypes(id)]),
          ),
          page(
            paths.parts.pattern,
            async () => (await import('../features/parts/routes/parts')).PartsRoute,
            withProject((id, _p, search) => partsTabQueries(id, search)),
          ),
          page(
            paths.downtime.pattern,
            async () => (await import('../features/downtime/routes/downtime-events')).DowntimeEventsRoute,
            withProject((id, _p, search) => [
              downtimeQueries.events(id, eventFiltersFrom(search).query),
              downtimeQueries.causes(id),
              downtimeQueries.settings(id),
            ]),
          ),
          page(
            paths.downtimeReport.pattern,
            async () => (await import('../features/downtime/routes/downtime-report')).DowntimeReportRoute,
            withProject((id, _p, search) => [downtimeQueries.report(id, periodFrom(search))]),
          ),
          page(
            paths.cutterCost.pattern,
            async () => (await import('../features/downtime/routes/cutter-cost')).CutterCostRoute,
            withProject((id, _p, search) => [downtimeQueries.cost(id, periodFrom(search))]),
          ),
          page(
            paths.stops.pattern,
            async () => (await import('../features/stops/routes/stops')).StopsRoute,
            withProject((id, _p, search) => [stopQueries.list(id, stopListStatus(search))]),
          ),
          page(
            paths.stopPlan.pattern,
            async () => (await import('../features/stops/routes/plan')).StopPlanRoute,
            withProject((id, _p, search) => [stopQueries.plan(id, stopPlanOverrides(search))]),
          ),
          page(
            paths.stop.pattern,
            async () => (await import('../features/stops/routes/stop')).StopRoute,
            withProject((id, p) => [stopQueries.detail(id, p.stopId ?? ''), stopQueries.crews(id), stopQueries.rounds(id)]),
          ),
          { path: paths.admin.home, element: <Navigate to={paths.admin.users} replace /> },
          page(
            paths.admin.users,
            async () => (await import('../features/admin/routes/users')).AdminUsersRoute,
            () => [adminQueries.users(), adminQueries.projects()],
          ),
          page(
            paths.admin.projects,
            async () => (await import('../features/admin/routes/projects')).AdminProjectsRoute,
            () => [adminQueries.projects()],
          ),
          page(
            paths.admin.jobs,
            async () => (await import('../features/admin/routes/jobs')).AdminJobsRoute,
            () => [adminQueries.jobs(), adminQueries.projects()],
          ),
          page(
            paths.admin.mail,
            async () => (await import('../features/admin/routes/mail')).AdminMailRoute,
            () => [adminQueries.mail(), adminQueries.projects()],
          ),
          { path: '*', element: <RouteError /> },
        ],
      },
    ],
  },
]);
