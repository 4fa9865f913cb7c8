import { useQuery, useQueryClient } from '@tanstack/react-query';
import { Suspense, useState } from 'react';
import { Link, Navigate, NavLink, Outlet, useLocation, useMatch, useNavigate } from 'react-router';
import { roleLabels } from '../../../shared/roles';
import { paths } from '../../config/paths';
import { authQueries, signOut } from '../../features/auth/api';
import { forgetPersistedCache } from '../../lib/persisted-cache';
import { PageLoading } from '../ui/page';
import { Logo } from './logo';
import { currentGroup, isItemCurrent, landingOf, navGroupsFor, type NavGroup } from './nav-groups';
import { OutboxCount } from './outbox-count';

/** A tab of the main row: the current group gets a heavy bar under it as well as a lighter fill (not colour alone). */
const groupTab = (current: boolean) =>
  `flex min-h-touch items-center whitespace-nowrap border-b-4 px-2 font-semibold lg:px-3 ${
    current ? 'border-ember-400 bg-basalt-800 text-white' : 'border-transparent text-basalt-100 hover:bg-basalt-800'
  }`;

/** A page of the current group: the current page is underlined with a bar and set in bold. */
const pageTab = (isActive: boolean) =>
  `flex min-h-touch items-center whitespace-nowrap border-b-4 px-3 ${
    isActive ? 'border-ember-600 font-bold text-basalt-950' : 'border-transparent font-semibold text-basalt-700 hover:bg-basalt-200'
  }`;

/** The signed-in frame: top bar with the drive, navigation grouped by task for the role, and the page. */
export function AppShell() {
  const { data: me, isPending, error } = useQuery(authQueries.me());
  const location = useLocation();
  const navigate = useNavigate();
  const queryClient = useQueryClient();
  const projectMatch = useMatch('/projects/:projectId/*');
  const [menuOpen, setMenuOpen] = useState(false);

  if (isPending) return <p className="p-6">Loading…</p>;
  if (error)
    return (
      <p role="alert" className="p-6">
        Kerfwise could not reach its server: {error.message}
      </p>
    );
  if (!me) return <Navigate to={`${paths.signIn}?next=${encodeURIComponent(location.pathname + location.search)}`} replace />;

  const projectId = projectMatch?.params.projectId;
  const membership = me.memberships.find((m) => m.projectId === projectId);
  const groups: NavGroup[] = projectId && membership ? navGroupsFor(membership.role) : [];
  const here = projectId ? currentGroup(groups, projectId, location.pathname) : undefined;

  const onSignOut = async () => {
    await signOut().catch(() => {});
    queryClient.clear();
    await forgetPersistedCache();
    navigate(paths.signIn, { replace: true });
  };

  return (
    <div className="min-h-screen">
      <header className="no-print bg-basalt-900 text-white">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-3 px-4 pt-1">
          <Link to={paths.home} className="flex min-h-touch items-center">
            <Logo />
          </Link>
          {membership && (
            <span className="text-basalt-200">
              {membership.projectName} · <span className="text-ember-300">{roleLabels[membership.role]}</span>
            </span>
          )}
          {/* The right side of the top bar: status badges go first here, then the person's own links. */}
          <div className="ml-auto flex flex-wrap items-center justify-end gap-1 whitespace-nowrap" data-slot="top-bar-end">
            <OutboxCount projectId={membership ? projectId : undefined} />
            <NavLink
              to={paths.account}
              className={({ isActive }) =>
                `flex min-h-touch items-center rounded-md px-3 font-semibold ${isActive ? 'underline decoration-4 underline-offset-8' : 'text-basalt-100 hover:bg-basalt-800'}`
              }
            >
              {/* On a phone a long name is cut short rather than breaking the bar's words apart. */}
              <span className="max-w-36 truncate sm:max-w-none">{me.user.name}</span>
            </NavLink>
            <button
              type="button"
              onClick={onSignOut}
              className="min-h-touch rounded-md px-3 text-left font-semibold text-basalt-100 hover:bg-basalt-800"
            >
              Sign out
            </button>
            <button
              type="button"
              className="min-h-touch rounded-md px-3 font-semibold md:hidden"
              aria-expanded={menuOpen}
              aria-controls="main-nav"
              onClick={() => setMenuOpen((o) => !o)}
            >
              Menu
            </button>
          </div>
        </div>
        <nav id="main-nav" aria-label="Main" className={`${menuOpen ? 'block' : 'hidden'} md:block`}>
          <ul className="mx-auto flex max-w-6xl flex-col px-4 md:flex-row md:flex-nowrap md:items-stretch" data-testid="main-nav-row">
            {projectId &&
              membership &&
              groups.map((g) => {
                const current = g === here;
                return (
                  <li key={g.key} className="flex">
                    <Link
                      to={landingOf(g, membership.role).to(projectId)}
                      className={groupTab(current)}
                      aria-current={current ? (g.items.length === 1 ? 'page' : 'location') : undefined}
                      onClick={() => setMenuOpen(false)}
                    >
                      {g.label}
                    </Link>
                  </li>
                );
              })}
            {me.memberships.length > 1 && (
              <li className="flex md:ml-auto">
                <NavLink end to={paths.home} className={({ isActive }) => groupTab(isActive)}>
                  Drives
                </NavLink>
              </li>
            )}
            {me.user.isAdmin && (
              <li className={`flex ${me.memberships.length > 1 ? '' : 'md:ml-auto'}`}>
                <NavLink
                  to={paths.admin.users}
                  className={({ isActive }) => groupTab(isActive || location.pathname.startsWith(paths.admin.home))}
                >
                  Administration
                </NavLink>
              </li>
            )}
          </ul>
        </nav>
        {projectId && here && here.items.length > 1 && (
          <nav aria-label="Pages of this group" className="bg-basalt-100 text-basalt-900">
            <ul className="mx-auto flex max-w-6xl flex-wrap px-4">
              {here.items.map((i) => (
                <li key={i.key} className="flex">
                  <Link
                    to={i.to(projectId)}
                    className={pageTab(isItemCurrent(i, projectId, location.pathname))}
                    aria-current={isItemCurrent(i, projectId, location.pathname) ? 'page' : undefined}
                  >
                    {i.label}
                  </Link>
                </li>
              ))}
            </ul>
          </nav>
        )}
      </header>
      <main>
        <Suspense fallback={<PageLoading />}>
          <Outlet />
        </Suspense>
      </main>
    </div>
  );
}
