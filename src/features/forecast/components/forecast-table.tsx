import {
  flexRender, getCoreRowModel, getFilteredRowModel, getSortedRowModel, useReactTable,
  type ColumnDef, type SortingState,
} from '@tanstack/react-table';
import { Fragment, useState, type ReactNode } from 'react';
import { Link } from 'react-router';
import { positionClassLabels } from '../../../../shared/cutters';
import { Button } from '../../../components/ui/button';
import { paths } from '../../../config/paths';
import { downloadCsv, toCsv } from '../../../lib/csv';
import { formatChainage, formatDate } from '../../../lib/format';
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
    flags.push({ kind: 'bore', text: `Gauge bore loss: ${fixed(p.gaugeBore.diameterLossMm)} mm, overcut ${fixed(p.gaugeBore.overcutMarginMm, 0)} mm` });
  }
  if (p.p50.status === 'beyond_known_ground' || p.p90.status === 'beyond_known_ground') flags.push({ kind: 'beyond', text: 'Beyond known ground' });
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
      <svg width="16" height="16" viewBox="0 0 16 16" aria-hidden="true" className="mt-0.5 shrink-0">{icon}</svg>
      {flag.text}
    </span>
  );
}

/** The position number stays in view while the table scrolls sideways on a tablet. */
const stickyFirst = 'sticky left-0 z-10';

/** P90 on top in bold, P50 under it. */
function Pair({ p90, p50 }: { p90: ReactNode; p50: ReactNode }) {
  return (
    <span className="block whitespace-nowrap">
      <span className="block font-semibold"><span className="text-caption text-basalt-600">P90 </span>{p90}</span>
      <span className="block"><span className="text-caption text-basalt-600">P50 </span>{p50}</span>
    </span>
  );
}

/**
 * Every position's change-out, most urgent (cautious P90) first: sorts, filters, exports CSV, and
 * opens "how was this made" under a row. (The kit's DataTable has no rows that open.)
 */
export function ForecastTable({ projectId, positions, timeZone, groundName }: {
  projectId: string;
  positions: PositionForecast[];
  timeZone: string;
  groundName: (id: string | null) => string;
}) {
  const [sorting, setSorting] = useState<SortingState>([{ id: 'remaining', desc: false }]);
  const [filter, setFilter] = useState('');
  const [open, setOpen] = useState<ReadonlySet<string>>(new Set());
  const toggle = (id: string) => setOpen((s) => {
    const next = new Set(s);
    if (!next.delete(id)) next.add(id);
    return next;
  });
  const date = (at: string) => formatDate(at, timeZone);

  const columns: ColumnDef<PositionForecast, any>[] = [
    {
      id: 'position',
      header: 'Position',
      accessorFn: (p) => p.position.positionNumber,
      cell: ({ row }) => (
        <Link className="font-semibold text-ember-700 underline underline-offset-2" to={paths.position(projectId, row.original.position.positionId)}>
          {row.original.position.positionNumber}
        </Link>
      ),
    },
    { id: 'class', header: 'Class', accessorFn: (p) => positionClassLabels[p.position.positionClass] },
    { id: 'serial', header: 'Serial', accessorFn: (p) => p.serial ?? '', cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span> },
    {
      id: 'wear',
      header: 'Wear now (mm)',
      accessorFn: (p) => p.p90.wearNowMm,
      cell: ({ row }) => <Pair p90={fixed(row.original.p90.wearNowMm)} p50={fixed(row.original.p50.wearNowMm)} />,
    },
    { id: 'limit', header: 'Limit (mm)', accessorFn: (p) => p.position.allowableWearMm },
    {
      id: 'chainage',
      header: 'Change-out at',
      accessorFn: (p) => p.p90.remainingM,
      cell: ({ row }) => <Pair p90={formatChainage(row.original.p90.chainageM)} p50={formatChainage(row.original.p50.chainageM)} />,
    },
    { id: 'ring', header: 'Ring', accessorFn: (p) => p.p90.ringNumber, cell: ({ row }) => <Pair p90={row.original.p90.ringNumber} p50={row.original.p50.ringNumber} /> },
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
      accessorFn: (p) => flagsOf(p).map((f) => f.text).join('; '),
      enableSorting: false,
      cell: ({ row }) => <span className="flex flex-col items-start gap-1">{flagsOf(row.original).map((f) => <FlagChip key={f.kind} flag={f} />)}</span>,
    },
    {
      id: 'how',
      header: 'How was this made',
      enableSorting: false,
      enableGlobalFilter: false,
      cell: ({ row }) => {
        const id = row.original.position.positionId;
        const isOpen = open.has(id);
        return (
          <Button variant="ghost" aria-expanded={isOpen} aria-controls={`explain-${id}`} onClick={() => toggle(id)} className="whitespace-nowrap border-2 border-basalt-200">
            <span aria-hidden="true">{isOpen ? '▾' : '▸'}</span>
            {isOpen ? 'Hide' : 'How?'}
            <span className="sr-only"> How was the forecast of position {row.original.position.positionNumber} made</span>
          </Button>
        );
      },
    },
  ];

  const table = useReactTable({
    data: positions,
    columns,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    getRowId: (p) => p.position.positionId,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });

  const exportCsv = () => {
    const header = [
      'Position', 'Class', 'Serial', 'Wear now P50 (mm)', 'Wear now P90 (mm)', 'Limit (mm)',
      'P90 chainage', 'P90 chainage (m)', 'P90 ring', 'P90 date', 'P90 remaining (m)', 'P90 status',
      'P50 chainage', 'P50 chainage (m)', 'P50 ring', 'P50 date', 'P50 remaining (m)', 'P50 status', 'Flags',
    ];
    const rows = table.getRowModel().rows.map(({ original: p }) => [
      p.position.positionNumber, positionClassLabels[p.position.positionClass], p.serial, fixed(p.p50.wearNowMm, 2), fixed(p.p90.wearNowMm, 2), p.position.allowableWearMm,
      ...(['p90', 'p50'] as const).flatMap((q) => [
        formatChainage(p[q].chainageM), fixed(p[q].chainageM, 1), p[q].ringNumber, date(p[q].date), fixed(p[q].remainingM, 1), p[q].status.replaceAll('_', ' '),
      ]),
      flagsOf(p).map((f) => f.text).join('; '),
    ]);
    downloadCsv('kerfwise-change-out-forecast.csv', toCsv(header, rows));
  };

  const columnCount = table.getAllLeafColumns().length;
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-end gap-3">
        <label className="min-w-48 flex-1">
          <span className="sr-only">Filter</span>
          <input
            type="search"
            placeholder="Filter… (position, class, serial, flag)"
            value={filter}
            onChange={(e) => setFilter(e.target.value)}
            className="block min-h-touch w-full rounded-md border-2 border-basalt-300 bg-white px-3"
          />
        </label>
        <Button variant="secondary" onClick={exportCsv}>Export CSV</Button>
      </div>
      {/* A size container, so an opened explanation is as wide as the visible table (100cqw); relative, so the buttons’ screen-reader text scrolls with it. */}
      <div className="@container relative overflow-x-auto rounded-lg border border-basalt-200 bg-white">
        <table className="min-w-full text-left" aria-label="Change-out forecast by position">
          <thead className="bg-basalt-100">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  return (
                    <th
                      key={h.id}
                      scope="col"
                      aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : 'none'}
                      className={`p-0 align-bottom ${h.column.id === 'position' ? `${stickyFirst} bg-basalt-100` : ''}`}
                    >
                      {h.column.getCanSort() ? (
                        <button type="button" onClick={h.column.getToggleSortingHandler()} className="flex min-h-touch w-full items-center gap-1 px-3 text-left font-semibold">
                          {flexRender(h.column.columnDef.header, h.getContext())}
                          <span aria-hidden="true">{sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : ''}</span>
                        </button>
                      ) : (
                        <span className="block px-3 py-2 font-semibold">{flexRender(h.column.columnDef.header, h.getContext())}</span>
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.length === 0 && (
              <tr><td colSpan={columnCount} className="px-3 py-4 text-basalt-600">{positions.length === 0 ? 'No position to forecast yet.' : 'No position matches the filter.'}</td></tr>
            )}
            {table.getRowModel().rows.map((row) => (
              <Fragment key={row.id}>
                <tr className="border-t border-basalt-100">
                  {row.getVisibleCells().map((cell) => (
                    <td key={cell.id} className={`px-3 py-2 align-middle ${cell.column.id === 'position' ? `${stickyFirst} bg-white` : ''}`}>
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  ))}
                </tr>
                {open.has(row.id) && (
                  <tr id={`explain-${row.id}`} className="bg-basalt-50">
                    <td colSpan={columnCount} className="p-0">
                      <div className="sticky left-0 max-w-[100cqw] p-4">
                        <h3 className="mb-2 text-lead font-semibold">How the forecast of position {row.original.position.positionNumber} was made</h3>
                        <Explanation projectId={projectId} positionId={row.id} groundName={groundName} timeZone={timeZone} />
                      </div>
                    </td>
                  </tr>
                )}
              </Fragment>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
