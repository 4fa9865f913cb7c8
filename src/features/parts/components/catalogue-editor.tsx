import { createColumnHelper } from '@tanstack/react-table';
import { useState, type FormEvent } from 'react';
import { partInputSchema, partKindLabels, partKinds } from '../../../../shared/schemas/parts';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { SelectField, TextField } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { useDeletePart, useSavePart, type CataloguePart } from '../api';
import { money } from '../format';

type Draft = Record<
  'code' | 'name' | 'kind' | 'discSizeIn' | 'unitCost' | 'currency' | 'supplier' | 'leadTimeMeanDays' | 'leadTimeSdDays' | 'minOrderQty',
  string
>;

const emptyDraft: Draft = {
  code: '',
  name: '',
  kind: 'ring',
  discSizeIn: '17',
  unitCost: '',
  currency: 'EUR',
  supplier: '',
  leadTimeMeanDays: '',
  leadTimeSdDays: '0',
  minOrderQty: '1',
};
const toDraft = (p: CataloguePart): Draft => ({
  code: p.code,
  name: p.name,
  kind: p.kind,
  discSizeIn: p.discSizeIn == null ? '' : String(p.discSizeIn),
  unitCost: String(p.unitCost),
  currency: p.currency,
  supplier: p.supplier,
  leadTimeMeanDays: String(p.leadTimeMeanDays),
  leadTimeSdDays: String(p.leadTimeSdDays),
  minOrderQty: String(p.minOrderQty),
});
/** Blank is "not given"; a decimal comma reads as a point. */
const num = (s: string) => (s.trim() === '' ? undefined : Number(s.trim().replace(',', '.')));

function PartForm({ projectId, editing, onDone }: { projectId: string; editing: CataloguePart | null; onDone: (text: string) => void }) {
  const savePart = useSavePart(projectId);
  const [draft, setDraft] = useState<Draft>(editing ? toDraft(editing) : emptyDraft);
  const [errors, setErrors] = useState<Partial<Record<keyof Draft, string>>>({});
  const [failure, setFailure] = useState<string | null>(null);
  const set = (k: keyof Draft) => (e: { target: { value: string } }) => setDraft((d) => ({ ...d, [k]: e.target.value }));

  const onSubmit = async (e: FormEvent) => {
    e.preventDefault();
    setFailure(null);
    const parsed = partInputSchema.safeParse({
      ...draft,
      discSizeIn: num(draft.discSizeIn) ?? null,
      unitCost: num(draft.unitCost),
      leadTimeMeanDays: num(draft.leadTimeMeanDays),
      leadTimeSdDays: num(draft.leadTimeSdDays),
      minOrderQty: num(draft.minOrderQty),
    });
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setErrors({});
    try {
      const saved = editing
        ? await savePart.mutateAsync({ partId: editing.id, input: parsed.data })
        : await savePart.mutateAsync({ partId: null, input: parsed.data });
      onDone(`${saved.code} ${editing ? 'saved' : 'added to the catalogue'}.`);
    } catch (err) {
      if (err instanceof ApiError) setErrors(Object.fromEntries(err.issues.map((i) => [i.path, i.message])));
      setFailure(err instanceof ApiError ? err.message : 'Saving failed. Try again.');
    }
  };

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4">
      {failure && <Alert tone="error">{failure}</Alert>}
      <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
        <TextField label="Code" value={draft.code} onChange={set('code')} error={errors.code} autoComplete="off" />
        <TextField label="Name" value={draft.name} onChange={set('name')} error={errors.name} />
        <SelectField label="Kind" value={draft.kind} onChange={set('kind')} error={errors.kind}>
          {partKinds.map((k) => (
            <option key={k} value={k}>
              {partKindLabels[k]}
            </option>
          ))}
        </SelectField>
        <TextField
          label="Disc size (in)"
          inputMode="decimal"
          value={draft.discSizeIn}
          onChange={set('discSizeIn')}
          error={errors.discSizeIn}
          hint="Rings and complete assemblies; blank for others."
        />
        <TextField label="Unit cost" inputMode="decimal" value={draft.unitCost} onChange={set('unitCost')} error={errors.unitCost} />
        <TextField label="Currency" value={draft.currency} onChange={set('currency')} error={errors.currency} />
        <TextField label="Supplier" value={draft.supplier} onChange={set('supplier')} error={errors.supplier} />
        <TextField
          label="Lead time, mean (days)"
          inputMode="decimal"
          value={draft.leadTimeMeanDays}
          onChange={set('leadTimeMeanDays')}
          error={errors.leadTimeMeanDays}
        />
        <TextField
          label="Lead time, spread (days)"
          inputMode="decimal"
          value={draft.leadTimeSdDays}
          onChange={set('leadTimeSdDays')}
          error={errors.leadTimeSdDays}
          hint="Standard deviation; 0 for a fixed lead time."
        />
        <TextField
          label="Minimum order quantity"
          inputMode="numeric"
          value={draft.minOrderQty}
          onChange={set('minOrderQty')}
          error={errors.minOrderQty}
        />
      </div>
      <div className="flex flex-wrap gap-2">
        <Button type="submit">{editing ? 'Save the part' : 'Add the part'}</Button>
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
