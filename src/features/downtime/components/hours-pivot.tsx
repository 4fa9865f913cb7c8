import { createColumnHelper } from '@tanstack/react-table';
import { DataTable } from '../../../components/ui/data-table';

interface PivotRow {
  cause: string;
  cutterWork: string;
  hours: Record<string, number>;
  total: number;
}

const ALL = 'All causes';
const col = createColumnHelper<PivotRow>();
const hoursCell = (h: number) => (h === 0 ? <span className="text-basalt-400">0</span> : h.toFixed(1));

/**
 * Hours by cause (rows) and period (columns: ISO weeks or shifts), with a total per cause and an
 * "All causes" row; sorts, filters and exports like every table.
 */
export function HoursPivot<T extends { cause: string; cutterWork: boolean; hours: number }>({
  rows,
  columns,
  columnOf,
  exportName,
  columnLabel,
}: {
  rows: T[];
  columns: string[];
  columnOf: (row: T) => string;
  exportName: string;
  columnLabel?: (column: string) => string;
}) {
  const byCause = new Map<string, PivotRow>();
  const all: PivotRow = { cause: ALL, cutterWork: '', hours: Object.fromEntries(columns.map((c) => [c, 0])), total: 0 };
  for (const r of rows) {
    const key = columnOf(r);
    const row = byCause.get(r.cause) ?? {
      cause: r.cause,
      cutterWork: r.cutterWork ? 'yes' : 'no',
      hours: Object.fromEntries(columns.map((c) => [c, 0])),
      total: 0,
    };
    row.hours[key] = (row.hours[key] ?? 0) + r.hours;
    row.total += r.hours;
    all.hours[key] = (all.hours[key] ?? 0) + r.hours;
    all.total += r.hours;
    byCause.set(r.cause, row);
  }
  const data = [...[...byCause.values()].sort((a, b) => b.total - a.total), ...(byCause.size > 0 ? [all] : [])];
  const tableColumns = [
    col.accessor('cause', {
      header: 'Cause',
      cell: ({ getValue }) => <span className={getValue() === ALL ? 'font-semibold' : ''}>{getValue()}</span>,
    }),
    col.accessor('cutterWork', { header: 'Cutter work' }),
    ...columns.map((c) =>
      col.accessor((r) => r.hours[c] ?? 0, {
        id: c,
        header: columnLabel ? columnLabel(c) : c,
        cell: ({ getValue }) => hoursCell(getValue()),
        meta: { csvDecimals: 1 },
      }),
    ),
    col.accessor('total', {
      header: 'Total (h)',
      cell: ({ getValue }) => <span className="font-semibold">{getValue().toFixed(1)}</span>,
      meta: { csvDecimals: 1 },
    }),
  ];
  return <DataTable data={data} columns={tableColumns} exportName={exportName} emptyText="No downtime in this period." />;
}
