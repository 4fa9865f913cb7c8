import { queryOptions } from '@tanstack/react-query';
import type { Geology, GroundType } from '../../shared/schemas/geology';
import { apiGet } from './api-client';

/**
 * The geology of a drive (ground types and the long section) is read by the drive-data pages and
 * by the forecast: one fetcher and one cache entry for both. The keys sit under the drive-data
 * feature's key, so its mutations' invalidation (`['projects', id, 'drive-data']`) refreshes them too.
 */
export const getGroundTypes = (projectId: string) => apiGet<GroundType[]>(`/api/projects/${projectId}/ground-types`);
export const getGeology = (projectId: string) => apiGet<Geology>(`/api/projects/${projectId}/geology`);

export const geologyQueries = {
  all: (projectId: string) => ['projects', projectId, 'drive-data'] as const,
  groundTypes: (projectId: string) =>
    queryOptions({ queryKey: [...geologyQueries.all(projectId), 'ground-types'], queryFn: () => getGroundTypes(projectId) }),
  geology: (projectId: string) =>
    queryOptions({ queryKey: [...geologyQueries.all(projectId), 'geology'], queryFn: () => getGeology(projectId) }),
};
