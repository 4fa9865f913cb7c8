import type { ColumnDef } from '@tanstack/react-table';
import type { ReactNode } from 'react';
import { Link } from 'react-router';
import { positionClassLabels } from '../../../../shared/cutters';
import { DataTable, RowExpandButton } from '../../../components/ui/data-table';
import { paths } from '../../../config/paths';
import { formatChainage } from '../../../../shared/domain/chainage';
import { formatSiteDate } from '../../../../shared/site-time';
import type { PositionForecast } from '../api';
import { fixed } from '../format';
import { Explanation } from './explanation';

type FlagKind = 'over' | 'bore' | 'beyond';
interface Flag {
  kind: FlagKind;
  text: string;
}

/** What needs a second look on a position, in words (the icon and colour only repeat them). */
function flagsOf(p: PositionForecast): Flag[] {
  const flags: Flag[] = [];
  if (p.p50.status === 'over_limit') flags.push({ kind: 'over', text: 'Over limit' });
  else if (p.p90.status === 'over_limit') flags.push({ kind: 'over', text: 'Over limit (P90)' });
  if (p.gaugeBore?.exceedsOvercut) {
    flags.push({
      kind: 'bore',
      text: `Gauge bore loss: ${fixed(p.gaugeBore.diameterLossMm)} mm, overcut ${fixed(p.gaugeBore.overcutMarginMm, 0)} mm`,
    });
  }
  if (p.p50.status === 'beyond_known_ground' || p.p90.status === 'beyond_known_ground')
    flags.push({ kind: 'beyond', text: 'Beyond known ground' });
  return flags;
}

const flagStyle: Record<FlagKind, { chip: string; icon: ReactNode }> = {
  over: {
    chip: 'border-alarm-500 bg-alarm-100 text-alarm-700',
    icon: <path d="M5 1h6l4 4v6l-4 4H5l-4-4V5z M7 4h2v5H7z M7 10.5h2v2H7z" fill="currentColor" fillRule="evenodd" />,
  },
  bore: {
    chip: 'border-caution-500 bg-caution-100 text-caution-700',
    icon: <path d="M8 1l7.5 14h-15z M7 6h2v4.5H7z M7 11.5h2v2H7z" fill="currentColor" fillRule="evenodd" />,
  },
  beyond: {
    chip: 'border-basalt-400 bg-basalt-100 text-basalt-800',
    icon: <path d="M1 7h9V3.5L15 8l-5 4.5V9H1z" fill="currentColor" />,
  },
};

function FlagChip({ flag }: { flag: Flag }) {
  const { chip, icon } = flagStyle[flag.kind];
  return (
    <span className={`inline-flex w-max max-w-44 items-start gap-1 rounded border px-2 py-0.5 text-caption font-semibold ${chip}`}>
      <svg width="16" height="16" viewBox="0 0 16 16" aria-hidden="true" className="mt-0.5 shrink-0">
        {icon}
      </svg>
      {flag.text}
    </span>
  );
}

/** P90 on top in bold, P50 under it. */
function Pair({ p90, p50 }: { p90: ReactNode; p50: ReactNode }) {
  return (
    <span className="block whitespace-nowrap">
      <span className="block font-semibold">
        <span className="text-caption text-basalt-600">P90 </span>
        {p90}
      </span>
      <span className="block">
        <span className="text-caption text-basalt-600">P50 </span>
        {p50}
      </span>
    </span>
  );
}

/**
 * Every position's change-out, most urgent (cautious P90) first: sorts, filters, exports CSV, and
 * opens "how was this made" under a row.
 */
export function ForecastTable({
  projectId,
  positions,
  timeZone,
  groundName,
}: {
  projectId: string;
  positions: PositionForecast[];
  timeZone: string;
  groundName: (id: string | null) => string;
}) {
  const date = (at: string) => formatSiteDate(at, timeZone);

  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- mixed value types, as TanStack Table types them
  const columns: ColumnDef<PositionForecast, any>[] = [
    {
      id: 'position',
      header: 'Position',
      accessorFn: (p) => p.position.positionNumber,
      cell: ({ row }) => (
        <Link
          className="font-semibold text-ember-700 underline underline-offset-2"
          to={paths.position(projectId, row.original.position.positionId)}
        >
          {row.original.position.positionNumber}
        </Link>
      ),
    },
    { id: 'class', header: 'Class', accessorFn: (p) => positionClassLabels[p.position.positionClass] },
    {
      id: 'serial',
      header: 'Serial',
      accessorFn: (p) => p.serial ?? '',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
    },
    {
      id: 'wear',
      header: 'Wear now (mm)',
      accessorFn: (p) => p.p90.wearNowMm,
      cell: ({ row }) => <Pair p90={fixed(row.original.p90.wearNowMm)} p50={fixed(row.original.p50.wearNowMm)} />,
    },
    { id: 'limit', header: 'Limit (mm)', accessorFn: (p) => p.position.allowableWearMm, meta: { csvDecimals: 1 } },
    {
      id: 'chainage',
      header: 'Change-out at',
      accessorFn: (p) => p.p90.remainingM,
      cell: ({ row }) => <Pair p90={formatChainage(row.original.p90.chainageM)} p50={formatChainage(row.original.p50.chainageM)} />,
    },
    {
      id: 'ring',
      header: 'Ring',
      accessorFn: (p) => p.p90.ringNumber,
      cell: ({ row }) => <Pair p90={row.original.p90.ringNumber} p50={row.original.p50.ringNumber} />,
    },
    {
      id: 'date',
      header: 'Date',
      accessorFn: (p) => p.p90.date,
      cell: ({ row }) => <Pair p90={date(row.original.p90.date)} p50={date(row.original.p50.date)} />,
    },
    {
      id: 'remaining',
      header: 'Remaining (m)',
      accessorFn: (p) => p.p90.remainingM,
      cell: ({ row }) => {
        const r = row.original;
        const atLeast = (q: 'p50' | 'p90') => `${r[q].status === 'beyond_known_ground' ? '≥ ' : ''}${fixed(r[q].remainingM, 0)}`;
        return <Pair p90={atLeast('p90')} p50={atLeast('p50')} />;
      },
    },
    {
      id: 'flags',
      header: 'Flags',
      accessorFn: (p) =>
        flagsOf(p)
          .map((f) => f.text)
          .join('; '),
      enableSorting: false,
      cell: ({ row }) => (
        <span className="flex flex-col items-start gap-1">
          {flagsOf(row.original).map((f) => (
            <FlagChip key={f.kind} flag={f} />
          ))}
        </span>
      ),
    },
    {
      id: 'how',
      header: 'How was this made',
      enableSorting: false,
      enableGlobalFilter: false,
      cell: ({ row }) => (
        <RowExpandButton
          row={row}
          controls={`explain-${row.id}`}
          label="How?"
          hiddenText={`How was the forecast of position ${row.original.position.positionNumber} made`}
        />
      ),
    },
  ];

  // Numbers stay numbers (rounded by the writer as the table shows them), so an overdue negative
  // remaining distance is not mistaken for a formula cell.
  // Decimals as the cells show them: wear with `fixed` (1), remaining with `fixed(…, 0)`, chainage 1.
  const csvHeader = [
    { header: 'Position', decimals: 0 },
    'Class',
    'Serial',
    { header: 'Wear now P50 (mm)', decimals: 1 },
    { header: 'Wear now P90 (mm)', decimals: 1 },
    { header: 'Limit (mm)', decimals: 1 },
    ...(['P90', 'P50'] as const).flatMap((q) => [
      `${q} chainage`,
      { header: `${q} chainage (m)`, decimals: 1 },
      { header: `${q} ring`, decimals: 0 },
      `${q} date`,
      { header: `${q} remaining (m)`, decimals: 0 },
      `${q} status`,
    ]),
    'Flags',
  ];
  const csvRow = (p: PositionForecast) => [
    p.position.positionNumber,
    positionClassLabels[p.position.positionClass],
    p.serial,
    p.p50.wearNowMm,
    p.p90.wearNowMm,
    p.position.allowableWearMm,
    ...(['p90', 'p50'] as const).flatMap((q) => [
      formatChainage(p[q].chainageM),
      p[q].chainageM,
      p[q].ringNumber,
      date(p[q].date),
      p[q].remainingM,
      p[q].status.replaceAll('_', ' '),
    ]),
    flagsOf(p)
      .map((f) => f.text)
      .join('; '),
  ];

  return (
    <DataTable
      data={positions}
      columns={columns}
      label="Change-out forecast by position"
      exportName="kerfwise-change-out-forecast"
      csv={{ header: csvHeader, row: csvRow }}
      initialSort={[{ id: 'remaining', desc: false }]}
      getRowId={(p) => p.position.positionId}
      stickyColumnId="position"
      filterPlaceholder="Filter… (position, class, serial, flag)"
      emptyText="No position to forecast yet."
      expandIdPrefix="explain-"
      renderExpanded={(row) => (
        <>
          <h3 className="mb-2 text-lead font-semibold">How the forecast of position {row.original.position.positionNumber} was made</h3>
          <Explanation projectId={projectId} positionId={row.id} groundName={groundName} timeZone={timeZone} />
        </>
      )}
    />
  );
}
