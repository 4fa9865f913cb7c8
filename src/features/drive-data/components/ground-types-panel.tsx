import { zodResolver } from '@hookform/resolvers/zod';
import { createColumnHelper } from '@tanstack/react-table';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import { classifyCai } from '../../../../shared/domain/cerchar';
import { groundTypeInputSchema, type GroundTypeInput } from '../../../../shared/schemas/geology';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { TextField } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/page';
import { serverErrors } from '../../../lib/form';
import { useDeleteGroundType, useSaveGroundType, type GroundType } from '../api';

type GroundForm = z.input<typeof groundTypeInputSchema>;

/** Blank number inputs are "not given" (null); a decimal comma is read as a point. */
const optionalNumber = { setValueAs: (v: unknown) => (v === '' || v == null ? null : Number(String(v).replace(',', '.'))) };
/** A number with the decimals its column exports (meta.csvDecimals), or a dash. */
const orDash = (v: number | null, decimals: number) => (v == null ? '—' : v.toFixed(decimals));
const classText = (g: GroundType) =>
  g.caiClass ? `${g.caiClass.label}${g.caiClass.outsideTabulatedRange ? ' (outside the tabulated range)' : ''}` : '—';

function GroundTypeForm({
  projectId,
  editing,
  onClose,
}: {
  projectId: string;
  editing: GroundType | null;
  onClose: (message: string) => void;
}) {
  const save = useSaveGroundType(projectId);
  const del = useDeleteGroundType(projectId);
  const [error, setError] = useState<string | null>(null);
  const [confirming, setConfirming] = useState(false);
  const form = useForm<GroundForm, unknown, GroundTypeInput>({
    resolver: zodResolver(groundTypeInputSchema),
    defaultValues: editing
      ? {
          name: editing.name,
          description: editing.description,
          ucsMpa: editing.ucsMpa,
          cai: editing.cai,
          quartzPct: editing.quartzPct,
          notes: editing.notes,
        }
      : { name: '', description: '', ucsMpa: null, cai: null, quartzPct: null, notes: '' },
  });
  const e = form.formState.errors;
  const cai = form.watch('cai');
  const caiHint =
    typeof cai === 'number' && Number.isFinite(cai) && cai >= 0
      ? `CERCHAR class: ${classifyCai(cai).label}`
      : 'Cerchar Abrasivity Index, 0 to 7';

  const onSubmit = form.handleSubmit(async (input) => {
    setError(null);
    try {
      const saved = await save.mutateAsync({ id: editing?.id, input });
      onClose(`${saved.name} ${editing ? 'saved' : 'added'}.`);
    } catch (err) {
      setError(serverErrors(err, form.setError, 'Saving failed. Try again.').text);
    }
  });

  const remove = async (g: GroundType) => {
    setError(null);
    setConfirming(false);
    try {
      await del.mutateAsync(g.id);
      onClose(`${g.name} deleted.`);
    } catch (err) {
      setError(serverErrors(err, form.setError, 'Deleting failed. Try again.').text);
    }
  };

  return (
    <form
      onSubmit={onSubmit}
      noValidate
      className="mt-4 space-y-4 rounded-md border border-basalt-200 bg-basalt-50 p-4"
      aria-label={editing ? `Edit ${editing.name}` : 'New ground type'}
    >
      <h3 className="font-semibold">{editing ? `Edit ${editing.name}` : 'New ground type'}</h3>
      {error && <Alert tone="error">{error}</Alert>}
      <div className="grid gap-4 md:grid-cols-2">
        <TextField label="Name" {...form.register('name')} error={e.name?.message} />
        <TextField label="Description" {...form.register('description')} error={e.description?.message} />
        <TextField
          label="UCS (MPa)"
          inputMode="decimal"
          {...form.register('ucsMpa', optionalNumber)}
          error={e.ucsMpa?.message}
          hint="Uniaxial compressive strength"
        />
        <TextField label="CAI" inputMode="decimal" {...form.register('cai', optionalNumber)} error={e.cai?.message} hint={caiHint} />
        <TextField
          label="Quartz content (%)"
          inputMode="decimal"
          {...form.register('quartzPct', optionalNumber)}
          error={e.quartzPct?.message}
        />
        <TextField label="Notes" {...form.register('notes')} error={e.notes?.message} />
      </div>
      <div className="flex flex-wrap gap-2">
        <Button type="submit" disabled={form.formState.isSubmitting}>
          {editing ? 'Save ground type' : 'Add ground type'}
        </Button>
        <Button variant="ghost" onClick={() => onClose('')}>
          Cancel
        </Button>
        {editing &&
          (confirming ? (
            <Button variant="danger" className="ml-auto" onClick={() => remove(editing)}>
              Delete {editing.name} for good
            </Button>
          ) : (
            <Button variant="secondary" className="ml-auto" onClick={() => setConfirming(true)}>
              Delete ground type
            </Button>
          ))}
      </div>
    </form>
  );
}

const col = createColumnHelper<GroundType>();

/** The drive's ground types with their abrasivity; the planner adds, edits and deletes them. */
export function GroundTypesPanel({ projectId, groundTypes, canEdit }: { projectId: string; groundTypes: GroundType[]; canEdit: boolean }) {
  const [editing, setEditing] = useState<GroundType | 'new' | null>(null);
  const [message, setMessage] = useState<string | null>(null);

  const columns = [
    col.accessor('name', { header: 'Name', cell: ({ getValue }) => <span className="font-semibold">{getValue()}</span> }),
    col.accessor('description', { header: 'Description' }),
    col.accessor('ucsMpa', { header: 'UCS (MPa)', meta: { csvDecimals: 0 }, cell: ({ getValue }) => orDash(getValue(), 0) }),
    col.accessor('cai', { header: 'CAI', meta: { csvDecimals: 1 }, cell: ({ getValue }) => orDash(getValue(), 1) }),
    col.accessor(classText, { id: 'caiClass', header: 'CERCHAR class' }),
    col.accessor('quartzPct', { header: 'Quartz (%)', meta: { csvDecimals: 0 }, cell: ({ getValue }) => orDash(getValue(), 0) }),
    col.accessor('notes', { header: 'Notes' }),
    ...(canEdit
      ? [
          col.display({
            id: 'actions',
            header: '',
            cell: ({ row }) => (
              <Button
                variant="secondary"
                aria-label={`Edit ${row.original.name}`}
                onClick={() => {
                  setMessage(null);
                  setEditing(row.original);
                }}
              >
                Edit
              </Button>
            ),
          }),
        ]
      : []),
  ];

  return (
    <Panel title="Ground types">
      <div className="space-y-3">
        {message && <Alert tone="success">{message}</Alert>}
        <DataTable data={groundTypes} columns={columns} exportName="kerfwise-ground-types" emptyText="No ground types yet." />
        {groundTypes.some((g) => g.cai == null) && (
          <p className="text-caption text-basalt-700">
            Ground types without a CAI get no wear estimate before site data exists: add their CAI.
          </p>
        )}
        {canEdit && editing === null && (
          <Button
            variant="secondary"
            onClick={() => {
              setMessage(null);
              setEditing('new');
            }}
          >
            Add a ground type
          </Button>
        )}
        {canEdit && editing !== null && (
          <GroundTypeForm
            key={editing === 'new' ? 'new' : editing.id}
            projectId={projectId}
            editing={editing === 'new' ? null : editing}
            onClose={(text) => {
              setEditing(null);
              if (text) setMessage(text);
            }}
          />
        )}
      </div>
    </Panel>
  );
}
