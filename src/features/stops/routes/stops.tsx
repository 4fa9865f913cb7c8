import { keepPreviousData, useQuery, useSuspenseQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { Link, useParams, useSearchParams } from 'react-router';
import { roleCan } from '../../../../shared/roles';
import { stopStatuses, stopStatusLabels } from '../../../../shared/schemas/stop';
import { Alert } from '../../../components/ui/alert';
import { DataTable } from '../../../components/ui/data-table';
import { SelectField } from '../../../components/ui/field';
import { Page } from '../../../components/ui/page';
import { paths } from '../../../config/paths';
import { formatChainage } from '../../../../shared/domain/chainage';
import { formatSiteDateTime } from '../../../../shared/site-time';
import { projectQueries } from '../../projects/api';
import { stopListStatus, stopQueries, type StopListItem } from '../api';
import { hoursText } from '../format';

const col = createColumnHelper<StopListItem>();
const linkClass = 'inline-flex min-h-touch items-center font-semibold text-ember-700 underline underline-offset-2';

/** Every stop of the drive with planned against actual hours: the site manager's view of whether the plan holds. */
export function StopsRoute() {
  const { projectId = '' } = useParams();
  const [search, setSearch] = useSearchParams();
  const status = stopListStatus(search);
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  const { data: stops, error, isPending } = useQuery({ ...stopQueries.list(projectId, status), placeholderData: keepPreviousData });
  const tz = project.siteTimeZone;

  const columns = [
    col.accessor('chainageM', {
      meta: { csvDecimals: 1 },
      header: 'Chainage',
      cell: ({ row }) => (
        <Link
          to={paths.stop(projectId, row.original.id)}
          className={linkClass}
          aria-label={`Stop at ${formatChainage(row.original.chainageM)}`}
        >
          {formatChainage(row.original.chainageM)}
        </Link>
      ),
    }),
    col.accessor('ringNumber', { meta: { csvDecimals: 0 }, header: 'Ring', cell: (c) => c.getValue() ?? '—' }),
    col.accessor((r) => stopStatusLabels[r.status], { id: 'status', header: 'Status' }),
    col.accessor(
      (r) =>
        r.compressedAir ? `Compressed air${r.workingPressureBar != null ? ` ${r.workingPressureBar.toFixed(2)} bar` : ''}` : 'Free air',
      { id: 'air', header: 'Air' },
    ),
    col.accessor((r) => (r.plannedStart ? formatSiteDateTime(r.plannedStart, tz) : ''), {
      id: 'plannedStart',
      header: 'Planned start',
      cell: (c) => <span className="whitespace-nowrap">{c.getValue() || '—'}</span>,
    }),
    col.accessor('expectedHours', { meta: { csvDecimals: 1 }, header: 'Planned (h)', cell: (c) => hoursText(c.getValue()) }),
    col.accessor((r) => (r.actualStart ? formatSiteDateTime(r.actualStart, tz) : ''), {
      id: 'actualStart',
      header: 'Actual start',
      cell: (c) => <span className="whitespace-nowrap">{c.getValue() || '—'}</span>,
    }),
    col.accessor((r) => (r.actualHours == null ? null : Math.round(r.actualHours * 10) / 10), {
      id: 'actualHours',
      meta: { csvDecimals: 1 },
      header: 'Actual (h)',
      cell: (c) => hoursText(c.getValue()),
    }),
    col.accessor(
      (r) => (r.actualHours != null && r.expectedHours != null ? Math.round((r.actualHours - r.expectedHours) * 10) / 10 : null),
      {
        id: 'overrun',
        meta: { csvDecimals: 1 },
        header: 'Overrun (h)',
        cell: (c) => {
          const v = c.getValue();
          return v == null ? '—' : `${v > 0 ? '+' : ''}${v.toFixed(1)} h`;
        },
      },
    ),
    col.accessor((r) => r.crewName ?? '', { id: 'crew', header: 'Crew', cell: (c) => c.getValue() || '—' }),
    col.accessor('positionCount', { meta: { csvDecimals: 0 }, header: 'Positions' }),
  ];

  return (
    <Page
      title="Stops"
      actions={
        <Link className={linkClass} to={paths.stopPlan(projectId)}>
          {roleCan(project.role, 'stops.plan') ? 'Plan stops' : 'The stop plan'}
        </Link>
      }
    >
      <div className="max-w-xs">
        <SelectField label="Status" value={status ?? ''} onChange={(e) => setSearch(e.target.value ? { status: e.target.value } : {})}>
          <option value="">All stops</option>
          {stopStatuses.map((s) => (
            <option key={s} value={s}>
              {stopStatusLabels[s]}
            </option>
          ))}
        </SelectField>
      </div>
      {error && <Alert tone="error">{error.message}</Alert>}
      {isPending ? (
        <p>Loading…</p>
      ) : (
        <DataTable
          data={stops ?? []}
          columns={columns}
          exportName="kerfwise-stops"
          emptyText={status ? `No ${stopStatusLabels[status].toLowerCase()} stops.` : 'No stops yet: propose one from the stop plan.'}
        />
      )}
    </Page>
  );
}
