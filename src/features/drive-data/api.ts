import { keepPreviousData, queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import type { GroundTypeInput, SectionInput, StrokeListQuery } from '../../../shared/schemas/geology';
import type { ApiErrorBody, ApiIssue } from '../../../shared/schemas/api-error';
import { api, apiGet, ApiError } from '../../lib/api-client';
import type {
  StrokePage,
  DailyAdvance,
  AdvanceLogMapping,
  GeologyMapping,
  AdvanceLogImported,
  GeologyImported,
} from '../../../shared/schemas/advance-log';
import type { GroundType, LongSectionSaved } from '../../../shared/schemas/geology';
export type { GroundType, GeologySection, Geology, LongSectionSaved } from '../../../shared/schemas/geology';
export type {
  Stroke,
  StrokePage,
  DailyAdvance,
  AdvanceLogMapping,
  GeologyMapping,
  AdvanceLogImported,
  GeologyImported,
} from '../../../shared/schemas/advance-log';

/** Filters of the advance-log list (the paging and sorting come with them in StrokeListQuery). */
export type StrokeFilters = Pick<StrokeListQuery, 'ringFrom' | 'ringTo' | 'from' | 'to'>;

const base = (projectId: string) => `/api/projects/${projectId}`;

/** Query text of a list request: empty values left out. */
function strokeQueryString(query: Partial<StrokeListQuery>): string {
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(query)) if (value !== undefined && value !== '') params.set(key, String(value));
  return params.toString();
}

export const strokesExportUrl = (projectId: string, filters: StrokeFilters) =>
  `${base(projectId)}/strokes/export.csv?${strokeQueryString(filters)}`;
export const advanceLogImportUrl = (projectId: string) => `${base(projectId)}/strokes/import`;
export const geologyImportUrl = (projectId: string) => `${base(projectId)}/geology/import`;

export const getStrokes = (projectId: string, query: StrokeListQuery) =>
  apiGet<StrokePage>(`${base(projectId)}/strokes?${strokeQueryString(query)}`);
export const getDailyAdvance = (projectId: string) => apiGet<DailyAdvance[]>(`${base(projectId)}/strokes/daily`);
export const getAdvanceLogMapping = (projectId: string) => apiGet<AdvanceLogMapping>(`${base(projectId)}/strokes/mapping`);
export const getGeologyMapping = (projectId: string) => apiGet<GeologyMapping>(`${base(projectId)}/geology/mapping`);
export const createGroundType = (projectId: string, input: GroundTypeInput) =>
  api<GroundType>('POST', `${base(projectId)}/ground-types`, input);
export const updateGroundType = (projectId: string, id: string, input: GroundTypeInput) =>
  api<GroundType>('PATCH', `${base(projectId)}/ground-types/${id}`, input);
export const deleteGroundType = (projectId: string, id: string) => api<void>('DELETE', `${base(projectId)}/ground-types/${id}`);
export const saveLongSection = (projectId: string, sections: SectionInput[]) =>
  api<LongSectionSaved>('PUT', `${base(projectId)}/geology`, { sections });

export const driveDataQueries = {
  all: (projectId: string) => ['projects', projectId, 'drive-data'] as const,
  strokes: (projectId: string, query: StrokeListQuery) =>
    queryOptions({
      queryKey: [...driveDataQueries.all(projectId), 'strokes', query],
      queryFn: () => getStrokes(projectId, query),
      // The old page stays on screen while the next one loads, so the table does not jump.
      placeholderData: keepPreviousData,
    }),
  daily: (projectId: string) =>
    queryOptions({ queryKey: [...driveDataQueries.all(projectId), 'daily'], queryFn: () => getDailyAdvance(projectId) }),
  mapping: (projectId: string) =>
    queryOptions({ queryKey: [...driveDataQueries.all(projectId), 'mapping'], queryFn: () => getAdvanceLogMapping(projectId) }),
  geologyMapping: (projectId: string) =>
    queryOptions({ queryKey: [...driveDataQueries.all(projectId), 'mapping', 'geology'], queryFn: () => getGeologyMapping(projectId) }),
};

/** A problem the server found in an uploaded file; row 0 is the file as a whole. */
export type ImportIssue = ApiIssue;

/** What an import answers on success (shared/schemas/advance-log.ts): every one lists its notes on the file. */
export type ImportAnswer = AdvanceLogImported | GeologyImported;

/** The server's refusal of an upload (its error body), or the upload's own failure. */
export interface UploadRefusal {
  ok: false;
  status: number;
  message: string;
  issues: ImportIssue[];
  errorCount: number;
}

/** The server's answer to an upload: the import's answer `T` (its type declared in shared/schemas), or a refusal. */
export type UploadAnswer<T extends ImportAnswer> = { ok: true; status: number; body: T } | UploadRefusal;

/** A count in an error body (`errorCount`, `conflictCount`), if the body has it. */
const countIn = (error: Record<string, unknown>, key: string): number | undefined =>
  typeof error[key] === 'number' ? error[key] : undefined;

/**
 * Sends a file as the raw request body (text/csv) with XMLHttpRequest, whose upload events give
 * the progress that fetch cannot. `onProgress` receives the share sent (0–1); `onSent` fires when
 * the last byte is out and the server starts checking.
 */
export function uploadCsv<T extends ImportAnswer>(
  url: string,
  file: File,
  onProgress: (fraction: number) => void,
  onSent: () => void,
): { answer: Promise<UploadAnswer<T>>; abort: () => void } {
  const xhr = new XMLHttpRequest();
  const answer = new Promise<UploadAnswer<T>>((resolve, reject) => {
    xhr.open('POST', url);
    xhr.setRequestHeader('Content-Type', 'text/csv');
    xhr.responseType = 'json';
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress(e.loaded / e.total);
    };
    xhr.upload.onload = onSent;
    xhr.onload = () => {
      const ok = xhr.status >= 200 && xhr.status < 300;
      // responseType 'json' gives null for a body that is not JSON: named, never read as an empty answer.
      if (xhr.response === null) {
        const message = ok
          ? `The server answered ${xhr.status} but its answer could not be read; reload the page to see what was imported.`
          : `The server answered ${xhr.status}.`;
        return resolve({ ok: false, status: xhr.status, message, issues: [], errorCount: 0 });
      }
      if (ok) return resolve({ ok: true, status: xhr.status, body: xhr.response as T });
      const error: Partial<ApiErrorBody['error']> = (xhr.response as Partial<ApiErrorBody>).error ?? {};
      const issues = error.issues ?? [];
      resolve({
        ok: false,
        status: xhr.status,
        message: error.message ?? `The server answered ${xhr.status}.`,
        issues,
        errorCount: countIn(error, 'errorCount') ?? countIn(error, 'conflictCount') ?? issues.length,
      });
    };
    xhr.onerror = () => reject(new ApiError(0, 'No connection to the Kerfwise server. Check the network and try again.'));
    xhr.onabort = () => reject(new ApiError(0, 'The upload was cancelled; nothing was imported.'));
    xhr.send(file);
  });
  return { answer, abort: () => xhr.abort() };
}

/** Saves a ground type (new without `id`); the drive's data is read again after it. */
export function useSaveGroundType(projectId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, input }: { id?: string; input: GroundTypeInput }) =>
      id ? updateGroundType(projectId, id, input) : createGroundType(projectId, input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: driveDataQueries.all(projectId) }),
  });
}

export function useDeleteGroundType(projectId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => deleteGroundType(projectId, id),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: driveDataQueries.all(projectId) }),
  });
}

/** Saves the whole long section (PUT). */
export function useSaveLongSection(projectId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (sections: SectionInput[]) => saveLongSection(projectId, sections),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: driveDataQueries.all(projectId) }),
  });
}
