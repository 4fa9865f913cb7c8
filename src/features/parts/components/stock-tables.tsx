import { createColumnHelper } from '@tanstack/react-table';
import { partKindLabels } from '../../../../shared/schemas/parts';
import { DataTable } from '../../../components/ui/data-table';
import { Panel } from '../../../components/ui/page';
import type { OrderSuggestion } from '../../../../shared/schemas/parts';
import type { CataloguePart, PartsDemand } from '../api';
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
    stockCol.accessor('onHand', { header: 'On hand' }),
    stockCol.accessor('onOrder', { header: 'On order' }),
    stockCol.accessor((r) => (r.s.weeksOfCover == null ? '' : Number(r.s.weeksOfCover.toFixed(1))), {
      id: 'weeksOfCover',
      header: 'Weeks of cover',
      cell: ({ row }) => (row.original.s.weeksOfCover == null ? 'No demand' : row.original.s.weeksOfCover.toFixed(1)),
    }),
    stockCol.accessor((r) => (r.s.orderNow ? `Order now: ${r.s.orderQty}` : 'Covered'), {
      id: 'order',
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

/** Order suggestions with the demand behind them; the table's export is the CSV for the supplier. */
export function SuggestionsTable({ demand }: { demand: PartsDemand }) {
  const stops = new Map(demand.stops.map((s) => [s.id, s]));
  const rows = [...demand.suggestions].sort((a, b) => Number(b.orderNow) - Number(a.orderNow) || a.code.localeCompare(b.code));
  const columns = [
    sugCol.accessor('code', { header: 'Code' }),
    sugCol.accessor('name', { header: 'Name' }),
    sugCol.accessor((s) => (s.orderNow ? 'Order now' : 'No'), {
      id: 'orderNow',
      header: 'Order now',
      cell: ({ row }) => <OrderFlag s={row.original} />,
    }),
    sugCol.accessor('orderQty', { header: 'Order quantity' }),
    sugCol.accessor((s) => Number(s.orderValue.toFixed(2)), {
      id: 'orderValue',
      header: 'Order value',
      cell: ({ row }) => <span className="whitespace-nowrap">{money(row.original.orderValue, row.original.currency)}</span>,
    }),
    sugCol.accessor('supplier', { header: 'Supplier' }),
    sugCol.accessor('onHand', { header: 'On hand' }),
    sugCol.accessor('rebuildsWithinLeadTime', { header: 'Rebuilt in lead time', cell: ({ getValue }) => units(getValue()) }),
    sugCol.accessor((s) => Number(s.leadTimeWeeks.toFixed(1)), { id: 'leadTime', header: 'Lead time (weeks)' }),
    sugCol.accessor((s) => Number(s.leadTimeDemand.toFixed(1)), { id: 'leadTimeDemand', header: 'Demand in lead time' }),
    sugCol.accessor((s) => Number(s.safetyStock.toFixed(1)), { id: 'safetyStock', header: 'Safety stock' }),
    sugCol.accessor((s) => Number(s.reorderPoint.toFixed(1)), { id: 'reorderPoint', header: 'Reorder point' }),
    sugCol.accessor((s) => s.firstShortageDate ?? '', {
      id: 'runsOut',
      header: 'Runs out (week of)',
      cell: ({ getValue }) => getValue() || '—',
    }),
    sugCol.accessor((s) => sourcesText(s.sources, stops), {
      id: 'sources',
      header: 'Demand from',
      cell: ({ row }) =>
        row.original.sources.length === 0 ? (
          '—'
        ) : (
          <ul className="min-w-64 space-y-1">
            {row.original.sources.map((src) => (
              <li key={`${src.kind}-${src.stopId}`}>
                {sourceLabel(src, stops)}: <strong>{units(src.qty)}</strong>
              </li>
            ))}
          </ul>
        ),
    }),
  ];
  return (
    <Panel title="Order suggestions">
      <p className="mb-3 max-w-prose text-basalt-700">
        Safety stock and reorder point at a {(demand.serviceLevel * 100).toFixed(1)} % service level (z = {demand.z.toFixed(3)}), from the
        weekly demand over the next {demand.horizonWeeks} weeks and each part’s lead time with its spread. “Demand from” lists what draws on
        the part within its lead time.
      </p>
      <DataTable
        data={rows}
        columns={columns}
        exportName={`kerfwise-order-suggestions-${demand.startDate}`}
        emptyText="No parts in the catalogue yet."
      />
    </Panel>
  );
}
