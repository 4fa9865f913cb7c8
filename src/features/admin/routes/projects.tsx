import { zodResolver } from '@hookform/resolvers/zod';
import { useQuery, useSuspenseQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { projectRoles, roleLabels, type ProjectRole } from '../../../../shared/roles';
import { projectInputSchema } from '../../../../shared/schemas/project';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { SelectField, TextField } from '../../../components/ui/field';
import { Page, Panel } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { serverErrors } from '../../../lib/form';
import { adminQueries, useCreateProject, useRemoveMembership, useSetMembership, type AdminProject } from '../api';
import { AdminTabs } from '../components/admin-tabs';

type ProjectForm = z.input<typeof projectInputSchema>;
const col = createColumnHelper<AdminProject>();
const timeZones = Intl.supportedValuesOf('timeZone');

function Members({ project }: { project: AdminProject }) {
  const { data: users = [] } = useQuery(adminQueries.users());
  const members = useQuery(adminQueries.members(project.id));
  const setMember = useSetMembership();
  const removeMember = useRemoveMembership();
  const [userId, setUserId] = useState('');
  const [role, setRole] = useState<ProjectRole>('fitter');
  const [error, setError] = useState<string | null>(null);
  const run = async (fn: () => Promise<unknown>) => {
    setError(null);
    try {
      await fn();
    } catch (err) {
      setError(err instanceof ApiError ? err.message : 'The change failed.');
    }
  };
  return (
    <Panel title={`Members of ${project.name}`}>
      {error && <Alert tone="error">{error}</Alert>}
      <ul className="divide-y divide-basalt-100">
        {(members.data ?? []).map((m) => (
          <li key={m.userId} className="flex flex-wrap items-center gap-3 py-2">
            <span className="flex-1">
              {m.name} <span className="text-basalt-600">({m.email})</span>
            </span>
            <label className="sr-only" htmlFor={`role-${m.userId}`}>
              Role of {m.name}
            </label>
            <select
              id={`role-${m.userId}`}
              className="min-h-touch rounded-md border-2 border-basalt-300 px-2"
              value={m.role}
              onChange={(e) =>
                run(() => setMember.mutateAsync({ projectId: project.id, userId: m.userId, role: e.target.value as ProjectRole }))
              }
            >
              {projectRoles.map((r) => (
                <option key={r} value={r}>
                  {roleLabels[r]}
                </option>
              ))}
            </select>
            <Button variant="secondary" onClick={() => run(() => removeMember.mutateAsync({ projectId: project.id, userId: m.userId }))}>
              Remove
            </Button>
          </li>
        ))}
      </ul>
      <div className="mt-4 grid gap-3 md:grid-cols-[1fr_1fr_auto] md:items-end">
        <SelectField label="Add a person" value={userId} onChange={(e) => setUserId(e.target.value)}>
          <option value="">— choose —</option>
          {users
            .filter((u) => u.active)
            .map((u) => (
              <option key={u.id} value={u.id}>
                {u.name} ({u.email})
              </option>
            ))}
        </SelectField>
        <SelectField label="Role" value={role} onChange={(e) => setRole(e.target.value as ProjectRole)}>
          {projectRoles.map((r) => (
            <option key={r} value={r}>
              {roleLabels[r]}
            </option>
          ))}
        </SelectField>
        <Button disabled={!userId} onClick={() => run(() => setMember.mutateAsync({ projectId: project.id, userId, role }))}>
          Add
        </Button>
      </div>
    </Panel>
  );
}

export function AdminProjectsRoute() {
  const create = useCreateProject();
  const { data: projects } = useSuspenseQuery(adminQueries.projects());
  const [selected, setSelected] = useState<string | null>(null);
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const form = useForm<ProjectForm>({
    resolver: zodResolver(projectInputSchema),
    defaultValues: {
      driveDirection: 'increasing',
      siteTimeZone: Intl.DateTimeFormat().resolvedOptions().timeZone,
      startChainageM: 0,
      units: 'metric',
    },
  });
  const onCreate = form.handleSubmit(async (v) => {
    setMessage(null);
    try {
      const p = await create.mutateAsync(projectInputSchema.parse(v));
      form.reset();
      setMessage({ tone: 'success', text: `Project ${p.name} created. Add its members below.` });
      setSelected(p.id);
    } catch (err) {
      setMessage({ tone: 'error', text: serverErrors(err, form.setError, 'Creating the project failed.').text });
    }
  });
  const columns = [
    col.accessor('name', { header: 'Drive' }),
    col.accessor('excavatedDiameterM', { meta: { csvDecimals: 2 }, header: 'Diameter (m)' }),
    col.accessor('siteTimeZone', { header: 'Time zone' }),
    col.accessor('memberCount', { meta: { csvDecimals: 0 }, header: 'Members' }),
    col.display({
      id: 'members',
      header: 'Actions',
      cell: ({ row }) => (
        <Button variant="secondary" onClick={() => setSelected(row.original.id)}>
          Manage members
        </Button>
      ),
    }),
  ];
  const selectedProject = projects.find((p) => p.id === selected);
  const e = form.formState.errors;
  return (
    <Page title="Administration">
      <AdminTabs />
      {message && <Alert tone={message.tone}>{message.text}</Alert>}
      <DataTable data={projects} columns={columns} exportName="kerfwise-projects" />
      {selectedProject && <Members project={selectedProject} />}
      <Panel title="New project (one TBM drive)">
        <form onSubmit={onCreate} className="grid gap-4 md:grid-cols-2" noValidate>
          <TextField label="Name" {...form.register('name')} error={e.name?.message} />
          <TextField label="Machine" {...form.register('machineDescription')} error={e.machineDescription?.message} />
          <TextField
            label="Excavated diameter (m)"
            inputMode="decimal"
            {...form.register('excavatedDiameterM')}
            error={e.excavatedDiameterM?.message}
          />
          <TextField
            label="Start chainage (m)"
            inputMode="decimal"
            {...form.register('startChainageM')}
            error={e.startChainageM?.message}
          />
          <SelectField label="As the machine advances, chainage…" {...form.register('driveDirection')} error={e.driveDirection?.message}>
            <option value="increasing">increases</option>
            <option value="decreasing">decreases</option>
          </SelectField>
          <SelectField label="Site time zone" {...form.register('siteTimeZone')} error={e.siteTimeZone?.message}>
            {timeZones.map((tz) => (
              <option key={tz} value={tz}>
                {tz}
              </option>
            ))}
          </SelectField>
          <div className="md:col-span-2">
            <Button type="submit" disabled={form.formState.isSubmitting}>
              Create project
            </Button>
          </div>
        </form>
      </Panel>
    </Page>
  );
}
