import { useState } from 'react';
import { Bar, CartesianGrid, ComposedChart, Legend, Line, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { createColumnHelper } from '@tanstack/react-table';
import { DataTable } from '../../../components/ui/data-table';
import { SelectField } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/page';
import type { DemandStop, PartsDemand } from '../api';
import { sourcesText, units } from '../format';

type Week = PartsDemand['weeks'][number];
const wCol = createColumnHelper<Week>();
/** Units as the chart's table shows them: whole, or one decimal for expected (fractional) units. */
const unitsColumn = (key: 'demand' | 'receipts' | 'rebuildReturns', header: string) =>
  wCol.accessor(key, { header, meta: { csvDecimals: 1 }, cell: ({ getValue }) => units(getValue()) });
const weekColumns = (stops: ReadonlyMap<string, DemandStop>) => [
  wCol.accessor('weekStartDate', {
    header: 'Week starting',
    cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span>,
  }),
  unitsColumn('demand', 'Demand'),
  unitsColumn('receipts', 'Deliveries'),
  unitsColumn('rebuildReturns', 'Rebuilt back'),
  wCol.accessor('projectedStock', {
    header: 'Projected stock',
    meta: { csvDecimals: 1 },
    cell: ({ getValue }) => (
      <span className={getValue() < 0 ? 'font-semibold text-alarm-700' : ''}>
        {units(getValue())}
        {getValue() < 0 ? ' (short)' : ''}
      </span>
    ),
  }),
  wCol.accessor((r) => sourcesText(r.sources, stops) || '—', { id: 'sources', header: 'Demand from' }),
];

/**
 * Projected stock of one part per week (line) against its demand (bars), with the safety stock and
 * the reorder point as dashed lines, and the same numbers as a table below for reading exactly.
 */
export function StockChart({ demand, partId, onPartChange }: { demand: PartsDemand; partId: string; onPartChange: (id: string) => void }) {
  const [showTable, setShowTable] = useState(false);
  const part = demand.parts.find((p) => p.id === partId) ?? demand.parts[0];
  if (!part) return null;
  const suggestion = demand.suggestions.find((s) => s.partId === part.id)!;
  const rows = demand.weeks.filter((w) => w.partId === part.id);
  const stops = new Map(demand.stops.map((s) => [s.id, s]));
  const data = rows.map((r) => ({
    week: r.weekStartDate,
    demand: Number(r.demand.toFixed(2)),
    stock: Number(r.projectedStock.toFixed(2)),
    inflow: Number((r.receipts + r.rebuildReturns).toFixed(2)),
  }));
  const lines = [
    {
      y: suggestion.reorderPoint,
      label: `Reorder point ${units(suggestion.reorderPoint)}`,
      colour: '#8e2214',
      position: 'insideTopRight' as const,
    },
    {
      y: suggestion.safetyStock,
      label: `Safety stock ${units(suggestion.safetyStock)}`,
      colour: '#7a5b00',
      position: 'insideBottomRight' as const,
    },
  ];
  return (
    <Panel title="Projected stock">
      <div className="mb-4 max-w-md">
        <SelectField label="Part" value={part.id} onChange={(e) => onPartChange(e.target.value)}>
          {demand.parts.map((p) => (
            <option key={p.id} value={p.id}>
              {p.code} — {p.name}
            </option>
          ))}
        </SelectField>
      </div>
      <p className="mb-2 text-basalt-700">
        {part.code}: {units(part.onHand)} on hand, {units(part.onOrder)} on order. Stock at the end of each week, after demand, deliveries
        {part.kind === 'cutter-assembly' ? ' and cutters back from the workshop' : ''}.
      </p>
      <div
        className="h-80 w-full"
        role="img"
        aria-label={`Projected stock of ${part.code} per week, with safety stock ${units(suggestion.safetyStock)} and reorder point ${units(suggestion.reorderPoint)}`}
      >
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart data={data} margin={{ top: 16, right: 24, bottom: 8, left: 8 }}>
            <CartesianGrid stroke="#e6e8e4" />
            <XAxis dataKey="week" tick={{ fontSize: 13 }} />
            <YAxis tick={{ fontSize: 13 }} allowDecimals={false} />
            <Tooltip formatter={(value, name) => [units(Number(value)), String(name)]} labelFormatter={(l) => `Week starting ${l}`} />
            <Legend />
            <ReferenceLine y={0} stroke="#1d201c" />
            {lines.map((l) => (
              <ReferenceLine
                key={l.label}
                y={l.y}
                ifOverflow="extendDomain"
                stroke={l.colour}
                strokeWidth={2}
                strokeDasharray="8 4"
                label={{ value: l.label, position: l.position, fill: l.colour, fontSize: 13 }}
              />
            ))}
            <Bar dataKey="demand" name="Demand" fill="#fca35e" />
            <Bar dataKey="inflow" name="Deliveries and rebuilt back" fill="#aab0a5" />
            <Line dataKey="stock" name="Projected stock" stroke="#1d201c" strokeWidth={3} type="stepAfter" dot={{ r: 3 }} />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      <button
        type="button"
        className="mt-3 min-h-touch font-semibold text-ember-700 underline underline-offset-2"
        aria-expanded={showTable}
        onClick={() => setShowTable((s) => !s)}
      >
        {showTable ? 'Hide the weeks as a table' : 'Show the weeks as a table'}
      </button>
      {showTable && (
        <div className="mt-2">
          <DataTable
            data={rows}
            columns={weekColumns(stops)}
            label={`Weeks of ${part.code}`}
            exportName={`kerfwise-stock-weeks-${part.code}`}
            getRowId={(r) => String(r.week)}
            filterable={false}
          />
        </div>
      )}
    </Panel>
  );
}
