import type { FetchQueryOptions } from '@tanstack/react-query';
import type { ComponentType } from 'react';
import { createBrowserRouter, Navigate, type LoaderFunctionArgs, type RouteObject } from 'react-router';
import { PageLoading } from '../components/ui/page';
import { paths } from '../config/paths';
import { authQueries } from '../features/auth/api';
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
type PageQueries = (params: Params, search: URLSearchParams) => Promise<Prefetch[]>;

/**
 * Each feature's api module, imported by a loader only when one of its pages opens (decision 47):
 * the sign-in page's JavaScript carries no feature's queries or schemas. The page's own module
 * imports the same file, so the two share one chunk and load side by side.
 */
const api = {
  admin: () => import('../features/admin/api'),
  cutters: () => import('../features/cutters/api'),
  downtime: () => import('../features/downtime/api'),
  driveData: () => import('../features/drive-data/api'),
  forecast: () => import('../features/forecast/api'),
  geology: () => import('../lib/geology-queries'),
  layout: () => import('../features/layout/api'),
  parts: () => import('../features/parts/api'),
  projects: () => import('../features/projects/api'),
  rounds: () => import('../features/rounds/api'),
  stops: () => import('../features/stops/api'),
};

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
          const search = new URL(request.url).searchParams;
          const [me, first] = await Promise.all([
            // A failure here is the AppShell's to show ("could not reach its server").
            queryClient.ensureQueryData(authQueries.me()).catch(() => null),
            // The queries' module not loading is the page's own module failing too (it imports
            // it): the route's error shows that, so the loader only skips its head start.
            queries(params, search).catch(() => []),
          ]);
          if (me) for (const q of first) void queryClient.prefetchQuery(q as FetchQueryOptions);
          return null;
        }
      : undefined,
  };
}

/** A drive's page: the drive itself, then what `more` names from the drive's id and the address. */
const withProject =
  (more?: (projectId: string, params: Params, search: URLSearchParams) => Promise<Prefetch[]>): PageQueries =>
  async (params, search) => {
    const projectId = params.projectId ?? '';
    const [{ projectQueries }, rest] = await Promise.all([api.projects(), more ? more(projectId, params, search) : []]);
    return [projectQueries.detail(projectId), ...rest];
  };

/** The parts page's open tab (?tab=, the stock tab unless named) and what it reads first. */
async function partsTabQueries(projectId: string, search: URLSearchParams): Promise<Prefetch[]> {
  const { demandFiltersFrom, partQueries } = await api.parts();
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
        // The signed-in frame loads with the first signed-in page, not with the sign-in page.
        lazy: async () => ({ Component: (await import('../components/layout/app-shell')).AppShell }),
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
            withProject(),
          ),
          page(
            paths.cutterhead.pattern,
            async () => (await import('../features/layout/routes/cutterhead')).CutterheadRoute,
            withProject(async (id) => [(await api.layout()).layoutQueries.list(id)]),
          ),
          page(
            paths.layout.pattern,
            async () => (await import('../features/layout/routes/layout')).LayoutRoute,
            withProject(async (id) => [(await api.layout()).layoutQueries.list(id)]),
          ),
          page(
            paths.position.pattern,
            async () => (await import('../features/layout/routes/position')).PositionRoute,
            withProject(async (id, p) => [(await api.layout()).layoutQueries.detail(id, p.positionId ?? '')]),
          ),
          page(paths.cutters.pattern, async () => (await import('../features/cutters/routes/cutters')).CuttersRoute, withProject()),
          page(
            paths.cutter.pattern,
            async () => (await import('../features/cutters/routes/cutter')).CutterRoute,
            withProject(async (id, p) => [(await api.cutters()).cutterQueries.detail(id, p.cutterId ?? '')]),
          ),
          page(
            paths.rounds.pattern,
            async () => (await import('../features/rounds/routes/rounds')).RoundsRoute,
            withProject(async (id) => [(await api.rounds()).roundQueries.list(id)]),
          ),
          page(
            paths.round.pattern,
            async () => (await import('../features/rounds/routes/round')).RoundRoute,
            withProject(async (id, p) => [(await api.rounds()).roundQueries.detail(id, p.roundId ?? '')]),
          ),
          page(
            paths.forecast.pattern,
            async () => (await import('../features/forecast/routes/forecast')).ForecastRoute,
            withProject(async (id) => {
              const [{ forecastQueries }, { geologyQueries }] = await Promise.all([api.forecast(), api.geology()]);
              return [
                forecastQueries.forecast(id),
                geologyQueries.geology(id),
                geologyQueries.groundTypes(id),
                forecastQueries.settings(id),
              ];
            }),
          ),
          page(
            paths.wearFits.pattern,
            async () => (await import('../features/forecast/routes/wear-fits')).WearFitsRoute,
            withProject(async (id) => [(await api.forecast()).forecastQueries.wearFit(id)]),
          ),
          page(
            paths.advanceLog.pattern,
            async () => (await import('../features/drive-data/routes/advance-log')).AdvanceLogRoute,
            withProject(async (id) => {
              const { driveDataQueries } = await api.driveData();
              return [driveDataQueries.daily(id), driveDataQueries.mapping(id)];
            }),
          ),
          page(
            paths.geology.pattern,
            async () => (await import('../features/drive-data/routes/geology')).GeologyRoute,
            withProject(async (id) => {
              const { geologyQueries } = await api.geology();
              return [geologyQueries.geology(id), geologyQueries.groundTypes(id)];
            }),
          ),
          page(
            paths.parts.pattern,
            async () => (await import('../features/parts/routes/parts')).PartsRoute,
            withProject((id, _p, search) => partsTabQueries(id, search)),
          ),
          page(
            paths.downtime.pattern,
            async () => (await import('../features/downtime/routes/downtime-events')).DowntimeEventsRoute,
            withProject(async (id, _p, search) => {
              const { downtimeQueries, eventFiltersFrom } = await api.downtime();
              return [downtimeQueries.events(id, eventFiltersFrom(search).query), downtimeQueries.causes(id), downtimeQueries.settings(id)];
            }),
          ),
          page(
            paths.downtimeReport.pattern,
            async () => (await import('../features/downtime/routes/downtime-report')).DowntimeReportRoute,
            withProject(async (id, _p, search) => {
              const { downtimeQueries, periodFrom } = await api.downtime();
              return [downtimeQueries.report(id, periodFrom(search))];
            }),
          ),
          page(
            paths.cutterCost.pattern,
            async () => (await import('../features/downtime/routes/cutter-cost')).CutterCostRoute,
            withProject(async (id, _p, search) => {
              const { downtimeQueries, periodFrom } = await api.downtime();
              return [downtimeQueries.cost(id, periodFrom(search))];
            }),
          ),
          page(
            paths.stops.pattern,
            async () => (await import('../features/stops/routes/stops')).StopsRoute,
            withProject(async (id, _p, search) => {
              const { stopListStatus, stopQueries } = await api.stops();
              return [stopQueries.list(id, stopListStatus(search))];
            }),
          ),
          page(
            paths.stopPlan.pattern,
            async () => (await import('../features/stops/routes/plan')).StopPlanRoute,
            withProject(async (id, _p, search) => {
              const { stopPlanOverrides, stopQueries } = await api.stops();
              return [stopQueries.plan(id, stopPlanOverrides(search))];
            }),
          ),
          page(
            paths.stop.pattern,
            async () => (await import('../features/stops/routes/stop')).StopRoute,
            withProject(async (id, p) => {
              const { stopQueries } = await api.stops();
              return [stopQueries.detail(id, p.stopId ?? ''), stopQueries.crews(id), stopQueries.rounds(id)];
            }),
          ),
          { path: paths.admin.home, element: <Navigate to={paths.admin.users} replace /> },
          page(
            paths.admin.users,
            async () => (await import('../features/admin/routes/users')).AdminUsersRoute,
            async () => {
              const { adminQueries } = await api.admin();
              return [adminQueries.users(), adminQueries.projects()];
            },
          ),
          page(
            paths.admin.projects,
            async () => (await import('../features/admin/routes/projects')).AdminProjectsRoute,
            async () => [(await api.admin()).adminQueries.projects()],
          ),
          page(
            paths.admin.jobs,
            async () => (await import('../features/admin/routes/jobs')).AdminJobsRoute,
            async () => {
              const { adminQueries } = await api.admin();
              return [adminQueries.jobs(), adminQueries.projects()];
            },
          ),
          page(
            paths.admin.mail,
            async () => (await import('../features/admin/routes/mail')).AdminMailRoute,
            async () => {
              const { adminQueries } = await api.admin();
              return [adminQueries.mail(), adminQueries.projects()];
            },
          ),
          { path: '*', element: <RouteError /> },
        ],
      },
    ],
  },
]);
