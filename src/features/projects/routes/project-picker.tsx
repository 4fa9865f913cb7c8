import { Link, Navigate } from 'react-router';
import { roleLabels } from '../../../../shared/roles';
import { Alert } from '../../../components/ui/alert';
import { Page } from '../../../components/ui/page';
import { paths } from '../../../config/paths';
import { useMe } from '../../auth/use-me';

/** Home: the drives this person works on; skipped when there is only one. */
export function ProjectPickerRoute() {
  const me = useMe();
  if (me.memberships.length === 1) return <Navigate to={paths.project(me.memberships[0].projectId)} replace />;
  return (
    <Page title="Your drives">
      {me.memberships.length === 0 ? (
        <Alert tone="info" title="You are not on any drive yet.">
          {me.user.isAdmin ? (
            <>
              Add yourself or others to a drive under{' '}
              <Link className="underline" to={paths.admin.projects}>
                Administration → Projects
              </Link>
              .
            </>
          ) : (
            'Ask your administrator to add you to the drive you work on.'
          )}
        </Alert>
      ) : (
        <ul className="grid gap-3 md:grid-cols-2">
          {me.memberships.map((m) => (
            <li key={m.projectId}>
              <Link
                to={paths.project(m.projectId)}
                className="block rounded-lg border-2 border-basalt-200 bg-white p-4 hover:border-ember-500"
              >
                <span className="block text-lead font-semibold">{m.projectName}</span>
                <span className="text-basalt-600">{roleLabels[m.role]}</span>
              </Link>
            </li>
          ))}
        </ul>
      )}
    </Page>
  );
}
