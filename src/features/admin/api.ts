import { queryOptions } from '@tanstack/react-query';
import type { ProjectRole } from '../../../shared/roles';
import type { ProjectInput } from '../../../shared/schemas/project';
import type { InviteUserInput, UpdateUserInput } from '../../../shared/schemas/user';
import { api, apiGet } from '../../lib/api-client';

export interface AdminUser {
  id: string;
  email: string;
  name: string;
  isAdmin: boolean;
  active: boolean;
  invited: boolean;
  memberships: { projectId: string; projectName: string; role: ProjectRole }[];
}

export interface AdminProject {
  id: string;
  name: string;
  machineDescription: string;
  excavatedDiameterM: number;
  startChainageM: number;
  driveDirection: 'increasing' | 'decreasing';
  siteTimeZone: string;
  memberCount: number;
}

export interface CaughtMail {
  id: number;
  receivedAt: string;
  fromAddress: string;
  toAddresses: string[];
  subject: string;
  textBody: string;
}

export interface JobRunRow {
  id: number;
  job: string;
  trigger: string;
  startedAt: string;
  finishedAt: string | null;
  outcome: string;
  summary: string | null;
  error: string | null;
}

export interface JobInfo {
  name: string;
  label: string;
  cron: string;
  runs: JobRunRow[];
}

export const adminQueries = {
  all: ['admin'] as const,
  users: () => queryOptions({ queryKey: [...adminQueries.all, 'users'], queryFn: () => apiGet<AdminUser[]>('/api/admin/users') }),
  projects: () => queryOptions({ queryKey: [...adminQueries.all, 'projects'], queryFn: () => apiGet<AdminProject[]>('/api/admin/projects') }),
  jobs: () => queryOptions({ queryKey: [...adminQueries.all, 'jobs'], queryFn: () => apiGet<JobInfo[]>('/api/admin/jobs'), refetchInterval: 10_000 }),
  mail: () =>
    queryOptions({
      queryKey: [...adminQueries.all, 'mail'],
      queryFn: () => apiGet<{ caught: CaughtMail[]; outbox: { waiting: number; failing: number }; uncertain: { id: number; subject: string; toAddresses: string[]; claimedAt: string }[] }>('/api/admin/mail'),
      refetchInterval: 5000,
    }),
};

export const inviteUser = (input: InviteUserInput) => api<AdminUser>('POST', '/api/admin/users', input);
export const updateUser = (userId: string, input: UpdateUserInput) => api<AdminUser>('PATCH', `/api/admin/users/${userId}`, input);
export const createProject = (input: ProjectInput) => api<AdminProject>('POST', '/api/admin/projects', input);
export const setMembership = (projectId: string, userId: string, role: ProjectRole) =>
  api('PUT', `/api/admin/projects/${projectId}/members/${userId}`, { role });
export const removeMembership = (projectId: string, userId: string) => api<void>('DELETE', `/api/admin/projects/${projectId}/members/${userId}`);
/** `again`: the administrator confirmed sending a weekly digest's week a second time. */
export const runJobNow = ({ name, again = false }: { name: string; again?: boolean }) =>
  api<JobRunRow>('POST', `/api/admin/jobs/${name}/run${again ? '?again=true' : ''}`);
export const releaseUncertainMail = (id: number) => api('POST', `/api/admin/outbox/${id}/release`);
