import { zodResolver } from '@hookform/resolvers/zod';
import { createColumnHelper } from '@tanstack/react-table';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import {
  downtimeCauseInputSchema,
  downtimeCauseUpdateSchema,
  type DowntimeCause,
  type DowntimeCauseInput,
  type DowntimeCauseUpdate,
} from '../../../../shared/schemas/downtime';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { TextField } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { serverErrors } from '../../../lib/form';
import { useCreateCause, useUpdateCause } from '../api';

const col = createColumnHelper<DowntimeCause>();
type Message = { tone: 'success' | 'error'; text: string } | null;

/** Adds a cause; the name is checked with the server's schema, a refusal goes beside the field. */
function NewCauseForm({ projectId, onMessage }: { projectId: string; onMessage: (m: Message) => void }) {
  const create = useCreateCause(projectId);
  const form = useForm<z.input<typeof downtimeCauseInputSchema>, unknown, DowntimeCauseInput>({
    resolver: zodResolver(downtimeCauseInputSchema),
    defaultValues: { name: '', cutterWork: false },
  });
  const onSubmit = form.handleSubmit(async (input) => {
    onMessage(null);
    try {
      const saved = await create.mutateAsync(input);
      form.reset();
      onMessage({ tone: 'success', text: `${saved.name} added.` });
    } catch (err) {
      onMessage({ tone: 'error', text: serverErrors(err, form.setError, 'The change failed. Try again.').text });
    }
  });
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-wrap items-end gap-3" aria-label="New cause">
      <TextField label="New cause" maxLength={80} {...form.register('name')} error={form.formState.errors.name?.message} />
      <label className="flex min-h-touch items-center gap-2 font-semibold">
        <input type="checkbox" className="h-5 w-5" {...form.register('cutterWork')} /> Cutter work
      </label>
      <Button type="submit" variant="secondary" disabled={form.formState.isSubmitting}>
        Add cause
      </Button>
    </form>
  );
}

/** Renames a cause in its table row. */
function RenameCauseForm({
  projectId,
  cause,
  onDone,
  onMessage,
}: {
  projectId: string;
  cause: DowntimeCause;
  onDone: () => void;
  onMessage: (m: Message) => void;
}) {
  const update = useUpdateCause(projectId);
  const form = useForm<z.input<typeof downtimeCauseUpdateSchema>, unknown, DowntimeCauseUpdate>({
    resolver: zodResolver(downtimeCauseUpdateSchema),
    defaultValues: { name: cause.name },
  });
  const onSubmit = form.handleSubmit(async (input) => {
    onMessage(null);
    try {
      const saved = await update.mutateAsync({ causeId: cause.id, update: { name: input.name } });
      onMessage({ tone: 'success', text: `${cause.name} is now ${saved.name}.` });
      onDone();
    } catch (err) {
      onMessage({ tone: 'error', text: serverErrors(err, form.setError, 'The change failed. Try again.').text });
    }
  });
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-wrap items-end gap-2">
      <TextField label={`New name for ${cause.name}`} {...form.register('name')} error={form.formState.errors.name?.message} />
      <Button type="submit" disabled={form.formState.isSubmitting}>
        Save name
      </Button>
      <Button variant="ghost" onClick={onDone}>
        Cancel
      </Button>
    </form>
  );
}

/** The drive's downtime causes; editors add, rename, flag as cutter work, and take causes out of use (never delete). */
export function CausesPanel({ projectId, causes, canEdit }: { projectId: string; causes: DowntimeCause[]; canEdit: boolean }) {
  const update = useUpdateCause(projectId);
  const [message, setMessage] = useState<Message>(null);
  const [renaming, setRenaming] = useState<string | null>(null);

  const change = async (c: DowntimeCause, changeTo: DowntimeCauseUpdate, done: (c: DowntimeCause) => string) => {
    setMessage(null);
    try {
      setMessage({ tone: 'success', text: done(await update.mutateAsync({ causeId: c.id, update: changeTo })) });
    } catch (err) {
      setMessage({ tone: 'error', text: err instanceof ApiError ? err.message : 'The change failed. Try again.' });
    }
  };

  const columns = [
    col.accessor('name', {
      header: 'Cause',
      cell: ({ row }) =>
        renaming === row.original.id ? (
          <RenameCauseForm projectId={projectId} cause={row.original} onDone={() => setRenaming(null)} onMessage={setMessage} />
        ) : (
          <span className={row.original.active ? 'font-semibold' : 'text-basalt-500 line-through'}>{row.original.name}</span>
        ),
    }),
    col.accessor((c) => (c.cutterWork ? 'yes' : 'no'), { id: 'cutterWork', header: 'Cutter work' }),
    col.accessor((c) => (c.active ? 'in use' : 'not in use'), { id: 'active', header: 'Status' }),
    ...(canEdit
      ? [
          col.display({
            id: 'actions',
            header: '',
            cell: ({ row: { original: c } }) => (
              <div className="flex flex-wrap gap-2">
                <Button variant="secondary" aria-label={`Rename ${c.name}`} onClick={() => setRenaming(c.id)}>
                  Rename
                </Button>
                <Button
                  variant="secondary"
                  onClick={() =>
                    change(
                      c,
                      { cutterWork: !c.cutterWork },
                      (s) => `${s.name} ${s.cutterWork ? 'counts' : 'no longer counts'} as cutter work.`,
                    )
                  }
                >
                  {c.cutterWork ? 'Unflag cutter work' : 'Flag as cutter work'}
                  <span className="sr-only">: {c.name}</span>
                </Button>
                <Button
                  variant="secondary"
                  onClick={() =>
                    change(c, { active: !c.active }, (s) => `${s.name} is ${s.active ? 'back in use' : 'out of use; past events keep it'}.`)
                  }
                >
                  {c.active ? 'Take out of use' : 'Put back in use'}
                  <span className="sr-only">: {c.name}</span>
                </Button>
              </div>
            ),
          }),
        ]
      : []),
  ];

  return (
    <Panel title="Causes">
      <div className="space-y-3">
        {message && <Alert tone={message.tone}>{message.text}</Alert>}
        <DataTable data={causes} columns={columns} exportName="kerfwise-downtime-causes" />
        <p className="text-caption text-basalt-700">
          Cutter work (inspections, changes, and compressed-air stops made to reach the discs) counts in the cutter-work share and is costed
          at the labour rate.
        </p>
        {canEdit && <NewCauseForm projectId={projectId} onMessage={setMessage} />}
      </div>
    </Panel>
  );
}
