import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import type {
  CancelStopInput,
  CompleteStopInput,
  CreateStopInput,
  ScheduleStopInput,
  StartStopInput,
  StopPlanQuery,
  StopPlanView,
  StopStatus,
} from '../../../shared/schemas/stop';
export type { PlanChange, PlanStop, PlanView, StopPlanSettings } from '../../../shared/schemas/stop';
import { stopListQuerySchema, stopPlanQuerySchema } from '../../../shared/schemas/stop';
import { api, apiGet } from '../../lib/api-client';
import type { StopListItem, WorkPack, Crew, RoundOption } from '../../../shared/schemas/stop';
export type { Stop, StopListItem, WorkPack, Crew, RoundOption } from '../../../shared/schemas/stop';

/** GET /stops/plan. */
export type StopPlan = StopPlanView;

const base = (projectId: string) => `/api/projects/${projectId}/stops`;

const queryString = (q: Record<string, string | number | undefined>) => {
  const entries = Object.entries(q).filter((e): e is [string, string | number] => e[1] !== undefined);
  return entries.length === 0 ? '' : `?${new URLSearchParams(entries.map(([k, v]) => [k, String(v)])).toString()}`;
};

export const getStopPlan = (projectId: string, overrides: StopPlanQuery) =>
  apiGet<StopPlan>(`${base(projectId)}/plan${queryString(overrides)}`);
export const getStops = (projectId: string, status?: StopStatus) => apiGet<StopListItem[]>(`${base(projectId)}${queryString({ status })}`);
export const getWorkPack = (projectId: string, stopId: string) => apiGet<WorkPack>(`${base(projectId)}/${stopId}`);

export const proposeStop = (projectId: string, input: CreateStopInput) => api<WorkPack>('POST', base(projectId), input);
export const scheduleStop = (projectId: string, stopId: string, input: ScheduleStopInput) =>
  api<WorkPack>('POST', `${base(projectId)}/${stopId}/schedule`, input);
export const publishStop = (projectId: string, stopId: string) => api<WorkPack>('POST', `${base(projectId)}/${stopId}/publish`);
export const startStop = (projectId: string, stopId: string, input: StartStopInput) =>
  api<WorkPack>('POST', `${base(projectId)}/${stopId}/start`, input);
export const completeStop = (projectId: string, stopId: string, input: CompleteStopInput) =>
  api<WorkPack>('POST', `${base(projectId)}/${stopId}/complete`, input);
export const cancelStop = (projectId: string, stopId: string, input: CancelStopInput) =>
  api<WorkPack>('POST', `${base(projectId)}/${stopId}/cancel`, input);

/** The list's status filter from the address (?status=); an unknown status shows every stop. Page and loader read it so. */
export const stopListStatus = (search: URLSearchParams): StopStatus | undefined =>
  stopListQuerySchema.catch({}).parse({ status: search.get('status') ?? undefined }).status;

/** The plan's overrides from the address; when they do not parse, the plan takes its defaults. Page and loader read them so. */
export const stopPlanOverrides = (search: URLSearchParams): StopPlanQuery =>
  stopPlanQuerySchema.catch({}).parse(Object.fromEntries(search));

export const stopQueries = {
  all: (projectId: string) => ['projects', projectId, 'stops'] as const,
  // The plan follows the forecast, which moves with every inspection and stroke: refetch on each visit.
  plan: (projectId: string, overrides: StopPlanQuery) =>
    queryOptions({
      queryKey: [...stopQueries.all(projectId), 'plan', overrides],
      queryFn: () => getStopPlan(projectId, overrides),
      staleTime: 1_000,
    }),
  list: (projectId: string, status?: StopStatus) =>
    queryOptions({ queryKey: [...stopQueries.all(projectId), 'list', status ?? 'all'], queryFn: () => getStops(projectId, status) }),
  detail: (projectId: string, stopId: string) =>
    queryOptions({ queryKey: [...stopQueries.all(projectId), 'detail', stopId], queryFn: () => getWorkPack(projectId, stopId) }),
  crews: (projectId: string) =>
    queryOptions({ queryKey: [...stopQueries.all(projectId), 'crews'], queryFn: () => apiGet<Crew[]>(`/api/projects/${projectId}/crews`) }),
  rounds: (projectId: string) =>
    queryOptions({
      queryKey: [...stopQueries.all(projectId), 'rounds'],
      queryFn: () => apiGet<RoundOption[]>(`/api/projects/${projectId}/rounds`),
    }),
};

/** One change to a stop's state, as the work pack's buttons and forms ask for it. */
export type StopChange =
  | { kind: 'schedule'; input: ScheduleStopInput }
  | { kind: 'publish' }
  | { kind: 'start'; input: StartStopInput }
  | { kind: 'complete'; input: CompleteStopInput }
  | { kind: 'cancel'; input: CancelStopInput };

function changeStop(projectId: string, stopId: string, change: StopChange): Promise<WorkPack> {
  switch (change.kind) {
    case 'schedule':
      return scheduleStop(projectId, stopId, change.input);
    case 'publish':
      return publishStop(projectId, stopId);
    case 'start':
      return startStop(projectId, stopId, change.input);
    case 'complete':
      return completeStop(projectId, stopId, change.input);
    case 'cancel':
      return cancelStop(projectId, stopId, change.input);
  }
}

/** A change to a stop puts the answer (the new work pack) in the cache, then invalidates `stopQueries.all`. */
export function useChangeStop(projectId: string, stopId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (change: StopChange) => changeStop(projectId, stopId, change),
    onSuccess: (pack) => {
      queryClient.setQueryData(stopQueries.detail(projectId, stopId).queryKey, pack);
      return queryClient.invalidateQueries({ queryKey: stopQueries.all(projectId) });
    },
  });
}

export function useProposeStop(projectId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateStopInput) => proposeStop(projectId, input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: stopQueries.all(projectId) }),
  });
}
