import { useQuery, useQueryClient } from '@tanstack/react-query';
import { Suspense, useState } from 'react';
import { Link, Navigate, NavLink, Outlet, useLocation, useMatch, useNavigate } from 'react-router';
import { roleCan, roleLabels } from '../../../shared/roles';
import { paths } from '../../config/paths';
import { authQueries, signOut } from '../../features/auth/api';
import { PageLoading } from '../ui/page';
import { Logo } from './logo';
import { OutboxCount } from './outbox-count';

const navLink = ({ isActive }: { isActive: boolean }) =>
  `flex min-h-touch items-center rounded-md px-3 font-semibold ${isActive ? 'bg-ember-600 text-white' : 'text-basalt-100 hover:bg-basalt-800'}`;

/** The signed-in frame: top bar with the project, navigation for the role, and the page. */
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

  const onSignOut = async () => {
    await signOut().catch(() => {});
    queryClient.clear();
    navigate(paths.signIn, { replace: true });
  };

  return (
    <div className="min-h-screen">
      <header className="no-print bg-basalt-900 text-white">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-3 px-4 py-2">
          <Link to={paths.home} className="min-h-touch flex items-center">
            <Logo />
          </Link>
          {membership && (
            <span className="text-basalt-200">
              {membership.projectName} · <span className="text-ember-300">{roleLabels[membership.role]}</span>
            </span>
          )}
          <button
            type="button"
            className="ml-auto min-h-touch rounded-md px-3 font-semibold md:hidden"
            aria-expanded={menuOpen}
            aria-controls="main-nav"
            onClick={() => setMenuOpen((o) => !o)}
          >
            Menu
          </button>
          <nav
            id="main-nav"
            aria-label="Main"
            className={`${menuOpen ? 'flex' : 'hidden'} w-full flex-col gap-1 md:ml-auto md:flex md:w-auto md:flex-row md:flex-wrap md:items-center`}
          >
            {projectId && membership && (
              <>
                <NavLink end to={paths.project(projectId)} className={navLink}>
                  Overview
                </NavLink>
                <NavLink to={paths.cutterhead(projectId)} className={navLink}>
                  Cutterhead
                </NavLink>
                {roleCan(membership.role, 'forecast.read') && (
                  <NavLink to={paths.forecast(projectId)} className={navLink}>
                    Forecast
                  </NavLink>
                )}
                {roleCan(membership.role, 'forecast.read') && (
                  <NavLink to={paths.wearFits(projectId)} className={navLink}>
                    Wear rates
                  </NavLink>
                )}
                {roleCan(membership.role, 'rounds.read') && (
                  <NavLink to={paths.rounds(projectId)} className={navLink}>
                    Rounds
                  </NavLink>
                )}
                {roleCan(membership.role, 'stops.read') && (
                  <NavLink to={paths.stops(projectId)} className={navLink}>
                    Stops
                  </NavLink>
                )}
                <NavLink to={paths.cutters(projectId)} className={navLink}>
                  Cutters
                </NavLink>
                {roleCan(membership.role, 'drive.read') && (
                  <NavLink to={paths.advanceLog(projectId)} className={navLink}>
                    Advance log
                  </NavLink>
                )}
                {roleCan(membership.role, 'drive.read') && (
                  <NavLink to={paths.geology(projectId)} className={navLink}>
                    Geology
                  </NavLink>
                )}
                {roleCan(membership.role, 'parts.read') && (
                  <NavLink to={paths.parts(projectId)} className={navLink}>
                    Parts
                  </NavLink>
                )}
                {roleCan(membership.role, 'downtime.read') && (
                  <NavLink to={paths.downtime(projectId)} className={navLink}>
                    Downtime
                  </NavLink>
                )}
                <NavLink to={paths.layout(projectId)} className={navLink}>
                  Layout
                </NavLink>
              </>
            )}
            {me.memberships.length > 1 && (
              <NavLink end to={paths.home} className={navLink}>
                Projects
              </NavLink>
            )}
            {me.user.isAdmin && (
              <NavLink to={paths.admin.users} className={navLink}>
                Administration
              </NavLink>
            )}
            <NavLink to={paths.account} className={navLink}>
              {me.user.name}
            </NavLink>
            <button
              type="button"
              onClick={onSignOut}
              className="min-h-touch rounded-md px-3 text-left font-semibold text-basalt-100 hover:bg-basalt-800"
            >
              Sign out
            </button>
          </nav>
          <OutboxCount />
        </div>
      </header>
      <main>
        <Suspense fallback={<PageLoading />}>
          <Outlet />
        </Suspense>
      </main>
    </div>
  );
}
