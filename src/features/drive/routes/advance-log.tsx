import { useQuery, useQueryClient, useSuspenseQuery } from '@tanstack/react-query';
import {
  createColumnHelper, flexRender, getCoreRowModel, useReactTable,
  type PaginationState, type SortingState,
} from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import { useParams } from 'react-router';
import { roleCan } from '../../../../shared/roles';
import type { StrokeListQuery } from '../../../../shared/schemas/geology';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { SelectField, TextField } from '../../../components/ui/field';
import { Page, Panel } from '../../../components/ui/page';
import { formatChainage, formatDateTime } from '../../../lib/format';
import { projectQueries } from '../../projects/api';
import { driveQueries, strokesExportUrl, type Stroke, type StrokeFilters } from '../api';
import { AdvanceLogImport } from '../components/advance-log-import';
import { DailyAdvanceChart } from '../components/daily-advance-chart';

/** The server takes 10 to 500 rows a page (shared/schemas/geology.ts). */
const pageSizes = [10, 25, 50, 100, 250, 500];
const linkButton = 'inline-flex min-h-touch items-center justify-center rounded-md border-2 border-basalt-300 bg-white px-4 font-semibold text-basalt-900 hover:border-basalt-500';

const num = (v: number | null, decimals: number) => (v == null ? '—' : v.toLocaleString('en-GB', { minimumFractionDigits: decimals, maximumFractionDigits: decimals }));
const col = createColumnHelper<Stroke>();

function strokeColumns(timeZone: string) {
  // Column ids are the server's sort keys; the columns without one do not sort.
  return [
    col.accessor('ringNumber', { header: 'Ring' }),
    col.accessor('startTime', {
      header: 'Start – end (site time)',
      cell: ({ row }) => (
        <span className="whitespace-nowrap">{formatDateTime(row.original.startTime, timeZone)}–{formatDateTime(row.original.endTime, timeZone).slice(11)}</span>
      ),
    }),
    col.accessor('chainageStartM', {
      header: 'Chainage start → end',
      cell: ({ row }) => <span className="whitespace-nowrap">{formatChainage(row.original.chainageStartM)} → {formatChainage(row.original.chainageEndM)}</span>,
    }),
    col.accessor('revolutions', { header: 'Revolutions', cell: ({ getValue }) => num(getValue(), 0) }),
    col.accessor('penetrationMmPerRev', { header: 'Penetration (mm/rev)', cell: ({ getValue }) => num(getValue(), 1) }),
    col.accessor('rpm', { header: 'Speed (rpm)', cell: ({ getValue }) => num(getValue(), 1) }),
    col.accessor('thrustKn', { header: 'Thrust (kN)', cell: ({ getValue }) => num(getValue(), 0) }),
    col.accessor('torqueKnm', { header: 'Torque (kN·m)', cell: ({ getValue }) => num(getValue(), 0) }),
  ];
}

interface FilterText { ringFrom: string; ringTo: string; from: string; to: string }
const noFilters: FilterText = { ringFrom: '', ringTo: '', from: '', to: '' };
const ringOrNothing = (text: string) => (text.trim() !== '' && Number.isInteger(Number(text)) ? Number(text) : undefined);

/** The advance log: server-side paging, sorting and filtering, so a drive of 50,000 strokes stays quick. */
export function AdvanceLogRoute() {
  const { projectId = '' } = useParams();
  const queryClient = useQueryClient();
  const { data: project } = useSuspenseQuery(projectQueries.detail(projectId));
  const daily = useQuery(driveQueries.daily(projectId));
  const [sorting, setSorting] = useState<SortingState>([{ id: 'ringNumber', desc: true }]);
  const [pagination, setPagination] = useState<PaginationState>({ pageIndex: 0, pageSize: 50 });
  const [filterText, setFilterText] = useState<FilterText>(noFilters);

  const filters: StrokeFilters = {
    ringFrom: ringOrNothing(filterText.ringFrom),
    ringTo: ringOrNothing(filterText.ringTo),
    from: filterText.from || undefined,
    to: filterText.to || undefined,
  };
  const query: StrokeListQuery = {
    page: pagination.pageIndex + 1,
    pageSize: pagination.pageSize,
    sort: (sorting[0]?.id ?? 'ringNumber') as StrokeListQuery['sort'],
    dir: sorting[0]?.desc === false ? 'asc' : 'desc',
    ...filters,
  };
  const list = useQuery(driveQueries.strokes(projectId, query));
  const columns = useMemo(() => strokeColumns(project.siteTimeZone), [project.siteTimeZone]);
  const total = list.data?.total ?? 0;

  const table = useReactTable({
    data: list.data?.rows ?? [],
    columns,
    state: { sorting, pagination },
    manualSorting: true,
    manualPagination: true,
    rowCount: total,
    enableSortingRemoval: false,
    sortDescFirst: false,
    onSortingChange: (updater) => {
      setSorting(updater);
      setPagination((p) => ({ ...p, pageIndex: 0 }));
    },
    onPaginationChange: setPagination,
    getCoreRowModel: getCoreRowModel(),
    getRowId: (row) => String(row.id),
  });
  const setFilter = (key: keyof FilterText, value: string) => {
    setFilterText((f) => ({ ...f, [key]: value }));
    setPagination((p) => ({ ...p, pageIndex: 0 }));
  };
  const filtered = Object.values(filterText).some((v) => v !== '');
  const first = total === 0 ? 0 : pagination.pageIndex * pagination.pageSize + 1;
  const last = Math.min(total, (pagination.pageIndex + 1) * pagination.pageSize);
  const leafCount = table.getAllLeafColumns().length;

  return (
    <Page title="Advance log" actions={<a className={linkButton} href={strokesExportUrl(projectId, filters)} download>Export CSV</a>}>
      <p className="max-w-prose text-basalt-700">
        One row per ring or stroke as the machine logged it. Times are site time ({project.siteTimeZone}). The export holds every
        stroke that matches the filters.
      </p>

      <Panel title="Advance per day">
        {daily.error ? <Alert tone="error">{daily.error.message}</Alert> : daily.data ? <DailyAdvanceChart days={daily.data} /> : <p>Loading…</p>}
      </Panel>

      <Panel title="Strokes">
        <div className="space-y-4">
          <form className="grid grid-cols-2 gap-3 md:grid-cols-[1fr_1fr_1fr_1fr_auto] md:items-end" onSubmit={(e) => e.preventDefault()} aria-label="Filter the log">
            <TextField label="Ring from" type="number" inputMode="numeric" step={1} value={filterText.ringFrom} onChange={(e) => setFilter('ringFrom', e.target.value)} />
            <TextField label="Ring to" type="number" inputMode="numeric" step={1} value={filterText.ringTo} onChange={(e) => setFilter('ringTo', e.target.value)} />
            <TextField label="Date from" type="date" value={filterText.from} onChange={(e) => setFilter('from', e.target.value)} />
            <TextField label="Date to" type="date" value={filterText.to} onChange={(e) => setFilter('to', e.target.value)} />
            <Button variant="ghost" disabled={!filtered} onClick={() => { setFilterText(noFilters); setPagination((p) => ({ ...p, pageIndex: 0 })); }}>
              Clear filters
            </Button>
          </form>

          <p role="status" className="font-semibold">
            {list.isPending
              ? 'Loading…'
              : `${total.toLocaleString('en-GB')} ${total === 1 ? 'stroke' : 'strokes'}${filtered ? ' match the filters' : ''}${total > 0 ? ` · rows ${first.toLocaleString('en-GB')}–${last.toLocaleString('en-GB')}` : ''}`}
            {list.isPlaceholderData && <span className="ml-2 font-normal text-basalt-600">updating…</span>}
          </p>
          {list.error && <Alert tone="error">{list.error.message}</Alert>}

          <div className={`overflow-x-auto rounded-lg border border-basalt-200 bg-white ${list.isPlaceholderData ? 'opacity-60' : ''}`}>
            <table className="min-w-full text-left" aria-label="Advance log">
              <thead className="bg-basalt-100">
                {table.getHeaderGroups().map((hg) => (
                  <tr key={hg.id}>
                    {hg.headers.map((h) => {
                      const sorted = h.column.getIsSorted();
                      return (
                        <th key={h.id} scope="col" aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : 'none'} className="p-0 text-caption">
                          <button type="button" onClick={h.column.getToggleSortingHandler()} className="flex min-h-touch w-full items-center gap-1 px-3 text-left font-semibold">
                            {flexRender(h.column.columnDef.header, h.getContext())}
                            <span aria-hidden="true">{sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : ''}</span>
                          </button>
                        </th>
                      );
                    })}
                  </tr>
                ))}
              </thead>
              <tbody>
                {!list.isPending && total === 0 && (
                  <tr>
                    <td colSpan={leafCount} className="px-3 py-4 text-basalt-600">
                      {filtered ? 'No strokes match the filters.' : roleCan(project.role, 'drive.edit') ? 'No strokes yet. Import the machine’s advance log below.' : 'No strokes yet: the planner imports the advance log.'}
                    </td>
                  </tr>
                )}
                {table.getRowModel().rows.map((row) => (
                  <tr key={row.id} className="border-t border-basalt-100">
                    {row.getVisibleCells().map((cell) => (
                      <td key={cell.id} className="px-3 py-2 tabular-nums">{flexRender(cell.column.columnDef.cell, cell.getContext())}</td>
                    ))}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>

          <nav aria-label="Pages of the log" className="flex flex-wrap items-end gap-2">
            <Button variant="secondary" aria-label="First page" disabled={!table.getCanPreviousPage()} onClick={() => table.firstPage()}>«</Button>
            <Button variant="secondary" aria-label="Previous page" disabled={!table.getCanPreviousPage()} onClick={() => table.previousPage()}>‹ Previous</Button>
            <span className="flex min-h-touch items-center px-2 font-semibold">
              Page {total === 0 ? 0 : pagination.pageIndex + 1} of {table.getPageCount().toLocaleString('en-GB')}
            </span>
            <Button variant="secondary" aria-label="Next page" disabled={!table.getCanNextPage()} onClick={() => table.nextPage()}>Next ›</Button>
            <Button variant="secondary" aria-label="Last page" disabled={!table.getCanNextPage()} onClick={() => table.lastPage()}>»</Button>
            <div className="ml-auto w-36">
              <SelectField label="Rows per page" value={pagination.pageSize} onChange={(e) => setPagination({ pageIndex: 0, pageSize: Number(e.target.value) })}>
                {pageSizes.map((n) => <option key={n} value={n}>{n}</option>)}
              </SelectField>
            </div>
          </nav>
        </div>
      </Panel>

      {roleCan(project.role, 'drive.edit') && (
        <AdvanceLogImport projectId={projectId} onImported={() => queryClient.invalidateQueries({ queryKey: driveQueries.all(projectId) })} />
      )}
    </Page>
  );
}
