import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import type { CutterListQuery, ReceiveCutterInput, WorkshopInput } from '../../../shared/schemas/cutter';
import { api, apiGet } from '../../lib/api-client';
import type { Cutter, CutterListItem, CutterLife } from '../../../shared/schemas/cutter';
export type { Cutter, CutterListItem, CutterLife } from '../../../shared/schemas/cutter';

/** The store list's filters: the query of GET /cutters. */
export type CutterFilters = CutterListQuery;

const base = (projectId: string) => `/api/projects/${projectId}/cutters`;

export function getCutters(projectId: string, filters: CutterFilters) {
  const params = new URLSearchParams();
  if (filters.status) params.set('status', filters.status);
  if (filters.q) params.set('q', filters.q);
  const query = params.toString();
  return apiGet<CutterListItem[]>(query ? `${base(projectId)}?${query}` : base(projectId));
}
export const getCutter = (projectId: string, cutterId: string) => apiGet<CutterLife>(`${base(projectId)}/${cutterId}`);
export const receiveCutter = (projectId: string, input: ReceiveCutterInput) => api<Cutter>('POST', base(projectId), input);
export const recordWorkshop = (projectId: string, cutterId: string, input: WorkshopInput) =>
  api<Cutter>('POST', `${base(projectId)}/${cutterId}/workshop`, input);

export const cutterQueries = {
  all: (projectId: string) => ['projects', projectId, 'cutters'] as const,
  list: (projectId: string, filters: CutterFilters) =>
    queryOptions({ queryKey: [...cutterQueries.all(projectId), 'list', filters], queryFn: () => getCutters(projectId, filters) }),
  detail: (projectId: string, cutterId: string) =>
    queryOptions({ queryKey: [...cutterQueries.all(projectId), 'detail', cutterId], queryFn: () => getCutter(projectId, cutterId) }),
};

/** Every cutter write invalidates `cutterQueries.all`: the list and the cutter's life move together. */
function useCutterMutation<TInput, TResult>(projectId: string, mutationFn: (input: TInput) => Promise<TResult>) {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn, onSuccess: () => queryClient.invalidateQueries({ queryKey: cutterQueries.all(projectId) }) });
}

export const useReceiveCutter = (projectId: string) =>
  useCutterMutation(projectId, (input: ReceiveCutterInput) => receiveCutter(projectId, input));
export const useRecordWorkshop = (projectId: string, cutterId: string) =>
  useCutterMutation(projectId, (input: WorkshopInput) => recordWorkshop(projectId, cutterId, input));
