import { queryOptions } from '@tanstack/react-query';
import { apiGet } from '../../lib/api-client';
import type { Project } from '../../../shared/schemas/project';
export type { Project } from '../../../shared/schemas/project';

export const getProjects = () => apiGet<Project[]>('/api/projects');
export const getProject = (projectId: string) => apiGet<Project>(`/api/projects/${projectId}`);

export const projectQueries = {
  all: ['projects'] as const,
  list: () => queryOptions({ queryKey: [...projectQueries.all, 'list'], queryFn: getProjects }),
  detail: (projectId: string) => queryOptions({ queryKey: [...projectQueries.all, projectId], queryFn: () => getProject(projectId) }),
};

import type { OverviewWire } from '../../../shared/schemas/overview';
export type { OverviewWire } from '../../../shared/schemas/overview';

export const getOverview = (projectId: string) => apiGet<OverviewWire>(`/api/projects/${projectId}/overview`);

/** Each role's start of the day (the server answers the caller's role's sections only). */
export const overviewQueries = {
  all: ['overview'] as const,
  // Fetched again on every visit: it sums up what other screens change.
  detail: (projectId: string) =>
    queryOptions({ queryKey: [...overviewQueries.all, projectId], queryFn: () => getOverview(projectId), staleTime: 0 }),
};
