import { createColumnHelper } from '@tanstack/react-table';
import { partKindLabels } from '../../../../shared/schemas/parts';
import { DataTable, RowExpandButton } from '../../../components/ui/data-table';
import { Panel } from '../../../components/ui/page';
import type { OrderSuggestion } from '../../../../shared/schemas/parts';
import type { CataloguePart, DemandStop, PartsDemand } from '../api';
import { money, sourceLabel, sourcesText, units } from '../format';

/** "Order now" in words and colour, so the flag reads without colour too. */
function OrderFlag({ s }: { s: OrderSuggestion }) {
  return s.orderNow ? (
    <span className="inline-block whitespace-nowrap rounded-md bg-alarm-100 px-2 py-1 font-semibold text-alarm-700">
      Order now: {s.orderQty}
    </span>
  ) : (
    <span className="inline-block whitespace-nowrap rounded-md bg-moss-100 px-2 py-1 text-moss-700">Covered</span>
  );
}

type StockRow = CataloguePart & { s: OrderSuggestion };
const stockCol = createColumnHelper<StockRow>();

/** The parts with stock on hand, on order, weeks of cover and the order-now flag. */
export function PartsStockTable({ demand, onShow }: { demand: PartsDemand; onShow: (partId: string) => void }) {
  const rows: StockRow[] = demand.parts.map((p) => ({ ...p, s: demand.suggestions.find((x) => x.partId === p.id)! }));
  const columns = [
    stockCol.accessor('code', {
      header: 'Code',
      cell: ({ row }) => (
        <button
          type="button"
          className="min-h-touch whitespace-nowrap font-semibold text-ember-700 underline underline-offset-2"
          onClick={() => onShow(row.original.id)}
          aria-label={`Show the projected stock of ${row.original.code}`}
        >
          {row.original.code}
        </button>
      ),
    }),
    stockCol.accessor('name', { header: 'Name' }),
    stockCol.accessor((r) => partKindLabels[r.kind], { id: 'kind', header: 'Kind' }),
    stockCol.accessor('onHand', { meta: { csvDecimals: 0 }, header: 'On hand' }),
    stockCol.accessor('onOrder', { meta: { csvDecimals: 0 }, header: 'On order' }),
    stockCol.accessor((r) => (r.s.weeksOfCover == null ? '' : Number(r.s.weeksOfCover.toFixed(1))), {
      id: 'weeksOfCover',
      meta: { csvDecimals: 1 },
      header: 'Weeks of cover',
      cell: ({ row }) => (row.original.s.weeksOfCover == null ? 'No demand' : row.original.s.weeksOfCover.toFixed(1)),
    }),
    stockCol.accessor((r) => (r.s.orderNow ? `Order now: ${r.s.orderQty}` : 'Covered'), {
      id: 'order',
      meta: { csvDecimals: 0 },
      header: 'Order',
      cell: ({ row }) => <OrderFlag s={row.original.s} />,
    }),
    stockCol.accessor((r) => r.s.firstShortageDate ?? '', {
      id: 'runsOut',
      header: 'Runs out (week of)',
      cell: ({ getValue }) => getValue() || '—',
    }),
  ];
  return (
    <Panel title="Stock">
      <DataTable
        data={rows}
        columns={columns}
        exportName="kerfwise-parts-stock"
        emptyText="The catalogue is empty: add parts on the Catalogue tab."
      />
    </Panel>
  );
}

const sugCol = createColumnHelper<OrderSuggestion>();

const fixed1 = (v: number) => Number(v.toFixed(1));

/** What an opened suggestion row shows: how the quantity was worked out and where the demand comes from. */
function SuggestionDetails({ s, stops }: { s: OrderSuggestion; stops: ReadonlyMap<string, DemandStop> }) {
  const facts: [string, string][] = [
    ['Lead time', `${fixed1(s.leadTimeWeeks)} weeks (± ${fixed1(s.leadTimeSdWeeks)})`],
    ['Demand in lead time', units(s.leadTimeDemand)],
    ['Safety stock', units(fixed1(s.safetyStock))],
    ['Reorder point', units(fixed1(s.reorderPoint))],
    ['On hand', String(s.onHand)],
    ['On order (every open order, whatever its due date)', String(s.onOrder)],
    ['Rebuilt cutters back in lead time', units(s.rebuildsWithinLeadTime)],
    ['Stock position', units(s.inventoryPosition)],
    ['Minimum order', String(s.minOrderQty)],
  ];
  return (
    <div className="grid gap-4 md:grid-cols-2">
      <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1">
        {facts.map(([k, v]) => (
          <div key={k} className="contents">
            <dt className="text-basalt-700">{k}</dt>
            <dd className="font-semibold">{v}</dd>
          </div>
        ))}
      </dl>
      <div>
        <h3 className="font-semibold">Demand from, within the lead time</h3>
        {s.sources.length === 0 ? (
          <p>Nothing draws on this part within its lead time.</p>
        ) : (
          <ul className="space-y-1">
            {s.sources.map((src) => (
              <li key={`${src.kind}-${src.stopId}`}>
                {sourceLabel(src, stops)}: <strong>{units(src.qty)}</strong>
              </li>
            ))}
          </ul>
        )}
      </div>
    </div>
  );
}

/**
 * Order suggestions: a few wide columns that fit at 1366 px (part, supplier, order, value, stock,
 * runs out); how each was worked out opens under its row. The export has every figure.
 */
export function SuggestionsTable({ demand }: { demand: PartsDemand }) {
  const stops = new Map(demand.stops.map((s) => [s.id, s]));
  const rows = [...demand.suggestions].sort((a, b) => Number(b.orderNow) - Number(a.orderNow) || a.code.localeCompare(b.code));
  const columns = [
    sugCol.accessor((s) => `${s.code} ${s.name}`, {
      id: 'part',
      header: 'Part',
      cell: ({ row }) => (
        <span className="block min-w-64">
          <span className="font-semibold">{row.original.code}</span> {row.original.name}
        </span>
      ),
    }),
    sugCol.accessor('supplier', {
      header: 'Supplier',
      cell: ({ getValue }) => <span className="block min-w-40">{getValue() || 'None in the catalogue'}</span>,
    }),
    sugCol.accessor((s) => (s.orderNow ? s.orderQty : 0), {
      id: 'order',
      meta: { csvDecimals: 0 },
      header: 'Order',
      cell: ({ row }) => <OrderFlag s={row.original} />,
    }),
    sugCol.accessor((s) => Number(s.orderValue.toFixed(2)), {
      id: 'orderValue',
      meta: { csvDecimals: 2 },
      header: 'Order value',
      cell: ({ row }) => <span className="whitespace-nowrap">{money(row.original.orderValue, row.original.currency)}</span>,
    }),
    sugCol.accessor((s) => s.onHand + s.onOrder, {
      id: 'stock',
      meta: { csvDecimals: 0 },
      header: 'On hand + on order',
      cell: ({ row }) => (
        <span className="whitespace-nowrap">
          {row.original.onHand} + {row.original.onOrder}
        </span>
      ),
    }),
    sugCol.accessor((s) => s.firstShortageDate ?? '', {
      id: 'runsOut',
      header: 'Runs out (week of)',
      cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue() || '—'}</span>,
    }),
    sugCol.display({
      id: 'details',
      header: 'Details',
      cell: ({ row }) => (
        <RowExpandButton
          row={row}
          controls={`suggestion-${row.id}`}
          label="Why?"
          hiddenText={`How the suggestion for ${row.original.code} was worked out`}
        />
      ),
    }),
  ];
  const csvHeader = [
    'Code',
    'Name',
    'Order now',
    { header: 'Order quantity', decimals: 0 },
    { header: 'Order value', decimals: 2 },
    'Currency',
    'Supplier',
    { header: 'On hand', decimals: 0 },
    { header: 'On order', decimals: 0 },
    { header: 'Rebuilt in lead time', decimals: 1 },
    { header: 'Lead time (weeks)', decimals: 1 },
    { header: 'Demand in lead time', decimals: 1 },
    { header: 'Safety stock', decimals: 1 },
    { header: 'Reorder point', decimals: 1 },
    'Runs out (week of)',
    'Demand from',
  ];
  const csvRow = (s: OrderSuggestion) => [
    s.code,
    s.name,
    s.orderNow ? 'Order now' : 'No',
    s.orderQty,
    s.orderValue,
    s.currency,
    s.supplier,
    s.onHand,
    s.onOrder,
    s.rebuildsWithinLeadTime,
    s.leadTimeWeeks,
    s.leadTimeDemand,
    s.safetyStock,
    s.reorderPoint,
    s.firstShortageDate ?? '',
    sourcesText(s.sources, stops),
  ];
  return (
    <Panel title="Order suggestions">
      <p className="mb-3 max-w-prose text-basalt-700">
        Safety stock and reorder point at a {(demand.serviceLevel * 100).toFixed(1)} % service level (z = {demand.z.toFixed(3)}), from the
        weekly demand over the next {demand.horizonWeeks} weeks and each part’s lead time with its spread. Every open order counts, whatever
        its due date. “Why?” shows the figures and what draws on the part within its lead time.
      </p>
      <DataTable
        data={rows}
        columns={columns}
        label="Order suggestions"
        exportName={`kerfwise-order-suggestions-${demand.startDate}`}
        csv={{ header: csvHeader, row: csvRow }}
        getRowId={(s) => s.partId}
        stickyColumnId="part"
        expandIdPrefix="suggestion-"
        renderExpanded={(row) => <SuggestionDetails s={row.original} stops={stops} />}
        emptyText="No parts in the catalogue yet."
      />
    </Panel>
  );
}
