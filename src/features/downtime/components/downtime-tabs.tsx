import { NavLink, useLocation } from 'react-router';
import { paths } from '../../../config/paths';

const tab = ({ isActive }: { isActive: boolean }) =>
  `flex min-h-touch items-center rounded-md border-2 px-4 font-semibold ${isActive ? 'border-ember-600 bg-ember-50' : 'border-basalt-200 bg-white'}`;

/** Events, report and cutter cost; the chosen period (?from=&to=) goes along. */
export function DowntimeTabs({ projectId }: { projectId: string }) {
  const { search } = useLocation();
  return (
    <nav aria-label="Downtime" className="flex flex-wrap gap-2">
      <NavLink end to={`${paths.downtime(projectId)}${search}`} className={tab}>
        Events
      </NavLink>
      <NavLink to={`${paths.downtimeReport(projectId)}${search}`} className={tab}>
        Report
      </NavLink>
      <NavLink to={`${paths.cutterCost(projectId)}${search}`} className={tab}>
        Cutter cost
      </NavLink>
    </nav>
  );
}
