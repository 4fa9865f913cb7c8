import { queryOptions } from '@tanstack/react-query';
import type { ProjectRole } from '../../../shared/roles';
import { apiGet } from '../../lib/api-client';

export interface Project {
  id: string;
  name: string;
  machineDescription: string;
  excavatedDiameterM: number;
  startChainageM: number;
  driveDirection: 'increasing' | 'decreasing';
  siteTimeZone: string;
  units: string;
  role: ProjectRole;
}

export const getProjects = () => apiGet<Project[]>('/api/projects');
export const getProject = (projectId: string) => apiGet<Project>(`/api/projects/${projectId}`);

export const projectQueries = {
  all: ['projects'] as const,
  list: () => queryOptions({ queryKey: [...projectQueries.all, 'list'], queryFn: getProjects }),
  detail: (projectId: string) => queryOptions({ queryKey: [...projectQueries.all, projectId], queryFn: () => getProject(projectId) }),
};
