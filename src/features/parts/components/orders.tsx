import { createColumnHelper } from '@tanstack/react-table';
import { useState, type FormEvent } from 'react';
import { purchaseOrderInputSchema, receiveLineInputSchema } from '../../../../shared/schemas/parts';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { SelectField, TextField } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { formatSiteDate } from '../../../../shared/site-time';
import { useCreateOrder, useReceiveLine, type CataloguePart, type OrderLine, type PurchaseOrder } from '../api';
import type { OrderSuggestion } from '../../../../shared/schemas/parts';

const lineCol = createColumnHelper<OrderLine>();
/** An order's lines; `receiving` adds the column to receive an open line into stock. */
const orderLineColumns = (projectId: string, receiving: boolean) => [
  lineCol.accessor((l) => `${l.partCode} ${l.partName}`, {
    id: 'part',
    header: 'Part',
    cell: ({ row }) => (
      <>
        <span className="font-semibold">{row.original.partCode}</span> {row.original.partName}
      </>
    ),
  }),
  lineCol.accessor('qtyOrdered', { header: 'Ordered', meta: { csvDecimals: 0 } }),
  lineCol.accessor('qtyReceived', { header: 'Received', meta: { csvDecimals: 0 } }),
  lineCol.accessor('qtyOpen', { header: 'Open', meta: { csvDecimals: 0 } }),
  lineCol.accessor('dueDate', { header: 'Due', cell: ({ getValue }) => <span className="whitespace-nowrap">{getValue()}</span> }),
  ...(receiving
    ? [
        lineCol.display({
          id: 'receive',
          header: 'Receive',
          cell: ({ row }) => (row.original.qtyOpen > 0 ? <ReceiveCell projectId={projectId} line={row.original} /> : 'Complete'),
        }),
      ]
    : []),
];

const cellInput = 'block min-h-touch w-24 rounded-md border-2 border-basalt-300 bg-white px-2 aria-[invalid=true]:border-alarm-500';

/** Receiving against one open line: the quantity that arrived (never more than is still open). */
function ReceiveCell({ projectId, line }: { projectId: string; line: OrderLine }) {
  const receive = useReceiveLine(projectId);
  const [qty, setQty] = useState(String(line.qtyOpen));
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const onReceive = async () => {
    setMessage(null);
    const parsed = receiveLineInputSchema.safeParse({ qty: Number(qty) });
    if (!parsed.success) {
      setMessage({ tone: 'error', text: parsed.error.issues[0]?.message ?? 'Check the quantity.' });
      return;
    }
    try {
      await receive.mutateAsync({ line, input: parsed.data });
      setMessage({ tone: 'success', text: `${parsed.data.qty} × ${line.partCode} received into stock.` });
    } catch (err) {
      setMessage({ tone: 'error', text: err instanceof ApiError ? err.message : 'Receiving failed. Try again.' });
    }
  };
  return (
    <div className="space-y-1">
      <div className="flex items-center gap-2">
        <input
          aria-label={`Quantity of ${line.partCode} received`}
          inputMode="numeric"
          className={cellInput}
          value={qty}
          onChange={(e) => setQty(e.target.value)}
          aria-invalid={message?.tone === 'error' || undefined}
        />
        <Button variant="secondary" onClick={onReceive}>
          Receive
        </Button>
      </div>
      {message && (
        <p
          role={message.tone === 'error' ? 'alert' : 'status'}
          className={`max-w-xs text-caption font-semibold ${message.tone === 'error' ? 'text-alarm-700' : 'text-moss-700'}`}
        >
          {message.text}
        </p>
      )}
    </div>
  );
}

export function OrderList({
  projectId,
  orders,
  canEdit,
  timeZone,
}: {
  projectId: string;
  orders: PurchaseOrder[];
  canEdit: boolean;
  timeZone: string;
}) {
  if (orders.length === 0)
    return (
      <Panel title="Purchase orders">
        <p>No purchase orders yet.</p>
      </Panel>
    );
  const sorted = [...orders].sort((a, b) => Number(b.open) - Number(a.open));
  return (
    <div className="space-y-4">
      {sorted.map((o) => (
        <section key={o.id} aria-labelledby={`order-${o.id}`} className="rounded-lg border border-basalt-200 bg-white p-4 shadow-sm">
          <h2 id={`order-${o.id}`} className="text-lead font-semibold">
            Order {o.number}{' '}
            <span
              className={`ml-2 rounded-md px-2 py-1 text-caption ${o.open ? 'bg-caution-100 text-caution-700' : 'bg-moss-100 text-moss-700'}`}
            >
              {o.open ? 'Open' : 'Received in full'}
            </span>
          </h2>
          <p className="text-basalt-700">
            {o.supplier || 'No supplier given'} · ordered {formatSiteDate(o.orderedAt, timeZone)}
            {o.note ? ` · ${o.note}` : ''}
          </p>
          <div className="mt-3">
            <DataTable
              data={o.lines}
              columns={orderLineColumns(projectId, canEdit && o.open)}
              label={`Lines of order ${o.number}`}
              exportName={`kerfwise-order-${o.number}`}
              getRowId={(l) => l.id}
              filterable={false}
            />
          </div>
        </section>
      ))}
    </div>
  );
}

interface DraftLine {
  partId: string;
  qty: string;
  dueDate: string;
}

const addDays = (isoDate: string, days: number) =>
  new Date(Date.parse(`${isoDate}T00:00:00Z`) + Math.round(days) * 86_400_000).toISOString().slice(0, 10);

/** A new purchase order; "Fill from the suggestions" puts in every part to order now, due after its lead time. */
export function NewOrder({
  projectId,
  parts,
  suggestions,
  today,
}: {
  projectId: string;
  parts: CataloguePart[];
  suggestions: OrderSuggestion[];
  today: string;
}) {
  const create = useCreateOrder(projectId);
  const blank = (): DraftLine => ({ partId: parts[0]?.id ?? '', qty: '', dueDate: addDays(today, parts[0]?.leadTimeMeanDays ?? 14) });
  const [number, setNumber] = useState('');
  const [supplier, setSupplier] = useState('');
  const [note, setNote] = useState('');
  const [lines, setLines] = useState<DraftLine[]>([blank()]);
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string; issues?: string[] } | null>(null);
  const toOrder = suggestions.filter((s) => s.orderNow);

  const fill = () => {
    setLines(toOrder.map((s) => ({ partId: s.partId, qty: String(s.orderQty), dueDate: addDays(today, s.leadTimeWeeks * 7) })));
    const suppliers = [...new Set(toOrder.map((s) => s.supplier).filter(Boolean))];
    if (suppliers.length === 1) setSupplier(suppliers[0]);
  };
  const setLine = (i: number, patch: Partial<DraftLine>) => setLines((ls) => ls.map((l, k) => (k === i ? { ...l, ...patch } : l)));

  const onSubmit = async (e: FormEvent) => {
    e.preventDefault();
    setMessage(null);
    const parsed = purchaseOrderInputSchema.safeParse({
      number,
      supplier,
      note,
      lines: lines.map((l) => ({ partId: l.partId, qtyOrdered: Number(l.qty), dueDate: l.dueDate })),
    });
    if (!parsed.success) {
      setMessage({
        tone: 'error',
        text: 'The order needs attention; nothing was saved.',
        issues: parsed.error.issues.map((i) => (i.path.length > 1 ? `Line ${Number(i.path[1]) + 1}: ${i.message}` : i.message)),
      });
      return;
    }
    try {
      const order = await create.mutateAsync(parsed.data);
      setMessage({ tone: 'success', text: `Order ${order.number} saved with ${order.lines.length} line(s).` });
      setNumber('');
      setNote('');
      setLines([blank()]);
    } catch (err) {
      setMessage({ tone: 'error', text: err instanceof ApiError ? err.message : 'Saving failed. Try again.' });
    }
  };

  return (
    <Panel title="New purchase order">
      <form onSubmit={onSubmit} noValidate className="space-y-4">
        {message && (
          <Alert tone={message.tone} title={message.text}>
            {message.issues && (
              <ul className="list-disc pl-5">
                {message.issues.map((i) => (
                  <li key={i}>{i}</li>
                ))}
              </ul>
            )}
          </Alert>
        )}
        <div className="grid gap-4 md:grid-cols-3">
          <TextField label="Order number" value={number} onChange={(e) => setNumber(e.target.value)} />
          <TextField label="Supplier" value={supplier} onChange={(e) => setSupplier(e.target.value)} />
          <TextField label="Note (optional)" value={note} onChange={(e) => setNote(e.target.value)} />
        </div>
        <fieldset className="space-y-3">
          <legend className="font-semibold">Lines</legend>
          {lines.map((l, i) => (
            <div key={i} className="grid gap-3 rounded-md border border-basalt-200 p-3 md:grid-cols-[2fr_1fr_1fr_auto] md:items-end">
              <SelectField label={`Part, line ${i + 1}`} value={l.partId} onChange={(e) => setLine(i, { partId: e.target.value })}>
                {parts.map((p) => (
                  <option key={p.id} value={p.id}>
                    {p.code} — {p.name}
                  </option>
                ))}
              </SelectField>
              <TextField
                label={`Quantity, line ${i + 1}`}
                inputMode="numeric"
                value={l.qty}
                onChange={(e) => setLine(i, { qty: e.target.value })}
              />
              <TextField
                label={`Due, line ${i + 1}`}
                type="date"
                value={l.dueDate}
                onChange={(e) => setLine(i, { dueDate: e.target.value })}
              />
              <Button variant="ghost" onClick={() => setLines((ls) => ls.filter((_, k) => k !== i))} disabled={lines.length === 1}>
                Remove
              </Button>
            </div>
          ))}
          <div className="flex flex-wrap gap-2">
            <Button variant="secondary" onClick={() => setLines((ls) => [...ls, blank()])}>
              Add a line
            </Button>
            <Button variant="secondary" onClick={fill} disabled={toOrder.length === 0}>
              Fill from the suggestions ({toOrder.length} to order now)
            </Button>
          </div>
        </fieldset>
        <Button type="submit">Save the order</Button>
      </form>
    </Panel>
  );
}
