import { generatePath } from 'react-router';

/** A route: its pattern (for the router) and a builder of its address from the ids in the pattern's order. */
type Route<Ids extends string[]> = ((...ids: Ids) => string) & { readonly pattern: string };

function route<Ids extends string[]>(pattern: string): Route<Ids> {
  const names = [...pattern.matchAll(/:(\w+)/g)].map((m) => m[1]);
  const build = (...ids: Ids) => generatePath(pattern, Object.fromEntries(names.map((name, i) => [name, ids[i]])));
  return Object.assign(build, { pattern });
}

type ProjectRoute = Route<[projectId: string]>;
const projectRoute = (rest: string): ProjectRoute => route(`/projects/:projectId${rest}`);

/**
 * Every client route in one place: `paths.x(ids…)` builds an address, `paths.x.pattern` is what
 * `src/app/router.tsx` matches — never written twice.
 */
export const paths = {
  home: '/',
  signIn: '/sign-in',
  requestReset: '/reset-password',
  setPassword: '/set-password',
  account: '/account',
  project: projectRoute(''),
  cutterhead: projectRoute('/cutterhead'),
  layout: projectRoute('/layout'),
  position: route<[projectId: string, positionId: string]>('/projects/:projectId/positions/:positionId'),
  cutters: projectRoute('/cutters'),
  cutter: route<[projectId: string, cutterId: string]>('/projects/:projectId/cutters/:cutterId'),
  rounds: projectRoute('/rounds'),
  round: route<[projectId: string, roundId: string]>('/projects/:projectId/rounds/:roundId'),
  forecast: projectRoute('/forecast'),
  wearFits: projectRoute('/wear-fits'),
  advanceLog: projectRoute('/advance-log'),
  geology: projectRoute('/geology'),
  parts: projectRoute('/parts'),
  downtime: projectRoute('/downtime'),
  downtimeReport: projectRoute('/downtime/report'),
  cutterCost: projectRoute('/downtime/cost'),
  stops: projectRoute('/stops'),
  stopPlan: projectRoute('/stops/plan'),
  stop: route<[projectId: string, stopId: string]>('/projects/:projectId/stops/:stopId'),
  admin: {
    home: '/admin',
    users: '/admin/users',
    projects: '/admin/projects',
    mail: '/admin/mail',
    jobs: '/admin/jobs',
  },
} as const;
