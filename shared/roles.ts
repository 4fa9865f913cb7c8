/** Project roles and what each may do. The server enforces these on every route; the client only hides. */
export const projectRoles = ['fitter', 'planner', 'buyer', 'site_manager'] as const;
export type ProjectRole = (typeof projectRoles)[number];

export const roleLabels: Record<ProjectRole, string> = {
  fitter: 'Fitter',
  planner: 'Maintenance planner',
  buyer: 'Spare-parts buyer',
  site_manager: 'Site manager',
};

/**
 * One table of permissions, extended by every feature. A route asks for a permission, never for
 * a role, so that adding a role or widening access is a change here only (DEVELOPERS.md, decision 6).
 */
export const permissions = {
  'project.read': ['fitter', 'planner', 'buyer', 'site_manager'],
  /** Cutterhead layout. */
  'layout.read': ['fitter', 'planner', 'buyer', 'site_manager'],
  'layout.edit': ['planner'],
  /** Cutters by serial: receive into store, workshop rebuilds, scrapping. */
  'cutters.read': ['fitter', 'planner', 'buyer', 'site_manager'],
  'cutters.edit': ['fitter', 'planner'],
  /** Inspection rounds at the face, and their photos. */
  'rounds.read': ['fitter', 'planner', 'buyer', 'site_manager'],
  'rounds.record': ['fitter', 'planner'],
  /** Drive data: advance log, ground types, geology long section. */
  'drive.read': ['fitter', 'planner', 'buyer', 'site_manager'],
  'drive.edit': ['planner'],
  /** Wear fits and change-out forecasts. */
  'forecast.read': ['fitter', 'planner', 'buyer', 'site_manager'],
  'forecast.edit': ['planner'],
  /** Intervention stops: the plan, the stops and their work packs. */
  'stops.read': ['fitter', 'planner', 'buyer', 'site_manager'],
  'stops.plan': ['planner'],
  /** Starting and finishing a stop at the face. */
  'stops.run': ['fitter', 'planner'],
  /** Parts catalogue, stock, orders, workshop loop and demand. */
  'parts.read': ['planner', 'buyer', 'site_manager'],
  'parts.edit': ['buyer'],
  /** Downtime events, causes and the site manager's reports (downtime and cutter cost). */
  'downtime.read': ['planner', 'buyer', 'site_manager'],
  'downtime.edit': ['site_manager', 'planner'],
} as const satisfies Record<string, readonly ProjectRole[]>;

export type Permission = keyof typeof permissions;

export function roleCan(role: ProjectRole, permission: Permission): boolean {
  return (permissions[permission] as readonly ProjectRole[]).includes(role);
}
