import type { DemandSource, OrderSuggestion } from '../../../shared/schemas/parts';
import { queryOptions } from '@tanstack/react-query';
import type { PartKind } from '../../../shared/domain/parts-projection';
import type { PartInput, PurchaseOrderInput, ReceiveLineInput, StockCountInput, WorkshopSettingsInput } from '../../../shared/schemas/parts';
import { api, apiGet } from '../../lib/api-client';

export interface CataloguePart {
  id: string;
  code: string;
  name: string;
  kind: PartKind;
  discSizeIn: number | null;
  unitCost: number;
  currency: string;
  supplier: string;
  leadTimeMeanDays: number;
  leadTimeSdDays: number;
  minOrderQty: number;
  onHand: number;
  onOrder: number;
}

/** GET /parts: the catalogue with stock and the 12-week order flag. */
export interface PartListItem extends CataloguePart {
  weeksOfCover: number | null;
  orderNow: boolean;
  orderQty: number;
  safetyStock: number;
  reorderPoint: number;
  firstShortageDate: string | null;
}

export interface DemandWeek {
  partId: string;
  week: number;
  weekStartDate: string;
  demand: number;
  receipts: number;
  rebuildReturns: number;
  scrapped: number;
  projectedStock: number;
  sources: DemandSource[];
}

export interface DemandStop {
  id: string;
  status: string;
  chainageM: number;
  ringNumber: number | null;
  plannedStart: string | null;
  dateBasis: 'planned' | 'p90';
  positionNumbers: number[];
  label: string;
}

/** GET /parts/demand. */
export interface PartsDemand {
  now: string;
  startDate: string;
  horizonWeeks: number;
  serviceLevel: number;
  z: number;
  parts: CataloguePart[];
  weeks: DemandWeek[];
  suggestions: OrderSuggestion[];
  stops: DemandStop[];
  estimate: { rolledKmPerWeek: number[]; suddenFailuresPerWeek: number[]; geologyEndsWeek: number | null };
  problems: string[];
}

export interface OrderLine {
  id: string;
  purchaseOrderId: string;
  partId: string;
  partCode: string;
  partName: string;
  qtyOrdered: number;
  qtyReceived: number;
  qtyOpen: number;
  dueDate: string;
}

export interface PurchaseOrder {
  id: string;
  number: string;
  supplier: string;
  orderedAt: string;
  note: string;
  open: boolean;
  lines: OrderLine[];
}

export interface DemandFilters {
  weeks: number;
  serviceLevel?: number;
}

const base = (projectId: string) => `/api/projects/${projectId}/parts`;
const demandQuery = (f: DemandFilters) => `weeks=${f.weeks}${f.serviceLevel ? `&serviceLevel=${f.serviceLevel}` : ''}`;

export const getParts = (projectId: string) => apiGet<{ parts: PartListItem[]; problems: string[] }>(base(projectId));
export const getDemand = (projectId: string, f: DemandFilters) => apiGet<PartsDemand>(`${base(projectId)}/demand?${demandQuery(f)}`);
export const getOrders = (projectId: string) => apiGet<PurchaseOrder[]>(`${base(projectId)}/orders`);
export const getWorkshop = (projectId: string) => apiGet<WorkshopSettingsInput>(`${base(projectId)}/workshop`);

export const createPart = (projectId: string, input: PartInput) => api<CataloguePart>('POST', base(projectId), input);
export const updatePart = (projectId: string, partId: string, input: PartInput) => api<CataloguePart>('PUT', `${base(projectId)}/${partId}`, input);
export const deletePart = (projectId: string, partId: string) => api<void>('DELETE', `${base(projectId)}/${partId}`);
export const countStock = (projectId: string, partId: string, input: StockCountInput) =>
  api<{ partId: string; onHand: number; difference: number }>('POST', `${base(projectId)}/${partId}/count`, input);
export const createOrder = (projectId: string, input: PurchaseOrderInput) => api<PurchaseOrder>('POST', `${base(projectId)}/orders`, input);
export const receiveLine = (projectId: string, line: OrderLine, input: ReceiveLineInput) =>
  api<PurchaseOrder>('POST', `${base(projectId)}/orders/${line.purchaseOrderId}/lines/${line.id}/receive`, input);
export const saveWorkshop = (projectId: string, input: WorkshopSettingsInput) => api<WorkshopSettingsInput>('PUT', `${base(projectId)}/workshop`, input);

/** Stock, orders and the forecast move together: every parts mutation invalidates `all`. */
export const partQueries = {
  all: (projectId: string) => ['projects', projectId, 'parts'] as const,
  list: (projectId: string) => queryOptions({ queryKey: [...partQueries.all(projectId), 'list'], queryFn: () => getParts(projectId) }),
  demand: (projectId: string, f: DemandFilters) =>
    queryOptions({ queryKey: [...partQueries.all(projectId), 'demand', f], queryFn: () => getDemand(projectId, f) }),
  orders: (projectId: string) => queryOptions({ queryKey: [...partQueries.all(projectId), 'orders'], queryFn: () => getOrders(projectId) }),
  workshop: (projectId: string) => queryOptions({ queryKey: [...partQueries.all(projectId), 'workshop'], queryFn: () => getWorkshop(projectId) }),
};
