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
