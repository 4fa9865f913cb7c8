import {
  flexRender, getCoreRowModel, getFilteredRowModel, getSortedRowModel, useReactTable,
  type ColumnDef, type SortingState,
} from '@tanstack/react-table';
import { useState } from 'react';
import { downloadCsv, toCsv } from '../../lib/csv';
import { Button } from './button';

interface DataTableProps<T> {
  data: T[];
  columns: ColumnDef<T, any>[];
  /** File name for the CSV export, without extension. */
  exportName: string;
  emptyText?: string;
}

/** A table that sorts (click a header), filters (one search box) and exports what it shows to CSV. */
export function DataTable<T>({ data, columns, exportName, emptyText = 'Nothing here yet.' }: DataTableProps<T>) {
  const [sorting, setSorting] = useState<SortingState>([]);
  const [filter, setFilter] = useState('');
  const table = useReactTable({
    data,
    columns,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  const leafColumns = table.getAllLeafColumns();
  const exportCsv = () => {
    const header = leafColumns.map((c) => (typeof c.columnDef.header === 'string' ? c.columnDef.header : c.id));
    const rows = table.getRowModel().rows.map((r) => leafColumns.map((c) => {
      const v = r.getValue(c.id);
      return typeof v === 'number' || typeof v === 'string' ? v : v == null ? '' : String(v);
    }));
    downloadCsv(`${exportName}.csv`, toCsv(header, rows));
  };
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-end gap-3">
        <label className="flex-1 min-w-48">
          <span className="sr-only">Filter</span>
          <input
            type="search"
            placeholder="Filter…"
            value={filter}
            onChange={(e) => setFilter(e.target.value)}
            className="block w-full min-h-touch rounded-md border-2 border-basalt-300 bg-white px-3"
          />
        </label>
        <Button variant="secondary" onClick={exportCsv}>Export CSV</Button>
      </div>
      <div className="overflow-x-auto rounded-lg border border-basalt-200 bg-white">
        <table className="min-w-full text-left">
          <thead className="bg-basalt-100">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  return (
                    <th key={h.id} scope="col" aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : 'none'} className="p-0">
                      {h.isPlaceholder ? null : h.column.getCanSort() ? (
                        <button type="button" onClick={h.column.getToggleSortingHandler()} className="flex min-h-touch w-full items-center gap-1 px-3 font-semibold">
                          {flexRender(h.column.columnDef.header, h.getContext())}
                          <span aria-hidden="true">{sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : ''}</span>
                        </button>
                      ) : (
                        <span className="block px-3 font-semibold">{flexRender(h.column.columnDef.header, h.getContext())}</span>
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.length === 0 && (
              <tr><td colSpan={leafColumns.length} className="px-3 py-4 text-basalt-600">{emptyText}</td></tr>
            )}
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} className="border-t border-basalt-100">
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className="px-3 py-2 align-middle">{flexRender(cell.column.columnDef.cell, cell.getContext())}</td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
