import { zodResolver } from '@hookform/resolvers/zod';
import { useSuspenseQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { projectRoles, roleLabels, type ProjectRole } from '../../../../shared/roles';
import { emailSchema } from '../../../../shared/schemas/auth';
import { Alert } from '../../../components/ui/alert';
import { Button } from '../../../components/ui/button';
import { DataTable } from '../../../components/ui/data-table';
import { SelectField, TextField } from '../../../components/ui/field';
import { Page, Panel } from '../../../components/ui/page';
import { serverErrors } from '../../../lib/form';
import { useMe } from '../../auth/use-me';
import { adminQueries, useInviteUser, useSetUserActive, type AdminUser } from '../api';
import { AdminTabs } from '../components/admin-tabs';

const inviteFormSchema = z.object({
  name: z.string().trim().min(1, 'Enter the person’s name.'),
  email: emailSchema,
  projectId: z.string(),
  role: z.union([z.enum(projectRoles), z.literal('')]),
  isAdmin: z.boolean(),
});
type InviteForm = z.infer<typeof inviteFormSchema>;

const col = createColumnHelper<AdminUser>();

export function AdminUsersRoute() {
  const me = useMe();
  const { data: users } = useSuspenseQuery(adminQueries.users());
  const { data: projects } = useSuspenseQuery(adminQueries.projects());
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const form = useForm<InviteForm>({ resolver: zodResolver(inviteFormSchema), defaultValues: { projectId: '', role: '', isAdmin: false } });

  const invite = useInviteUser();
  const setActive = useSetUserActive();
  const toggleActive = (u: AdminUser) =>
    setActive.mutate({ id: u.id, active: !u.active }, { onError: (err) => setMessage({ tone: 'error', text: err.message }) });

  const onInvite = form.handleSubmit(async (v) => {
    setMessage(null);
    try {
      const memberships = v.projectId && v.role ? [{ projectId: v.projectId, role: v.role as ProjectRole }] : [];
      await invite.mutateAsync({ name: v.name, email: v.email, isAdmin: v.isAdmin, memberships });
      form.reset();
      setMessage({ tone: 'success', text: `Invitation sent to ${v.email}.` });
    } catch (err) {
      setMessage({ tone: 'error', text: serverErrors(err, form.setError, 'The invitation failed.').text });
    }
  });

  const columns = [
    col.accessor('name', { header: 'Name' }),
    col.accessor('email', { header: 'E-mail' }),
    col.accessor((u) => u.memberships.map((m) => `${m.projectName}: ${roleLabels[m.role]}`).join('; '), {
      id: 'roles',
      header: 'Drives and roles',
    }),
    col.accessor((u) => (!u.active ? 'deactivated' : u.invited ? 'invited' : 'active') + (u.isAdmin ? ', administrator' : ''), {
      id: 'status',
      header: 'Status',
    }),
    col.display({
      id: 'actions',
      header: 'Actions',
      cell: ({ row }) =>
        row.original.id === me.user.id ? null : (
          <Button variant={row.original.active ? 'secondary' : 'primary'} onClick={() => toggleActive(row.original)}>
            {row.original.active ? 'Deactivate' : 'Reactivate'}
          </Button>
        ),
    }),
  ];

  return (
    <Page title="Administration">
      <AdminTabs />
      {message && <Alert tone={message.tone}>{message.text}</Alert>}
      <Panel title="Invite a person">
        <form onSubmit={onInvite} className="grid gap-4 md:grid-cols-2" noValidate>
          <TextField label="Name" {...form.register('name')} error={form.formState.errors.name?.message} />
          <TextField label="E-mail" type="email" {...form.register('email')} error={form.formState.errors.email?.message} />
          <SelectField label="Drive (optional)" {...form.register('projectId')}>
            <option value="">— none yet —</option>
            {projects.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </SelectField>
          <SelectField label="Role on that drive" {...form.register('role')}>
            <option value="">— choose —</option>
            {projectRoles.map((r) => (
              <option key={r} value={r}>
                {roleLabels[r]}
              </option>
            ))}
          </SelectField>
          <label className="flex min-h-touch items-center gap-3">
            <input type="checkbox" className="h-6 w-6" {...form.register('isAdmin')} /> Administrator
          </label>
          <div className="md:col-span-2">
            <Button type="submit" disabled={form.formState.isSubmitting}>
              Send invitation
            </Button>
          </div>
        </form>
      </Panel>
      <DataTable data={users} columns={columns} exportName="kerfwise-users" />
    </Page>
  );
}
