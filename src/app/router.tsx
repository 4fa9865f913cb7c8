import { createBrowserRouter, Navigate } from 'react-router';
import { AppShell } from '../components/layout/app-shell';
import { paths } from '../config/paths';
import { RouteError } from './route-error';

/** Routes are split per feature (`lazy`), so the first load stays small. */
export const router = createBrowserRouter([
  { path: paths.signIn, lazy: async () => ({ Component: (await import('../features/auth/routes/sign-in')).SignInRoute }) },
  { path: paths.requestReset, lazy: async () => ({ Component: (await import('../features/auth/routes/request-reset')).RequestResetRoute }) },
  { path: paths.setPassword, lazy: async () => ({ Component: (await import('../features/auth/routes/set-password')).SetPasswordRoute }) },
  {
    path: '/',
    Component: AppShell,
    errorElement: <RouteError />,
    children: [
      { index: true, lazy: async () => ({ Component: (await import('../features/projects/routes/project-picker')).ProjectPickerRoute }) },
      { path: paths.account, lazy: async () => ({ Component: (await import('../features/auth/routes/account')).AccountRoute }) },
      { path: 'projects/:projectId', lazy: async () => ({ Component: (await import('../features/projects/routes/project-home')).ProjectHomeRoute }) },
      { path: 'projects/:projectId/cutterhead', lazy: async () => ({ Component: (await import('../features/cutterhead/routes/cutterhead')).CutterheadRoute }) },
      { path: 'projects/:projectId/layout', lazy: async () => ({ Component: (await import('../features/cutterhead/routes/layout')).LayoutRoute }) },
      { path: 'projects/:projectId/positions/:positionId', lazy: async () => ({ Component: (await import('../features/cutterhead/routes/position')).PositionRoute }) },
      { path: 'projects/:projectId/cutters', lazy: async () => ({ Component: (await import('../features/cutters/routes/cutters')).CuttersRoute }) },
      { path: 'projects/:projectId/cutters/:cutterId', lazy: async () => ({ Component: (await import('../features/cutters/routes/cutter')).CutterRoute }) },
      { path: 'projects/:projectId/rounds', lazy: async () => ({ Component: (await import('../features/rounds/routes/rounds')).RoundsRoute }) },
      { path: 'projects/:projectId/forecast', lazy: async () => ({ Component: (await import('../features/forecast/routes/forecast')).ForecastRoute }) },
      { path: 'projects/:projectId/wear-fits', lazy: async () => ({ Component: (await import('../features/forecast/routes/wear-fits')).WearFitsRoute }) },
      { path: 'projects/:projectId/advance-log', lazy: async () => ({ Component: (await import('../features/drive/routes/advance-log')).AdvanceLogRoute }) },
      { path: 'projects/:projectId/geology', lazy: async () => ({ Component: (await import('../features/drive/routes/geology')).GeologyRoute }) },
      { path: 'projects/:projectId/parts', lazy: async () => ({ Component: (await import('../features/parts/routes/parts')).PartsRoute }) },
      { path: 'projects/:projectId/downtime', lazy: async () => ({ Component: (await import('../features/downtime/routes/downtime-events')).DowntimeEventsRoute }) },
      { path: 'projects/:projectId/downtime/report', lazy: async () => ({ Component: (await import('../features/downtime/routes/downtime-report')).DowntimeReportRoute }) },
      { path: 'projects/:projectId/downtime/cost', lazy: async () => ({ Component: (await import('../features/downtime/routes/cutter-cost')).CutterCostRoute }) },
      { path: 'projects/:projectId/stops', lazy: async () => ({ Component: (await import('../features/stops/routes/stops')).StopsRoute }) },
      { path: 'projects/:projectId/stops/plan', lazy: async () => ({ Component: (await import('../features/stops/routes/plan')).StopPlanRoute }) },
      { path: 'projects/:projectId/stops/:stopId', lazy: async () => ({ Component: (await import('../features/stops/routes/stop')).StopRoute }) },
      { path: 'projects/:projectId/rounds/:roundId', lazy: async () => ({ Component: (await import('../features/rounds/routes/round')).RoundRoute }) },
      { path: 'admin', element: <Navigate to={paths.admin.users} replace /> },
      { path: paths.admin.users, lazy: async () => ({ Component: (await import('../features/admin/routes/users')).AdminUsersRoute }) },
      { path: paths.admin.projects, lazy: async () => ({ Component: (await import('../features/admin/routes/projects')).AdminProjectsRoute }) },
      { path: paths.admin.jobs, lazy: async () => ({ Component: (await import('../features/admin/routes/jobs')).AdminJobsRoute }) },
      { path: paths.admin.mail, lazy: async () => ({ Component: (await import('../features/admin/routes/mail')).AdminMailRoute }) },
      { path: '*', element: <RouteError /> },
    ],
  },
]);
