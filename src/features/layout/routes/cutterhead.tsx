import { useQuery, useSuspenseQuery } from '@tanstack/react-query';
import { useCallback, useState } from 'react';
import { createColumnHelper } from '@tanstack/react-table';
import { Link, useParams } from 'react-router';
import { positionClassLabels } from '../../../../shared/cutters';
import { roleCan } from '../../../../shared/roles';
import { Alert } from '../../../components/ui/alert';
import { DataTable } from '../../../components/ui/data-table';
import { Page, Panel } from '../../../components/ui/page';
import { paths } from '../../../config/paths';
import { formatSiteDate } from '../../../../shared/site-time';
import { projectQueries } from '../../projects/api';
import { layoutQueries, type LayoutPosition } from '../api';
import { CutterheadCaution } from '../../../components/ui/cutterhead-caution';
import { LastSynced } from '../../../components/ui/last-synced';
import { CutterheadPicture, remainingBand, remainingLegend, WearLegend, wearBand } from '../components/cutterhead-picture';

const col = createColumnHelper<LayoutPosition>();
const linkClass = 'font-semibold text-ember-700 underline underline-offset-2';

export function CutterheadRoute() {
  const { projectId = '' } = useParams();
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  const { data: positions, dataUpdatedAt } = useSuspenseQuery(layoutQueries.list(projectId));
  const [view, setView] = useState<'wear' | 'forecast'>('wear');
  const remaining = useQuery({ ...layoutQueries.remaining(projectId), enabled: view === 'forecast' });
  const forecastBandOf = useCallback(
    (p: LayoutPosition) => remainingBand(remaining.data?.find((r) => r.positionId === p.id)),
    [remaining.data],
  );

  const columns = [
    col.accessor('number', {
      meta: { csvDecimals: 0 },
      header: 'Position',
      cell: ({ row }) => (
        <Link className={linkClass} to={paths.position(projectId, row.original.id)}>
          {row.original.number}
        </Link>
      ),
    }),
    col.accessor((p) => positionClassLabels[p.positionClass], { id: 'class', header: 'Class' }),
    col.accessor('trackRadiusMm', { meta: { csvDecimals: 0 }, header: 'Radius (mm)' }),
    col.accessor((p) => p.current?.serial ?? '', {
      id: 'serial',
      header: 'Serial now',
      cell: ({ row }) => {
        const c = row.original.current;
        return c ? (
          <Link className={`${linkClass} whitespace-nowrap`} to={paths.cutter(projectId, c.cutterId)}>
            {c.serial}
          </Link>
        ) : (
          <span className="text-basalt-600">none</span>
        );
      },
    }),
    col.accessor('lastWearMm', {
      meta: { csvDecimals: 1 },
      header: 'Last wear (mm)',
      cell: ({ getValue }) => getValue()?.toFixed(1) ?? '—',
    }),
    col.accessor((p) => formatSiteDate(p.lastMeasuredAt, project.siteTimeZone), {
      id: 'measured',
      header: 'Measured',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
    }),
    col.accessor('wearLimitMm', { meta: { csvDecimals: 1 }, header: 'Limit (mm)' }),
    col.accessor((p) => (p.lastWearMm == null ? null : Math.round((100 * p.lastWearMm) / p.wearLimitMm)), {
      id: 'percent',
      meta: { csvDecimals: 0 },
      header: '% of limit',
      sortUndefined: 'last',
      cell: ({ row, getValue }) => {
        const band = wearBand(row.original);
        const percent = getValue();
        if (band.kind === 'over') return <span className="font-bold">{percent} % · over the limit</span>;
        return percent == null ? <span className="text-basalt-600">{band.kind === 'empty' ? '—' : 'not measured'}</span> : `${percent} %`;
      },
    }),
  ];

  const over = positions.filter((p) => wearBand(p).kind === 'over').length;
  return (
    <Page title="Cutterhead">
      <CutterheadCaution />
      <LastSynced at={dataUpdatedAt} timeZone={project.siteTimeZone} />
      {positions.length === 0 ? (
        <Alert title="No layout yet">
          {roleCan(project.role, 'layout.edit') ? (
            <>
              Enter or import the positions on the{' '}
              <Link className={linkClass} to={paths.layout(projectId)}>
                layout page
              </Link>
              .
            </>
          ) : (
            'The planner has not entered the cutterhead layout yet.'
          )}
        </Alert>
      ) : (
        <>
          <Panel>
            <div className="grid gap-6 lg:grid-cols-[minmax(0,1fr)_18rem] lg:items-start">
              <CutterheadPicture
                projectId={projectId}
                excavatedDiameterM={project.excavatedDiameterM}
                positions={positions}
                bandOf={view === 'forecast' ? forecastBandOf : wearBand}
              />
              <div className="space-y-3">
                <div role="group" aria-label="Colour the discs by" className="flex flex-wrap gap-2">
                  {(['wear', 'forecast'] as const).map((v) => (
                    <button
                      key={v}
                      type="button"
                      aria-pressed={view === v}
                      onClick={() => setView(v)}
                      className={`min-h-touch rounded-md border-2 px-3 font-semibold ${view === v ? 'border-ember-600 bg-ember-50' : 'border-basalt-300 bg-white'}`}
                    >
                      {v === 'wear' ? 'Wear now' : 'Metres left (P90)'}
                    </button>
                  ))}
                </div>
                {view === 'forecast' && remaining.isPending && <p className="text-caption">Forecasting…</p>}
                {view === 'forecast' && remaining.error && <Alert tone="error">{remaining.error.message}</Alert>}
                <p className="font-semibold">
                  {positions.length} positions · {over === 0 ? 'none over the limit' : `${over} over the limit`}
                </p>
                <p className="text-caption text-basalt-600">
                  Seen from the face, {project.excavatedDiameterM.toFixed(2)} m bore. Angles clockwise from the top; positions without an
                  angle are laid out evenly. Select a disc to open its position.
                </p>
                <WearLegend items={view === 'forecast' ? remainingLegend : undefined} />
              </div>
            </div>
          </Panel>
          <DataTable data={positions} columns={columns} exportName="kerfwise-cutterhead" />
        </>
      )}
    </Page>
  );
}
