import { zodResolver } from '@hookform/resolvers/zod';
import { createColumnHelper } from '@tanstack/react-table';
import { useState } from 'react';
import { useFieldArray, useForm, useWatch } from 'react-hook-form';
import { z } from 'zod';
import { purchaseOrderInputSchema, receiveLineInputSchema } from '../../../../shared/schemas/parts';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { SelectField, TextField } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { formatSiteDate } from '../../../../shared/site-time';
import { useCreateOrders, useReceiveLine, type CataloguePart, type OrderLine, type PurchaseOrder } from '../api';
import { serverErrors } from '../../../lib/form';
import type { OrderSuggestion, PurchaseOrderInput } from '../../../../shared/schemas/parts';

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

const orderLineSchema = purchaseOrderInputSchema.shape.lines.element;
/** The form: number, note and lines; each line's supplier comes from the part's catalogue entry. */
const orderFormSchema = z.object({
  number: purchaseOrderInputSchema.shape.number,
  note: purchaseOrderInputSchema.shape.note,
  lines: z.array(orderLineSchema).min(1, 'An order needs at least one line.').max(200),
});
type OrderFormIn = z.input<typeof orderFormSchema>;
type OrderFormOut = z.output<typeof orderFormSchema>;

const addDays = (isoDate: string, days: number) =>
  new Date(Date.parse(`${isoDate}T00:00:00Z`) + Math.round(days) * 86_400_000).toISOString().slice(0, 10);

/**
 * The orders a form saves: its lines split by the supplier of each part in the catalogue, one order
 * each; with more than one supplier the numbers get -1, -2, … in supplier order.
 */
function splitBySupplier(form: OrderFormOut, parts: readonly CataloguePart[]): PurchaseOrderInput[] {
  const supplierOf = new Map(parts.map((p) => [p.id, p.supplier.trim()]));
  const groups = new Map<string, PurchaseOrderInput['lines']>();
  for (const l of form.lines) {
    const supplier = supplierOf.get(l.partId) ?? '';
    groups.set(supplier, [...(groups.get(supplier) ?? []), l]);
  }
  const suppliers = [...groups.keys()].sort((a, b) => a.localeCompare(b));
  return suppliers.map((supplier, i) => ({
    number: suppliers.length === 1 ? form.number : `${form.number}-${i + 1}`,
    supplier,
    note: form.note,
    lines: groups.get(supplier)!,
  }));
}

/**
 * A new purchase order; "Fill from the suggestions" puts in every part to order now, due after its
 * lead time. Lines of different suppliers save as one order per supplier, in one transaction.
 */
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
  const create = useCreateOrders(projectId);
  // An empty quantity box (not "NaN"): the schema names the missing quantity when the form is sent.
  const blank = () => ({
    partId: parts[0]?.id ?? '',
    qtyOrdered: undefined as unknown as number,
    dueDate: addDays(today, parts[0]?.leadTimeMeanDays ?? 14),
  });
  const form = useForm<OrderFormIn, unknown, OrderFormOut>({
    resolver: zodResolver(orderFormSchema),
    defaultValues: { number: '', note: '', lines: [blank()] },
  });
  const { fields, append, remove, replace } = useFieldArray({ control: form.control, name: 'lines' });
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string; issues?: string[] } | null>(null);
  const toOrder = suggestions.filter((s) => s.orderNow);
  const errors = form.formState.errors;
  const watched = useWatch({ control: form.control, name: 'lines' });
  const number = useWatch({ control: form.control, name: 'number' });
  const preview = splitBySupplier({ number: number || '…', note: '', lines: (watched ?? []) as OrderFormOut['lines'] }, parts);

  const fill = () =>
    replace(toOrder.map((s) => ({ partId: s.partId, qtyOrdered: s.orderQty, dueDate: addDays(today, s.leadTimeWeeks * 7) })));

  const onSubmit = form.handleSubmit(
    async (values) => {
      setMessage(null);
      const orders = splitBySupplier(values, parts);
      try {
        const saved = await create.mutateAsync({ orders });
        setMessage({
          tone: 'success',
          text: `Saved ${saved.map((o) => `order ${o.number} (${o.supplier || 'no supplier given'}, ${o.lines.length} line(s))`).join(', ')}.`,
        });
        form.reset({ number: '', note: '', lines: [blank()] });
      } catch (err) {
        const failure = serverErrors(err, form.setError, 'Saving failed. Try again.');
        setMessage({ tone: 'error', text: failure.text, issues: failure.issues.map((i) => i.message) });
      }
    },
    () => setMessage({ tone: 'error', text: 'The order needs attention; nothing was saved.' }),
  );

  return (
    <Panel title="New purchase order">
      <form onSubmit={onSubmit} noValidate className="space-y-4">
        {message && (
          <Alert tone={message.tone} title={message.text}>
            {message.issues && message.issues.length > 0 && (
              <ul className="list-disc pl-5">
                {message.issues.map((i) => (
                  <li key={i}>{i}</li>
                ))}
              </ul>
            )}
          </Alert>
        )}
        <div className="grid gap-4 md:grid-cols-2">
          <TextField label="Order number" error={errors.number?.message} {...form.register('number')} />
          <TextField label="Note (optional)" error={errors.note?.message} {...form.register('note')} />
        </div>
        <p className="max-w-prose text-basalt-700">
          Each line goes to the supplier of its part in the catalogue. Lines of several suppliers save as one order per supplier.
        </p>
        <fieldset className="space-y-3">
          <legend className="font-semibold">Lines</legend>
          {errors.lines?.root?.message && <p className="font-semibold text-alarm-700">{errors.lines.root.message}</p>}
          {fields.map((field, i) => (
            <div
              key={field.id}
              className="grid gap-3 rounded-md border border-basalt-200 p-3 md:grid-cols-[2fr_1fr_1fr_auto] md:items-start"
            >
              <SelectField label={`Part, line ${i + 1}`} error={errors.lines?.[i]?.partId?.message} {...form.register(`lines.${i}.partId`)}>
                {parts.map((p) => (
                  <option key={p.id} value={p.id}>
                    {p.code} — {p.name}
                    {p.supplier ? ` (${p.supplier})` : ''}
                  </option>
                ))}
              </SelectField>
              <TextField
                label={`Quantity, line ${i + 1}`}
                inputMode="numeric"
                error={errors.lines?.[i]?.qtyOrdered?.message}
                {...form.register(`lines.${i}.qtyOrdered`, { valueAsNumber: true })}
              />
              <TextField
                label={`Due, line ${i + 1}`}
                type="date"
                error={errors.lines?.[i]?.dueDate?.message}
                {...form.register(`lines.${i}.dueDate`)}
              />
              <div className="md:pt-8">
                <Button variant="ghost" onClick={() => remove(i)} disabled={fields.length === 1}>
                  Remove
                </Button>
              </div>
            </div>
          ))}
          <div className="flex flex-wrap gap-2">
            <Button variant="secondary" onClick={() => append(blank())}>
              Add a line
            </Button>
            <Button variant="secondary" onClick={fill} disabled={toOrder.length === 0}>
              Fill from the suggestions ({toOrder.length} to order now)
            </Button>
          </div>
        </fieldset>
        <p className="text-basalt-700">
          Saves as{' '}
          {preview
            .map(
              (o) => `order ${o.number} to ${o.supplier || 'no supplier given'} (${o.lines.length} line${o.lines.length === 1 ? '' : 's'})`,
            )
            .join('; ')}
          .
        </p>
        <Button type="submit" disabled={create.isPending}>
          {preview.length > 1 ? `Save the ${preview.length} orders` : 'Save the order'}
        </Button>
      </form>
    </Panel>
  );
}
