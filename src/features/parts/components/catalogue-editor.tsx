import { zodResolver } from '@hookform/resolvers/zod';
import { createColumnHelper } from '@tanstack/react-table';
import { useState } from 'react';
import { useForm, type DefaultValues } from 'react-hook-form';
import type { z } from 'zod';
import { partInputSchema, partKindLabels, partKinds, type PartInput } from '../../../../shared/schemas/parts';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { SelectField, TextField } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { serverErrors } from '../../../lib/form';
import { useDeletePart, useSavePart, type CataloguePart } from '../api';
import { money } from '../format';

type PartForm = z.input<typeof partInputSchema>;

/** A new part: blank cost and lead time, to be filled in. */
const emptyPart: DefaultValues<PartForm> = {
  code: '',
  name: '',
  kind: 'ring',
  discSizeIn: 17,
  currency: 'EUR',
  supplier: '',
  leadTimeSdDays: 0,
  minOrderQty: 1,
};
const toForm = (p: CataloguePart): PartForm => ({
  code: p.code,
  name: p.name,
  kind: p.kind,
  discSizeIn: p.discSizeIn,
  unitCost: p.unitCost,
  currency: p.currency,
  supplier: p.supplier,
  leadTimeMeanDays: p.leadTimeMeanDays,
  leadTimeSdDays: p.leadTimeSdDays,
  minOrderQty: p.minOrderQty,
});
/** A blank number is "not given" (the schema's default, or its message); a decimal comma reads as a point. */
const toNumber = (v: unknown) =>
  v === '' || v == null ? undefined : typeof v === 'number' ? v : Number(String(v).trim().replace(',', '.'));
const asNumber = { setValueAs: toNumber };
/** The disc size left blank is "none" (null): only rings and assemblies need one. */
const asNumberOrNull = { setValueAs: (v: unknown) => toNumber(v) ?? null };

function PartForm({ projectId, editing, onDone }: { projectId: string; editing: CataloguePart | null; onDone: (text: string) => void }) {
  const savePart = useSavePart(projectId);
  const [failure, setFailure] = useState<string | null>(null);
  const form = useForm<PartForm, unknown, PartInput>({
    resolver: zodResolver(partInputSchema),
    defaultValues: editing ? toForm(editing) : emptyPart,
  });
  const errors = form.formState.errors;

  const onSubmit = form.handleSubmit(async (input) => {
    setFailure(null);
    try {
      const saved = await savePart.mutateAsync({ partId: editing?.id ?? null, input });
      onDone(`${saved.code} ${editing ? 'saved' : 'added to the catalogue'}.`);
    } catch (err) {
      setFailure(serverErrors(err, form.setError, 'Saving failed. Try again.').text);
    }
  });

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4">
      {failure && <Alert tone="error">{failure}</Alert>}
      <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
        <TextField label="Code" {...form.register('code')} error={errors.code?.message} autoComplete="off" />
        <TextField label="Name" {...form.register('name')} error={errors.name?.message} />
        <SelectField label="Kind" {...form.register('kind')} error={errors.kind?.message}>
          {partKinds.map((k) => (
            <option key={k} value={k}>
              {partKindLabels[k]}
            </option>
          ))}
        </SelectField>
        <TextField
          label="Disc size (in)"
          inputMode="decimal"
          {...form.register('discSizeIn', asNumberOrNull)}
          error={errors.discSizeIn?.message}
          hint="Rings and complete assemblies; blank for others."
        />
        <TextField label="Unit cost" inputMode="decimal" {...form.register('unitCost', asNumber)} error={errors.unitCost?.message} />
        <TextField label="Currency" {...form.register('currency')} error={errors.currency?.message} />
        <TextField label="Supplier" {...form.register('supplier')} error={errors.supplier?.message} />
        <TextField
          label="Lead time, mean (days)"
          inputMode="decimal"
          {...form.register('leadTimeMeanDays', asNumber)}
          error={errors.leadTimeMeanDays?.message}
        />
        <TextField
          label="Lead time, spread (days)"
          inputMode="decimal"
          {...form.register('leadTimeSdDays', asNumber)}
          error={errors.leadTimeSdDays?.message}
          hint="Standard deviation; 0 for a fixed lead time."
        />
        <TextField
          label="Minimum order quantity"
          inputMode="numeric"
          {...form.register('minOrderQty', asNumber)}
          error={errors.minOrderQty?.message}
        />
      </div>
      <div className="flex flex-wrap gap-2">
        <Button type="submit" disabled={form.formState.isSubmitting}>
          {editing ? 'Save the part' : 'Add the part'}
        </Button>
        {editing && (
          <Button variant="secondary" onClick={() => onDone('')}>
            Cancel
          </Button>
        )}
      </div>
    </form>
  );
}

const col = createColumnHelper<CataloguePart>();

/** The catalogue: every part with its cost, supplier and lead time; the buyer adds, edits and removes. */
export function CatalogueEditor({ projectId, parts, canEdit }: { projectId: string; parts: CataloguePart[]; canEdit: boolean }) {
  const removePart = useDeletePart(projectId);
  const [editing, setEditing] = useState<CataloguePart | null>(null);
  const [formKey, setFormKey] = useState(0);
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const done = (text: string) => {
    setEditing(null);
    setFormKey((k) => k + 1);
    setMessage(text ? { tone: 'success', text } : null);
  };
  const remove = async (p: CataloguePart) => {
    if (!window.confirm(`Remove ${p.code} from the catalogue?`)) return;
    try {
      await removePart.mutateAsync(p.id);
      setMessage({ tone: 'success', text: `${p.code} removed.` });
    } catch (err) {
      setMessage({ tone: 'error', text: err instanceof ApiError ? err.message : 'Removing failed. Try again.' });
    }
  };
  const columns = [
    col.accessor('code', { header: 'Code' }),
    col.accessor('name', { header: 'Name' }),
    col.accessor((p) => partKindLabels[p.kind], { id: 'kind', header: 'Kind' }),
    col.accessor((p) => p.discSizeIn ?? '', { id: 'disc', meta: { csvDecimals: 0 }, header: 'Disc (in)' }),
    col.accessor('unitCost', {
      meta: { csvDecimals: 2 },
      header: 'Unit cost',
      cell: ({ row }) => <span className="whitespace-nowrap">{money(row.original.unitCost, row.original.currency)}</span>,
    }),
    col.accessor('supplier', { header: 'Supplier' }),
    col.accessor((p) => `${p.leadTimeMeanDays} ± ${p.leadTimeSdDays}`, { id: 'leadTime', header: 'Lead time (days)' }),
    col.accessor('minOrderQty', { meta: { csvDecimals: 0 }, header: 'Minimum order' }),
    col.accessor('onHand', { meta: { csvDecimals: 0 }, header: 'On hand' }),
    ...(canEdit
      ? [
          col.display({
            id: 'actions',
            header: 'Actions',
            cell: ({ row }) => (
              <div className="flex gap-1">
                <Button
                  variant="ghost"
                  onClick={() => {
                    setEditing(row.original);
                    setFormKey((k) => k + 1);
                    setMessage(null);
                  }}
                  aria-label={`Edit ${row.original.code}`}
                >
                  Edit
                </Button>
                <Button variant="ghost" onClick={() => remove(row.original)} aria-label={`Remove ${row.original.code}`}>
                  Remove
                </Button>
              </div>
            ),
          }),
        ]
      : []),
  ];
  return (
    <div className="space-y-6">
      {message && <Alert tone={message.tone}>{message.text}</Alert>}
      {canEdit && (
        <Panel title={editing ? `Edit ${editing.code}` : 'Add a part'}>
          <PartForm key={formKey} projectId={projectId} editing={editing} onDone={done} />
        </Panel>
      )}
      <Panel title="Catalogue">
        <DataTable data={parts} columns={columns} exportName="kerfwise-parts-catalogue" emptyText="No parts yet." />
      </Panel>
    </div>
  );
}
