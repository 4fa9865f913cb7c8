import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import type {
  CutterCostReport,
  DowntimeCause,
  DowntimeCauseInput,
  DowntimeCauseUpdate,
  DowntimeEventInput,
  DowntimeEventList,
  DowntimeEventRow,
  DowntimeReport,
  EventListQuery,
  PeriodQuery,
  ProposeFromGapsResult,
  SiteSettings,
  SiteSettingsInput,
} from '../../../shared/schemas/downtime';
import { stopQueries } from '../stops/api';
export type { PeriodQuery } from '../../../shared/schemas/downtime';
export type { StopOption } from '../../../shared/schemas/stop';
import { api, apiGet } from '../../lib/api-client';

/** The cause filter's value for "no cause yet". */
export const UNEXPLAINED = 'unexplained';

/** The event list's filters from the address: the cause chosen (an id, UNEXPLAINED or '') and the query. Page and loader read them so. */
export function eventFiltersFrom(params: URLSearchParams) {
  const cause = params.get('unexplained') === 'true' ? UNEXPLAINED : (params.get('causeId') ?? '');
  const query = {
    from: params.get('from') ?? undefined,
    to: params.get('to') ?? undefined,
    causeId: cause && cause !== UNEXPLAINED ? cause : undefined,
    unexplained: cause === UNEXPLAINED ? ('true' as const) : undefined,
  };
  return { cause, query };
}

/** The report's period from the address (?from=&to=). */
export const periodFrom = (params: URLSearchParams): PeriodQuery => ({
  from: params.get('from') ?? undefined,
  to: params.get('to') ?? undefined,
});

const base = (projectId: string) => `/api/projects/${projectId}/downtime`;

/** Query text with empty values left out. */
export function queryString(query: object): string {
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(query))
    if (value !== undefined && value !== '' && value !== false) params.set(key, String(value));
  const text = params.toString();
  return text ? `?${text}` : '';
}

export const getCauses = (projectId: string) => apiGet<DowntimeCause[]>(`${base(projectId)}/causes`);
export const createCause = (projectId: string, input: DowntimeCauseInput) => api<DowntimeCause>('POST', `${base(projectId)}/causes`, input);
export const updateCause = (projectId: string, causeId: string, input: DowntimeCauseUpdate) =>
  api<DowntimeCause>('PATCH', `${base(projectId)}/causes/${causeId}`, input);
export const getSettings = (projectId: string) => apiGet<SiteSettings>(`${base(projectId)}/settings`);
export const saveSettings = (projectId: string, input: SiteSettingsInput) => api<SiteSettings>('PUT', `${base(projectId)}/settings`, input);
export const getEvents = (projectId: string, query: EventListQuery) =>
  apiGet<DowntimeEventList>(`${base(projectId)}/events${queryString(query)}`);
export const createEvent = (projectId: string, input: DowntimeEventInput) =>
  api<DowntimeEventRow>('POST', `${base(projectId)}/events`, input);
export const updateEvent = (projectId: string, eventId: string, input: DowntimeEventInput) =>
  api<DowntimeEventRow>('PUT', `${base(projectId)}/events/${eventId}`, input);
export const deleteEvent = (projectId: string, eventId: string) => api<void>('DELETE', `${base(projectId)}/events/${eventId}`);
export const proposeFromGaps = (projectId: string) => api<ProposeFromGapsResult>('POST', `${base(projectId)}/propose-from-gaps`);
export const getReport = (projectId: string, period: PeriodQuery) =>
  apiGet<DowntimeReport>(`${base(projectId)}/report${queryString(period)}`);
export const getCost = (projectId: string, period: PeriodQuery) =>
  apiGet<CutterCostReport>(`${base(projectId)}/cost${queryString(period)}`);

export const downtimeQueries = {
  all: (projectId: string) => ['projects', projectId, 'downtime'] as const,
  causes: (projectId: string) =>
    queryOptions({ queryKey: [...downtimeQueries.all(projectId), 'causes'], queryFn: () => getCauses(projectId) }),
  settings: (projectId: string) =>
    queryOptions({ queryKey: [...downtimeQueries.all(projectId), 'settings'], queryFn: () => getSettings(projectId) }),
  events: (projectId: string, query: EventListQuery) =>
    queryOptions({ queryKey: [...downtimeQueries.all(projectId), 'events', query], queryFn: () => getEvents(projectId, query) }),
  report: (projectId: string, period: PeriodQuery) =>
    queryOptions({ queryKey: [...downtimeQueries.all(projectId), 'report', period], queryFn: () => getReport(projectId, period) }),
  cost: (projectId: string, period: PeriodQuery) =>
    queryOptions({ queryKey: [...downtimeQueries.all(projectId), 'cost', period], queryFn: () => getCost(projectId, period) }),
  /** The drive's stops to link an event to: the stops list's own query (one fetch, one cache entry). */
  stops: (projectId: string) => stopQueries.list(projectId),
};

/** Every downtime write invalidates `downtimeQueries.all`: events, causes, settings and reports move together. */
function useDowntimeMutation<TInput, TResult>(projectId: string, mutationFn: (input: TInput) => Promise<TResult>) {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn, onSuccess: () => queryClient.invalidateQueries({ queryKey: downtimeQueries.all(projectId) }) });
}

export const useSaveSettings = (projectId: string) =>
  useDowntimeMutation(projectId, (input: SiteSettingsInput) => saveSettings(projectId, input));
export const useProposeFromGaps = (projectId: string) => useDowntimeMutation(projectId, () => proposeFromGaps(projectId));
export const useCreateCause = (projectId: string) =>
  useDowntimeMutation(projectId, (input: DowntimeCauseInput) => createCause(projectId, input));
export const useUpdateCause = (projectId: string) =>
  useDowntimeMutation(projectId, ({ causeId, update }: { causeId: string; update: DowntimeCauseUpdate }) =>
    updateCause(projectId, causeId, update),
  );
/** Adds an event (`eventId` null) or replaces one. */
export const useSaveEvent = (projectId: string) =>
  useDowntimeMutation(projectId, ({ eventId, input }: { eventId: string | null; input: DowntimeEventInput }) =>
    eventId ? updateEvent(projectId, eventId, input) : createEvent(projectId, input),
  );
export const useDeleteEvent = (projectId: string) => useDowntimeMutation(projectId, (eventId: string) => deleteEvent(projectId, eventId));
