import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import type { ProjectRole } from '../../../shared/roles';
import type { ProjectInput } from '../../../shared/schemas/project';
import type { InviteUserInput, UpdateUserInput } from '../../../shared/schemas/user';
import { api, apiGet } from '../../lib/api-client';
import type {
  AdminMailQuery,
  AdminMailView,
  AdminMember,
  AdminMembership,
  AdminProject,
  AdminProjectRow,
  AdminUser,
  AdminUserRow,
  BackupStatus,
  JobInfo,
  JobRunRow,
  ReleasedMail,
} from '../../../shared/schemas/admin';
export type {
  AdminMail,
  AdminMailQuery,
  AdminMailView,
  AdminMember,
  AdminMembership,
  AdminUser,
  AdminUserRow,
  AdminProject,
  AdminProjectRow,
  BackupStatus,
  JobRunRow,
  JobInfo,
  MailAbout,
} from '../../../shared/schemas/admin';

/**
 * The zone Admin → Mail and Admin → Jobs show times in: mail and job runs belong to the
 * installation, not to one drive, so they use the first project's site zone (UTC when there is no
 * project yet). See DEVELOPERS.md, decision 30.
 */
export const installationTimeZone = (projects: readonly Pick<AdminProject, 'siteTimeZone'>[]) => projects[0]?.siteTimeZone ?? 'UTC';

export const adminQueries = {
  all: ['admin'] as const,
  users: () => queryOptions({ queryKey: [...adminQueries.all, 'users'], queryFn: () => apiGet<AdminUser[]>('/api/admin/users') }),
  projects: () =>
    queryOptions({ queryKey: [...adminQueries.all, 'projects'], queryFn: () => apiGet<AdminProject[]>('/api/admin/projects') }),
  members: (projectId: string) =>
    queryOptions({
      queryKey: [...adminQueries.all, 'members', projectId],
      queryFn: () => apiGet<AdminMember[]>(`/api/admin/projects/${projectId}/members`),
    }),
  jobs: () =>
    queryOptions({ queryKey: [...adminQueries.all, 'jobs'], queryFn: () => apiGet<JobInfo[]>('/api/admin/jobs'), refetchInterval: 10_000 }),
  backupStatus: () =>
    queryOptions({
      queryKey: [...adminQueries.all, 'backup-status'],
      queryFn: () => apiGet<BackupStatus>('/api/admin/backups/status'),
      refetchInterval: 60_000,
    }),
  /** The outbox, newest first, filtered by kind and (part of) a recipient's address. */
  mail: (filters: AdminMailQuery = {}) =>
    queryOptions({
      queryKey: [...adminQueries.all, 'mail', filters],
      queryFn: () => {
        const params = new URLSearchParams();
        if (filters.kind) params.set('kind', filters.kind);
        if (filters.recipient?.trim()) params.set('recipient', filters.recipient.trim());
        const search = params.toString();
        return apiGet<AdminMailView>(`/api/admin/mail${search ? `?${search}` : ''}`);
      },
      refetchInterval: 5000,
    }),
};

export const inviteUser = (input: InviteUserInput) => api<AdminUserRow>('POST', '/api/admin/users', input);
export const updateUser = (userId: string, input: UpdateUserInput) => api<AdminUserRow>('PATCH', `/api/admin/users/${userId}`, input);
export const createProject = (input: ProjectInput) => api<AdminProjectRow>('POST', '/api/admin/projects', input);
export const setMembership = (projectId: string, userId: string, role: ProjectRole) =>
  api<AdminMembership>('PUT', `/api/admin/projects/${projectId}/members/${userId}`, { role });
export const removeMembership = (projectId: string, userId: string) =>
  api<void>('DELETE', `/api/admin/projects/${projectId}/members/${userId}`);
/** `again`: the administrator confirmed sending a weekly digest's week a second time. */
export const runJobNow = ({ name, again = false }: { name: string; again?: boolean }) =>
  api<JobRunRow>('POST', `/api/admin/jobs/${name}/run${again ? '?again=true' : ''}`);
export const releaseUncertainMail = (id: number) => api<ReleasedMail>('POST', `/api/admin/outbox/${id}/release`);

/** Every administrative change invalidates `adminQueries.all`: users, projects and members move together. */
function useAdminMutation<TInput, TResult>(mutationFn: (input: TInput) => Promise<TResult>) {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn, onSuccess: () => queryClient.invalidateQueries({ queryKey: adminQueries.all }) });
}

export const useInviteUser = () => useAdminMutation(inviteUser);
export const useSetUserActive = () => useAdminMutation((u: Pick<AdminUser, 'id' | 'active'>) => updateUser(u.id, { active: u.active }));
export const useCreateProject = () => useAdminMutation(createProject);
export const useSetMembership = () =>
  useAdminMutation((m: { projectId: string; userId: string; role: ProjectRole }) => setMembership(m.projectId, m.userId, m.role));
export const useRemoveMembership = () =>
  useAdminMutation((m: { projectId: string; userId: string }) => removeMembership(m.projectId, m.userId));
export const useRunJobNow = () => useAdminMutation(runJobNow);
export const useReleaseUncertainMail = () => useAdminMutation(releaseUncertainMail);
