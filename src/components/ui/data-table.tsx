import {
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type CellContext,
  type Column,
  type ColumnDef,
  type OnChangeFn,
  type PaginationState,
  type Row,
  type RowData,
  type SortingState,
} from '@tanstack/react-table';
import { Fragment, useState, type ReactNode } from 'react';
import type { CsvColumn } from '../../../shared/csv-writer';
import { downloadCsv, tableCsv } from '../../lib/csv';
import { Alert } from './alert';
import { Button } from './button';
import { SelectField } from './field';

type CsvValue = string | number | null | undefined;

declare module '@tanstack/react-table' {
  // eslint-disable-next-line @typescript-eslint/no-unused-vars
  interface ColumnMeta<TData extends RowData, TValue> {
    /**
     * Decimals of this column's numbers, as the cell shows them: the CSV export writes them so, and
     * a column without its own `cell` shows them so. Export refuses a numeric column without it.
     */
    csvDecimals?: number;
    /** The CSV header when `header` is not plain text. */
    csvHeader?: string;
  }
}

/**
 * Paging, sorting and filtering done by the server: the table shows the one page it is given and
 * reports what the user asks for. Filters are the page's own fields (`toolbar`).
 */
export interface ServerPaging {
  rowCount: number;
  sorting: SortingState;
  onSortingChange: OnChangeFn<SortingState>;
  pagination: PaginationState;
  onPaginationChange: OnChangeFn<PaginationState>;
  /** Page sizes the server accepts. */
  pageSizes: readonly number[];
  /** The old page is still shown while the next one loads. */
  stale?: boolean;
}

interface DataTableProps<T> {
  data: T[];
  // Columns of different value types in one list: TanStack Table's own typing for this is `any`.
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  columns: ColumnDef<T, any>[];
  /** File name for the CSV export, without extension. */
  exportName: string;
  emptyText?: string;
  /** The table's accessible name. */
  label?: string;
  /** Sorted this way when the page opens. */
  initialSort?: SortingState;
  getRowId?: (row: T) => string;
  /** Rows that open: what shows under an opened row (a cell toggles it with `row.toggleExpanded()`). */
  renderExpanded?: (row: Row<T>) => ReactNode;
  /** The id of an opened row's detail is this prefix + the row id (for a toggle's aria-controls). */
  expandIdPrefix?: string;
  /** The column that stays in view while the table scrolls sideways; by default the first. */
  stickyColumnId?: string;
  filterPlaceholder?: string;
  /** The search box; off for small tables inside another (a row's detail, a work pack). */
  filterable?: boolean;
  /**
   * The CSV export: by default the columns as shown; `csv` names its own columns; `exportHref`
   * downloads from the server instead (all matching rows, not just the page shown).
   */
  csv?: { header: (string | CsvColumn)[]; row: (row: T) => CsvValue[] };
  exportHref?: string;
  /** Fields above the table (server filters). */
  toolbar?: ReactNode;
  server?: ServerPaging;
}

const sortIcon = (sorted: false | 'asc' | 'desc') => (sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '');
const ariaSort = (sorted: false | 'asc' | 'desc') => (sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : 'none');

/**
 * The one table of Kerfwise (TanStack Table): sorts by a header click (with an initial sort),
 * filters with one search box, exports CSV, opens rows to show more under them, and pages on the
 * server when `server` is given.
 */
export function DataTable<T>({
  data,
  columns,
  exportName,
  emptyText = 'Nothing here yet.',
  label,
  initialSort = [],
  getRowId,
  renderExpanded,
  expandIdPrefix = 'row-detail-',
  stickyColumnId,
  filterPlaceholder = 'Filter…',
  filterable = true,
  csv,
  exportHref,
  toolbar,
  server,
}: DataTableProps<T>) {
  const [localSorting, setLocalSorting] = useState<SortingState>(initialSort);
  const [filter, setFilter] = useState('');
  const [csvRefusal, setCsvRefusal] = useState<string | null>(null);
  const table = useReactTable({
    data,
    columns,
    defaultColumn: { cell: defaultCell },
    getRowId,
    getCoreRowModel: getCoreRowModel(),
    getRowCanExpand: () => renderExpanded != null,
    ...(server
      ? {
          state: { sorting: server.sorting, pagination: server.pagination },
          manualSorting: true,
          manualPagination: true,
          rowCount: server.rowCount,
          enableSortingRemoval: false,
          sortDescFirst: false,
          onSortingChange: server.onSortingChange,
          onPaginationChange: server.onPaginationChange,
        }
      : {
          state: { sorting: localSorting, globalFilter: filter },
          onSortingChange: setLocalSorting,
          onGlobalFilterChange: setFilter,
          getSortedRowModel: getSortedRowModel(),
          getFilteredRowModel: getFilteredRowModel(),
        }),
  });
  const leafColumns = table.getAllLeafColumns();
  const rows = table.getRowModel().rows;

  const exportCsv = () => {
    const result = csv
      ? tableCsv(
          csv.header,
          rows.map((r) => csv.row(r.original)),
        )
      : tableCsv(...columnsCsv(leafColumns, rows));
    setCsvRefusal(result.ok ? null : result.message);
    if (result.ok) downloadCsv(`${exportName}.csv`, result.text);
  };
  const firstColumnId = stickyColumnId ?? leafColumns[0]?.id;
  // The header row stays on top while the panel scrolls down; the first column stays left while it scrolls sideways.
  const stickyHead = (columnId: string) => `sticky top-0 bg-basalt-100 ${columnId === firstColumnId ? 'left-0 z-30' : 'z-20'}`;
  const stickyCell = (columnId: string) => (columnId === firstColumnId ? 'sticky left-0 z-10 bg-white' : '');

  return (
    <div className="space-y-3">
      {toolbar}
      <div className="no-print flex flex-wrap items-end gap-3">
        {!server && filterable && (
          <label className="min-w-48 flex-1">
            <span className="sr-only">Filter</span>
            <input
              type="search"
              placeholder={filterPlaceholder}
              value={filter}
              onChange={(e) => setFilter(e.target.value)}
              className="block min-h-touch w-full rounded-md border-2 border-basalt-300 bg-white px-3"
            />
          </label>
        )}
        {exportHref ? (
          <a
            className="ml-auto inline-flex min-h-touch items-center justify-center rounded-md border-2 border-basalt-300 bg-white px-4 font-semibold text-basalt-900 hover:border-basalt-500"
            href={exportHref}
            download
          >
            Export CSV
          </a>
        ) : (
          <Button variant="secondary" onClick={exportCsv}>
            Export CSV
          </Button>
        )}
      </div>
      {csvRefusal && <Alert tone="error">{csvRefusal}</Alert>}
      {/* A size container, so an opened row is as wide as the visible table (100cqw); relative, so screen-reader text scrolls with it. */}
      <div
        data-table-scroll=""
        className={`@container relative max-h-[75vh] overflow-auto rounded-lg print:max-h-none print:overflow-visible border border-basalt-200 bg-white ${server?.stale ? 'opacity-60' : ''}`}
      >
        <table className="min-w-full border-separate border-spacing-0 text-left" aria-label={label}>
          <thead className="bg-basalt-100">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  return (
                    <th
                      key={h.id}
                      scope="col"
                      aria-sort={ariaSort(sorted)}
                      className={`border-b border-basalt-200 p-0 align-bottom ${stickyHead(h.column.id)}`}
                    >
                      {h.isPlaceholder ? null : h.column.getCanSort() ? (
                        <button
                          type="button"
                          onClick={h.column.getToggleSortingHandler()}
                          className="flex min-h-touch w-full items-center gap-1 px-2 text-left font-semibold"
                        >
                          {flexRender(h.column.columnDef.header, h.getContext())}
                          <span aria-hidden="true">{sortIcon(sorted)}</span>
                        </button>
                      ) : (
                        <span className="block px-2 py-2 font-semibold">{flexRender(h.column.columnDef.header, h.getContext())}</span>
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {rows.length === 0 && (
              <tr>
                <td colSpan={leafColumns.length} className="px-2 py-4 text-basalt-600">
                  {data.length === 0 || server ? emptyText : 'Nothing matches the filter.'}
                </td>
              </tr>
            )}
            {rows.map((row) => (
              <Fragment key={row.id}>
                <tr>
                  {row.getVisibleCells().map((cell) => (
                    <td
                      key={cell.id}
                      className={`border-b border-basalt-100 px-2 py-2 align-middle tabular-nums ${stickyCell(cell.column.id)}`}
                    >
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  ))}
                </tr>
                {renderExpanded && row.getIsExpanded() && (
                  <tr id={`${expandIdPrefix}${row.id}`} className="bg-basalt-50">
                    <td colSpan={leafColumns.length} className="p-0">
                      <div className="sticky left-0 max-w-[100cqw] p-4">{renderExpanded(row)}</div>
                    </td>
                  </tr>
                )}
              </Fragment>
            ))}
          </tbody>
        </table>
      </div>
      {server && <Pager table={table} paging={server} label={label} />}
    </div>
  );
}

/** A cell without its own renderer: a number with its column's decimals (as the CSV writes it), else the value as text. */
function defaultCell<T>({ getValue, column }: CellContext<T, unknown>): ReactNode {
  const value = getValue();
  const decimals = column.columnDef.meta?.csvDecimals;
  if (typeof value === 'number' && decimals != null) return Number.isFinite(value) ? value.toFixed(decimals) : '—';
  return value == null ? null : String(value);
}

/**
 * The default CSV: the columns with values (buttons and other display-only columns are left out),
 * headed as on screen, each with its decimals from `meta.csvDecimals`.
 */
export function columnsCsv<T>(leafColumns: Column<T, unknown>[], rows: Row<T>[]): [CsvColumn[], CsvValue[][]] {
  const exported = leafColumns.filter((c) => c.accessorFn != null);
  const header = exported.map((c) => ({
    header: c.columnDef.meta?.csvHeader ?? (typeof c.columnDef.header === 'string' ? c.columnDef.header : c.id),
    decimals: c.columnDef.meta?.csvDecimals,
  }));
  const values = rows.map((r) =>
    exported.map((c) => {
      const v = r.getValue(c.id);
      return typeof v === 'number' || typeof v === 'string' ? v : v == null ? '' : String(v);
    }),
  );
  return [header, values];
}

function Pager<T>({ table, paging, label }: { table: ReturnType<typeof useReactTable<T>>; paging: ServerPaging; label?: string }) {
  const { rowCount, pagination } = paging;
  return (
    <nav aria-label={label ? `Pages of ${label.toLowerCase()}` : 'Pages'} className="flex flex-wrap items-end gap-2">
      <Button variant="secondary" aria-label="First page" disabled={!table.getCanPreviousPage()} onClick={() => table.firstPage()}>
        «
      </Button>
      <Button variant="secondary" aria-label="Previous page" disabled={!table.getCanPreviousPage()} onClick={() => table.previousPage()}>
        ‹ Previous
      </Button>
      <span className="flex min-h-touch items-center px-2 font-semibold">
        Page {rowCount === 0 ? 0 : pagination.pageIndex + 1} of {table.getPageCount().toLocaleString('en-GB')}
      </span>
      <Button variant="secondary" aria-label="Next page" disabled={!table.getCanNextPage()} onClick={() => table.nextPage()}>
        Next ›
      </Button>
      <Button variant="secondary" aria-label="Last page" disabled={!table.getCanNextPage()} onClick={() => table.lastPage()}>
        »
      </Button>
      <div className="ml-auto w-36">
        <SelectField
          label="Rows per page"
          value={pagination.pageSize}
          onChange={(e) => table.setPagination({ pageIndex: 0, pageSize: Number(e.target.value) })}
        >
          {paging.pageSizes.map((n) => (
            <option key={n} value={n}>
              {n}
            </option>
          ))}
        </SelectField>
      </div>
    </nav>
  );
}

/** The button that opens a row of a DataTable to show more under it ("Why?", "How?"); its hidden text says what opens. */
export function RowExpandButton<T>({
  row,
  controls,
  label,
  hiddenText,
}: {
  row: Row<T>;
  controls: string;
  label: string;
  hiddenText: string;
}) {
  const isOpen = row.getIsExpanded();
  return (
    <Button
      variant="ghost"
      aria-expanded={isOpen}
      aria-controls={controls}
      onClick={() => row.toggleExpanded()}
      className="whitespace-nowrap border-2 border-basalt-200"
    >
      <span aria-hidden="true">{isOpen ? '▾' : '▸'}</span>
      {isOpen ? 'Hide' : label}
      <span className="sr-only"> {hiddenText}</span>
    </Button>
  );
}
