import { useQueryClient } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useState, type FormEvent } from 'react';
import { downtimeCauseInputSchema, type DowntimeCause, type DowntimeCauseUpdate } from '../../../../shared/schemas/downtime';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { TextField } from '../../../components/ui/field';
import { Panel } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { createCause, downtimeQueries, updateCause } from '../api';

const col = createColumnHelper<DowntimeCause>();

/** The drive's downtime causes; editors add, rename, flag as cutter work, and take causes out of use (never delete). */
export function CausesPanel({ projectId, causes, canEdit }: { projectId: string; causes: DowntimeCause[]; canEdit: boolean }) {
  const queryClient = useQueryClient();
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const [name, setName] = useState('');
  const [cutterWork, setCutterWork] = useState(false);
  const [renaming, setRenaming] = useState<{ id: string; name: string } | null>(null);

  const run = async (fn: () => Promise<DowntimeCause>, done: (c: DowntimeCause) => string) => {
    setMessage(null);
    try {
      const saved = await fn();
      await queryClient.invalidateQueries({ queryKey: downtimeQueries.all(projectId) });
      setMessage({ tone: 'success', text: done(saved) });
      return true;
    } catch (err) {
      setMessage({ tone: 'error', text: err instanceof ApiError ? err.message : 'The change failed. Try again.' });
      return false;
    }
  };
  const change = (c: DowntimeCause, update: DowntimeCauseUpdate, done: (c: DowntimeCause) => string) =>
    run(() => updateCause(projectId, c.id, update), done);

  const add = async (e: FormEvent) => {
    e.preventDefault();
    const parsed = downtimeCauseInputSchema.safeParse({ name, cutterWork });
    if (!parsed.success) return setMessage({ tone: 'error', text: parsed.error.issues[0].message });
    if (
      await run(
        () => createCause(projectId, parsed.data),
        (c) => `${c.name} added.`,
      )
    ) {
      setName('');
      setCutterWork(false);
    }
  };
  const rename = async (e: FormEvent) => {
    e.preventDefault();
    if (!renaming) return;
    const cause = causes.find((c) => c.id === renaming.id)!;
    if (await change(cause, { name: renaming.name.trim() }, (c) => `${cause.name} is now ${c.name}.`)) setRenaming(null);
  };

  const columns = [
    col.accessor('name', {
      header: 'Cause',
      cell: ({ row }) =>
        renaming?.id === row.original.id ? (
          <form onSubmit={rename} className="flex flex-wrap items-end gap-2">
            <TextField
              label={`New name for ${row.original.name}`}
              value={renaming.name}
              onChange={(e) => setRenaming({ ...renaming, name: e.target.value })}
            />
            <Button type="submit">Save name</Button>
            <Button variant="ghost" onClick={() => setRenaming(null)}>
              Cancel
            </Button>
          </form>
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
                <Button variant="secondary" aria-label={`Rename ${c.name}`} onClick={() => setRenaming({ id: c.id, name: c.name })}>
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
        {canEdit && (
          <form onSubmit={add} className="flex flex-wrap items-end gap-3" aria-label="New cause">
            <TextField label="New cause" value={name} onChange={(e) => setName(e.target.value)} maxLength={80} />
            <label className="flex min-h-touch items-center gap-2 font-semibold">
              <input type="checkbox" className="h-5 w-5" checked={cutterWork} onChange={(e) => setCutterWork(e.target.checked)} /> Cutter
              work
            </label>
            <Button type="submit" variant="secondary">
              Add cause
            </Button>
          </form>
        )}
      </div>
    </Panel>
  );
}
