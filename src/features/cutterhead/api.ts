import { queryOptions } from '@tanstack/react-query';
import type { DiscCondition, PositionClass } from '../../../shared/cutters';
import type { LayoutInput } from '../../../shared/schemas/cutterhead';
import { api, apiGet } from '../../lib/api-client';

/** A position as GET /positions lists it: the layout, the serial on it now, and its last wear. */
export interface PositionSummary {
  id: string;
  number: number;
  trackRadiusMm: number;
  positionClass: PositionClass;
  discSizeIn: number;
  tiltDeg: number | null;
  wearLimitMm: number;
  twinDisc: boolean;
  angleDeg: number | null;
  current: { fittingId: string; cutterId: string; serial: string; fittedAt: string; fittedChainageM: number } | null;
  lastWearMm: number | null;
  lastMeasuredAt: string | null;
  lastConditions: DiscCondition[];
}

export interface FittedPeriod {
  id: string;
  cutterId: string;
  serial: string;
  fittedAt: string;
  fittedChainageM: number;
  fittedRing: number | null;
  removedAt: string | null;
  removedChainageM: number | null;
  removedRing: number | null;
  removalReason: string | null;
  removalConditions: DiscCondition[] | null;
}

export interface Measurement {
  id: string;
  wearMm: number | null;
  conditions: DiscCondition[];
  action: 'none' | 'changed';
  note: string;
  remeasured: boolean;
  recordedAt: string;
  roundAt: string;
  chainageM: number;
  ringNumber: number | null;
  fittingId: string | null;
  serial: string | null;
  removedSerial: string | null;
  fittedSerial: string | null;
  changeReason: string | null;
}

export interface PositionDetail {
  position: Omit<PositionSummary, 'current' | 'lastWearMm' | 'lastMeasuredAt' | 'lastConditions'>;
  periods: FittedPeriod[];
  measurements: Measurement[];
  photos: { id: string; entryId: string; createdAt: string; mimeType: string }[];
}

export interface LayoutSaved {
  created: number;
  updated: number;
  unchanged: number;
  /** From a CSV import: columns the import did not read, by row and column. */
  warnings?: { row: number; column: string; message: string }[];
}

const base = (projectId: string) => `/api/projects/${projectId}/positions`;

export const getPositions = (projectId: string) => apiGet<PositionSummary[]>(base(projectId));
export const getPosition = (projectId: string, positionId: string) => apiGet<PositionDetail>(`${base(projectId)}/${positionId}`);
export const saveLayout = (projectId: string, input: LayoutInput) => api<LayoutSaved>('PUT', base(projectId), input);
export const importLayoutCsv = (projectId: string, csv: string) => api<LayoutSaved>('POST', `${base(projectId)}/import`, { csv });
export const photoUrl = (projectId: string, photoId: string) => `/api/projects/${projectId}/photos/${photoId}`;

/** What the picture's forecast view needs of GET /forecast: metres left per position (cautious P90). */
export interface RemainingMetres {
  positionId: string;
  remainingM: number;
  status: 'reaches_limit' | 'over_limit' | 'beyond_known_ground';
}

export async function getRemainingMetres(projectId: string): Promise<RemainingMetres[]> {
  const f = await apiGet<{ positions: { position: { positionId: string }; p90: { remainingM: number; status: RemainingMetres['status'] } }[] }>(`/api/projects/${projectId}/forecast`);
  return f.positions.map((p) => ({ positionId: p.position.positionId, remainingM: p.p90.remainingM, status: p.p90.status }));
}

export const positionQueries = {
  all: (projectId: string) => ['projects', projectId, 'positions'] as const,
  list: (projectId: string) => queryOptions({ queryKey: positionQueries.all(projectId), queryFn: () => getPositions(projectId) }),
  remaining: (projectId: string) =>
    queryOptions({ queryKey: [...positionQueries.all(projectId), 'remaining'], queryFn: () => getRemainingMetres(projectId), staleTime: 5_000 }),
  detail: (projectId: string, positionId: string) =>
    queryOptions({ queryKey: [...positionQueries.all(projectId), positionId], queryFn: () => getPosition(projectId, positionId) }),
};
