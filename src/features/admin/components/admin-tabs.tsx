import { NavLink } from 'react-router';
import { paths } from '../../../config/paths';

const tab = ({ isActive }: { isActive: boolean }) =>
  `flex min-h-touch items-center rounded-md border-2 px-4 font-semibold ${isActive ? 'border-ember-600 bg-ember-50' : 'border-basalt-200 bg-white'}`;

export function AdminTabs() {
  return (
    <nav aria-label="Administration" className="flex flex-wrap gap-2">
      <NavLink to={paths.admin.users} className={tab}>
        Users
      </NavLink>
      <NavLink to={paths.admin.projects} className={tab}>
        Projects
      </NavLink>
      <NavLink to={paths.admin.mail} className={tab}>
        Mail
      </NavLink>
      <NavLink to={paths.admin.jobs} className={tab}>
        Jobs
      </NavLink>
    </nav>
  );
}
