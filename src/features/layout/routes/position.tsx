import { useSuspenseQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useState } from 'react';
import { Link, useParams } from 'react-router';
import { CartesianGrid, Legend, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { conditionLabel, positionClassLabels, type DiscCondition } from '../../../../shared/cutters';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { LastSynced, useOnline } from '../../../components/ui/last-synced';
import { Page, Panel } from '../../../components/ui/page';
import { paths } from '../../../config/paths';
import { formatChainage } from '../../../../shared/domain/chainage';
import { formatSiteDate } from '../../../../shared/site-time';
import { projectQueries } from '../../projects/api';
import { photoUrl, layoutQueries, type FittedPeriod, type Measurement, type PositionDetail } from '../api';

const linkClass = 'font-semibold text-ember-700 underline underline-offset-2';
const conditionsText = (keys: DiscCondition[] | null) => (keys && keys.length ? keys.map(conditionLabel).join(', ') : '');
/** Series strokes; periods follow one another along the axis, so they never sit on top of each other. */
const seriesStrokes = ['#2c302a', '#bd4f09', '#2b6a99', '#4d7f2c'];

type Axis = 'date' | 'chainage';

function WearChart({ detail, axis, timeZone, reversed }: { detail: PositionDetail; axis: Axis; timeZone: string; reversed: boolean }) {
  const limit = detail.position.wearLimitMm;
  const series = detail.periods
    .map((period) => ({
      period,
      points: detail.measurements
        .filter((m) => m.fittingId === period.id && m.wearMm != null)
        .map((m) => ({ x: axis === 'date' ? new Date(m.roundAt).getTime() : m.chainageM, wearMm: m.wearMm })),
    }))
    .filter((s) => s.points.length > 0);
  const maxWear = Math.max(limit, ...series.flatMap((s) => s.points.map((p) => p.wearMm ?? 0)));
  const formatX = (v: number) => (axis === 'date' ? formatSiteDate(new Date(v), timeZone) : formatChainage(v));
  if (series.length === 0) return <p className="text-basalt-600">No wear measured on this position yet.</p>;
  return (
    <div className="h-80 w-full" role="img" aria-label={`Wear against ${axis}, ${series.length} fitted period(s), limit ${limit} mm`}>
      <ResponsiveContainer width="100%" height="100%">
        <LineChart margin={{ top: 16, right: 40, bottom: 8, left: 0 }}>
          <CartesianGrid stroke="#cdd1ca" strokeDasharray="3 3" />
          <XAxis
            type="number"
            dataKey="x"
            domain={['dataMin', 'dataMax']}
            tickFormatter={formatX}
            minTickGap={32}
            reversed={reversed}
            stroke="#4f564b"
            fontSize={14}
          />
          <YAxis domain={[0, Math.ceil(maxWear * 1.1)]} unit=" mm" stroke="#4f564b" fontSize={14} width={64} />
          <Tooltip labelFormatter={(v) => formatX(Number(v))} formatter={(v) => [`${v} mm`, 'Wear']} />
          <Legend />
          <ReferenceLine
            y={limit}
            stroke="#1d201c"
            strokeWidth={2}
            strokeDasharray="8 4"
            label={{ value: `Limit ${limit} mm`, position: 'insideTopLeft', fill: '#1d201c', fontSize: 14 }}
          />
          {series.map((s, i) => (
            <Line
              key={s.period.id}
              data={s.points}
              dataKey="wearMm"
              name={`Serial ${s.period.serial}`}
              stroke={seriesStrokes[i % seriesStrokes.length]}
              strokeWidth={2.5}
              dot={{ r: 4 }}
              isAnimationActive={false}
            />
          ))}
        </LineChart>
      </ResponsiveContainer>
    </div>
  );
}

export function PositionRoute() {
  const { projectId = '', positionId = '' } = useParams();
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  const { data: detail, dataUpdatedAt } = useSuspenseQuery(layoutQueries.detail(projectId, positionId));
  // Offline, a position never opened on this device shows the recent history kept for every position (decision 42).
  const olderNotKept = 'olderMeasurements' in detail ? detail.olderMeasurements : 0;
  const [axis, setAxis] = useState<Axis>('date');
  const online = useOnline();
  const tz = project.siteTimeZone;
  const { position, periods, measurements, photos } = detail;
  const current = periods.find((p) => p.removedAt == null);
  const lastOnCurrent = current && measurements.filter((m) => m.fittingId === current.id && m.wearMm != null).at(-1);

  const mCol = createColumnHelper<Measurement>();
  const measurementColumns = [
    mCol.accessor((m) => formatSiteDate(m.roundAt, tz), {
      id: 'date',
      header: 'Round',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
    }),
    mCol.accessor('chainageM', {
      meta: { csvDecimals: 1 },
      header: 'Chainage',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{formatChainage(getValue())}</span>,
    }),
    mCol.accessor('ringNumber', { meta: { csvDecimals: 0 }, header: 'Ring', cell: ({ getValue }) => getValue() ?? '—' }),
    mCol.accessor((m) => m.serial ?? '', {
      id: 'serial',
      header: 'Serial measured',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
    }),
    mCol.accessor('wearMm', {
      meta: { csvDecimals: 1 },
      header: 'Wear (mm)',
      cell: ({ getValue }) => getValue()?.toFixed(1) ?? 'not measured',
    }),
    mCol.accessor((m) => (m.wearMm == null ? null : Math.round((100 * m.wearMm) / position.wearLimitMm)), {
      id: 'percent',
      meta: { csvDecimals: 0 },
      header: '% of limit',
      cell: ({ getValue }) => {
        const v = getValue();
        return v == null ? '—' : v >= 100 ? <span className="whitespace-nowrap font-bold">{v} % · over</span> : `${v} %`;
      },
    }),
    mCol.accessor((m) => conditionsText(m.conditions), { id: 'conditions', header: 'Condition' }),
    mCol.accessor(
      (m) => (m.action === 'changed' ? `Changed: ${m.removedSerial ?? 'none'} → ${m.fittedSerial ?? '?'} (${m.changeReason ?? ''})` : ''),
      {
        id: 'action',
        header: 'Action',
        cell: ({ getValue }) => <span className="block min-w-48">{getValue()}</span>,
      },
    ),
    mCol.accessor((m) => [m.remeasured ? 'Re-measured (correction).' : '', m.note].filter(Boolean).join(' '), {
      id: 'note',
      header: 'Note',
    }),
  ];

  const pCol = createColumnHelper<FittedPeriod>();
  const periodColumns = [
    pCol.accessor('serial', {
      header: 'Serial',
      cell: ({ row }) => (
        <Link className={`${linkClass} whitespace-nowrap`} to={paths.cutter(projectId, row.original.cutterId)}>
          {row.original.serial}
        </Link>
      ),
    }),
    pCol.accessor((p) => formatSiteDate(p.fittedAt, tz), {
      id: 'fitted',
      header: 'Fitted',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
    }),
    pCol.accessor('fittedChainageM', {
      meta: { csvDecimals: 1 },
      header: 'At chainage',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{formatChainage(getValue())}</span>,
    }),
    pCol.accessor('fittedRing', { meta: { csvDecimals: 0 }, header: 'Ring', cell: ({ getValue }) => getValue() ?? '—' }),
    pCol.accessor((p) => (p.removedAt ? formatSiteDate(p.removedAt, tz) : 'still fitted'), {
      id: 'removed',
      header: 'Removed',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
    }),
    pCol.accessor('removedChainageM', {
      meta: { csvDecimals: 1 },
      header: 'At chainage',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{formatChainage(getValue())}</span>,
    }),
    pCol.accessor('removedRing', { meta: { csvDecimals: 0 }, header: 'Ring', cell: ({ getValue }) => getValue() ?? '—' }),
    pCol.accessor((p) => p.removalReason ?? '', { id: 'reason', header: 'Reason' }),
    pCol.accessor((p) => conditionsText(p.removalConditions), { id: 'condition', header: 'Condition when removed' }),
  ];

  const roundOfEntry = new Map(measurements.map((m) => [m.id, m]));
  return (
    <Page
      title={`Position ${position.number}`}
      actions={
        <Link className={`${linkClass} flex min-h-touch items-center`} to={paths.cutterhead(projectId)}>
          Back to the cutterhead
        </Link>
      }
    >
      <LastSynced
        at={dataUpdatedAt}
        timeZone={tz}
        always={olderNotKept > 0}
        more={
          olderNotKept > 0
            ? `This device keeps the newest ${detail.measurements.length} measurements; ${olderNotKept} older ones show when the network is back.`
            : undefined
        }
      />
      <Panel title="The position">
        <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-[max-content_1fr]">
          <dt className="font-semibold">Class</dt>
          <dd>
            {positionClassLabels[position.positionClass]}
            {position.twinDisc ? ', twin discs' : ''}
            {position.tiltDeg != null ? `, tilted ${position.tiltDeg}°` : ''}
          </dd>
          <dt className="font-semibold">Track radius</dt>
          <dd>{position.trackRadiusMm} mm</dd>
          <dt className="font-semibold">Disc size</dt>
          <dd>{position.discSizeIn}″</dd>
          <dt className="font-semibold">Wear limit</dt>
          <dd>{position.wearLimitMm} mm</dd>
          <dt className="font-semibold">Serial now</dt>
          <dd>
            {current ? (
              <>
                <Link className={linkClass} to={paths.cutter(projectId, current.cutterId)}>
                  {current.serial}
                </Link>{' '}
                since {formatSiteDate(current.fittedAt, tz)} at {formatChainage(current.fittedChainageM)}
                {current.fittedRing != null ? `, ring ${current.fittedRing}` : ''}
              </>
            ) : (
              'No cutter fitted'
            )}
          </dd>
          <dt className="font-semibold">Last wear</dt>
          <dd>
            {lastOnCurrent?.wearMm != null ? (
              <>
                {lastOnCurrent.wearMm} mm on {formatSiteDate(lastOnCurrent.roundAt, tz)} (
                {Math.round((100 * lastOnCurrent.wearMm) / position.wearLimitMm)} % of the limit
                {lastOnCurrent.wearMm >= position.wearLimitMm ? <strong> · over the limit</strong> : ''})
              </>
            ) : (
              'Not measured since fitted'
            )}
          </dd>
        </dl>
      </Panel>

      <Panel title="Wear history">
        <div className="mb-3 flex flex-wrap gap-2" role="group" aria-label="Wear against">
          <Button variant={axis === 'date' ? 'primary' : 'secondary'} aria-pressed={axis === 'date'} onClick={() => setAxis('date')}>
            Against date
          </Button>
          <Button
            variant={axis === 'chainage' ? 'primary' : 'secondary'}
            aria-pressed={axis === 'chainage'}
            onClick={() => setAxis('chainage')}
          >
            Against chainage
          </Button>
        </div>
        <WearChart detail={detail} axis={axis} timeZone={tz} reversed={axis === 'chainage' && project.driveDirection === 'decreasing'} />
        <div className="mt-4">
          <DataTable
            data={measurements}
            columns={measurementColumns}
            exportName={`kerfwise-position-${position.number}-wear`}
            emptyText="No inspections recorded here yet."
          />
        </div>
      </Panel>

      <Panel title="Changes">
        <DataTable
          data={periods}
          columns={periodColumns}
          exportName={`kerfwise-position-${position.number}-periods`}
          emptyText="No cutter has been fitted here yet."
        />
      </Panel>

      <Panel title="Photos">
        {photos.length === 0 ? (
          <p className="text-basalt-600">No photos of this position yet.</p>
        ) : !online ? (
          <p className="text-basalt-600">
            {photos.length} photo(s). Photos stay on the server, not on this device; they show when the network is back.
          </p>
        ) : (
          <ul className="grid grid-cols-2 gap-3 sm:grid-cols-3 md:grid-cols-4">
            {photos.map((photo) => {
              const entry = roundOfEntry.get(photo.entryId);
              const caption = `${entry ? formatSiteDate(entry.roundAt, tz) : formatSiteDate(photo.createdAt, tz)}${entry?.serial ? ` · ${entry.serial}` : ''}`;
              return (
                <li key={photo.id}>
                  <a
                    href={photoUrl(projectId, photo.id)}
                    target="_blank"
                    rel="noreferrer"
                    className="block rounded-md border border-basalt-200 p-1 hover:border-basalt-500"
                  >
                    <img
                      src={photoUrl(projectId, photo.id)}
                      alt={`Photo of position ${position.number}, ${caption}`}
                      loading="lazy"
                      className="aspect-square w-full rounded object-cover"
                    />
                    <span className="block px-1 pt-1 text-caption">{caption}</span>
                  </a>
                </li>
              );
            })}
          </ul>
        )}
      </Panel>
    </Page>
  );
}
