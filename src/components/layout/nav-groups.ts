/**
 * The main navigation, grouped by task so each role sees one row of groups (DEVELOPERS.md,
 * decision 40). A group's tab leads to its landing page for the role; the pages of the current
 * group show in a second row. Which role sees what follows the permission table (shared/roles.ts).
 */
import { roleCan, type Permission, type ProjectRole } from '../../../shared/roles';
import { paths } from '../../config/paths';

export interface NavItem {
  key: string;
  label: string;
  to: (projectId: string) => string;
  /** Shown only to roles with this permission; none: every member. */
  permission?: Permission;
  /** Only the address itself is this page (the Overview); otherwise every address below it too. */
  end?: boolean;
}

export interface NavGroup {
  key: 'overview' | 'head' | 'plan' | 'drive' | 'supply' | 'admin';
  label: string;
  items: NavItem[];
  /** The page a role lands on from the group's tab, when not the first it may see. */
  landing?: Partial<Record<ProjectRole, string>>;
  /** Further addresses below the project that belong to the group (e.g. a position's page). */
  also?: ((projectId: string) => string)[];
}

export const navGroups: readonly NavGroup[] = [
  { key: 'overview', label: 'Overview', items: [{ key: 'overview', label: 'Overview', to: paths.project, end: true }] },
  {
    key: 'head',
    label: 'Cutterhead & rounds',
    items: [
      { key: 'cutterhead', label: 'Cutterhead', to: paths.cutterhead },
      { key: 'rounds', label: 'Rounds', to: paths.rounds, permission: 'rounds.read' },
      { key: 'cutters', label: 'Cutters', to: paths.cutters },
    ],
    // A fitter's day is the rounds: the group's tab opens them.
    landing: { fitter: 'rounds' },
    also: [(projectId) => `${paths.project(projectId)}/positions`],
  },
  {
    key: 'plan',
    label: 'Forecast & stops',
    items: [
      { key: 'forecast', label: 'Forecast', to: paths.forecast, permission: 'forecast.read' },
      { key: 'wear-fits', label: 'Wear rates', to: paths.wearFits, permission: 'forecast.read' },
      { key: 'stops', label: 'Stops', to: paths.stops, permission: 'stops.read' },
    ],
    landing: { fitter: 'stops' },
  },
  {
    key: 'drive',
    label: 'Drive data',
    items: [
      { key: 'advance-log', label: 'Advance log', to: paths.advanceLog, permission: 'drive.read' },
      { key: 'geology', label: 'Geology', to: paths.geology, permission: 'drive.read' },
    ],
  },
  {
    key: 'supply',
    label: 'Parts & downtime',
    items: [
      { key: 'parts', label: 'Parts', to: paths.parts, permission: 'parts.read' },
      { key: 'downtime', label: 'Downtime', to: paths.downtime, permission: 'downtime.read' },
    ],
    landing: { site_manager: 'downtime' },
  },
  {
    key: 'admin',
    label: 'Admin',
    items: [{ key: 'layout', label: 'Cutterhead layout', to: paths.layout }],
  },
];

/** The groups a role sees, each with only the pages the role may open; groups left empty are dropped. */
export function navGroupsFor(role: ProjectRole): NavGroup[] {
  return navGroups
    .map((g) => ({ ...g, items: g.items.filter((i) => !i.permission || roleCan(role, i.permission)) }))
    .filter((g) => g.items.length > 0);
}

/** The page a group's tab leads the role to. */
export function landingOf(group: NavGroup, role: ProjectRole): NavItem {
  const key = group.landing?.[role];
  return group.items.find((i) => i.key === key) ?? group.items[0];
}

const under = (pathname: string, base: string) => pathname === base || pathname.startsWith(`${base}/`);

/** Whether `pathname` is the item's page (or below it, unless the item is `end`). */
export function isItemCurrent(item: NavItem, projectId: string, pathname: string): boolean {
  const base = item.to(projectId);
  return item.end ? pathname === base || pathname === `${base}/` : under(pathname, base);
}

/** The group holding the current page, if any. */
export function currentGroup(groups: readonly NavGroup[], projectId: string, pathname: string): NavGroup | undefined {
  return groups.find(
    (g) => g.items.some((i) => isItemCurrent(i, projectId, pathname)) || (g.also ?? []).some((a) => under(pathname, a(projectId))),
  );
}
