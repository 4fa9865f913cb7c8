import { useSuspenseQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { Link, useParams } from 'react-router';
import type { DowntimeReport } from '../../../../shared/schemas/downtime';
import { Alert } from '../../../components/ui/alert';
import { DataTable } from '../../../components/ui/data-table';
import { Page, Panel } from '../../../components/ui/page';
import { paths } from '../../../config/paths';
import { downtimeQueries } from '../api';
import { DowntimeTabs } from '../components/downtime-tabs';
import { HoursPivot } from '../components/hours-pivot';
import { ParetoChart } from '../components/pareto-chart';
import { PeriodFilter, usePeriod } from '../components/period-filter';
import { StatTiles } from '../components/stat-tiles';

const pct = (share: number) => `${(share * 100).toFixed(1)} %`;
const col = createColumnHelper<DowntimeReport['pareto'][number]>();
const paretoColumns = [
  col.accessor('cause', { header: 'Cause' }),
  col.accessor((r) => (r.cutterWork ? 'yes' : 'no'), { id: 'cutterWork', header: 'Cutter work' }),
  col.accessor('hours', { meta: { csvDecimals: 1 }, header: 'Hours', cell: ({ getValue }) => getValue().toFixed(1) }),
  col.accessor((r) => Math.round(r.share * 1000) / 10, { id: 'share', meta: { csvDecimals: 1 }, header: 'Share (%)' }),
  col.accessor((r) => Math.round(r.cumulativeShare * 1000) / 10, {
    id: 'cumulative',
    meta: { csvDecimals: 1 },
    header: 'Running share (%)',
  }),
];

/** Downtime by cause × week and × shift, utilisation, cutter-work share, metres per day and the Pareto of causes. */
export function DowntimeReportRoute() {
  const { projectId = '' } = useParams();
  const period = usePeriod();
  const { data: r } = useSuspenseQuery(downtimeQueries.report(projectId, period));
  return (
    <Page title="Downtime report">
      <DowntimeTabs projectId={projectId} />
      <PeriodFilter key={`${r.from}/${r.to}`} shown={r} timeZone={r.timeZone} />
      <p className="text-basalt-700">
        {r.from} to {r.to}: {r.hours.toFixed(0)} hours of calendar time
        {r.hours % 24 !== 0 ? ' (a daylight-saving change falls in the period)' : ''}.
      </p>
      {r.unexplainedEvents > 0 && (
        <Alert tone="caution" title={`${r.unexplainedEvents} standstill(s), ${r.unexplainedHours.toFixed(1)} h, have no cause yet.`}>
          They count as “No cause given” below.{' '}
          <Link className="font-semibold underline" to={`${paths.downtime(projectId)}?unexplained=true&from=${r.from}&to=${r.to}`}>
            Give them a cause
          </Link>
          .
        </Alert>
      )}
      <StatTiles
        items={[
          {
            label: 'Utilisation',
            value: pct(r.utilisation),
            detail: `${r.boringHours.toFixed(1)} h boring of ${r.hours.toFixed(0)} h calendar time`,
          },
          { label: 'Cutter work', value: pct(r.cutterWorkShare), detail: `of ${r.downtimeHours.toFixed(1)} h of downtime` },
          { label: 'Advance', value: `${r.metresPerDay.toFixed(1)} m/day`, detail: `${r.advanceM.toFixed(1)} m in the period` },
          { label: 'Downtime', value: `${r.downtimeHours.toFixed(0)} h`, detail: `${pct(r.downtimeHours / r.hours)} of calendar time` },
        ]}
      />
      <Panel title="Hours by cause and week">
        <HoursPivot
          rows={r.byWeek}
          columns={r.weeks}
          columnOf={(x) => x.isoWeek}
          exportName={`kerfwise-downtime-weeks-${r.from}-${r.to}`}
        />
      </Panel>
      <Panel title="Hours by cause and shift">
        <HoursPivot
          rows={r.byShift}
          columns={r.shifts}
          columnOf={(x) => x.shift}
          exportName={`kerfwise-downtime-shifts-${r.from}-${r.to}`}
        />
        <p className="mt-2 text-caption text-basalt-700">
          Shifts from the site settings (Events page); a shift over a daylight-saving change is an hour shorter or longer.
        </p>
      </Panel>
      <Panel title="Causes by hours (Pareto)">
        <ParetoChart pareto={r.pareto} />
        <div className="mt-4">
          <DataTable
            data={r.pareto}
            columns={paretoColumns}
            exportName={`kerfwise-downtime-pareto-${r.from}-${r.to}`}
            emptyText="No downtime in this period."
          />
        </div>
      </Panel>
    </Page>
  );
}
