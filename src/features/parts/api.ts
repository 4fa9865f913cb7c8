import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import type {
  DemandQuery,
  PartInput,
  PurchaseOrderBatchInput,
  PurchaseOrderInput,
  ReceiveLineInput,
  StockCountInput,
  WorkshopSettingsInput,
} from '../../../shared/schemas/parts';
import { api, apiGet } from '../../lib/api-client';
import type {
  PartList,
  PartRow,
  PartsDemand,
  OrderLine,
  PurchaseOrder,
  StockCounted,
  WorkshopSettings,
} from '../../../shared/schemas/parts';
export type {
  CataloguePart,
  PartListItem,
  DemandWeek,
  DemandStop,
  PartsDemand,
  OrderLine,
  PurchaseOrder,
  PartList,
  PartRow,
  StockCounted,
  WorkshopSettings,
} from '../../../shared/schemas/parts';

/** The demand's filters: the query of GET /parts/demand (the service level takes its default when left out). */
export type DemandFilters = Pick<DemandQuery, 'weeks'> & Partial<Pick<DemandQuery, 'serviceLevel'>>;

/** The horizons (weeks) the stock tab offers; 12 unless the address asks for another. */
export const demandHorizons = [4, 8, 12, 26, 52];

/** The demand's filters from the address (?weeks=&serviceLevel=), values outside the offer left out. Page and loader read them so. */
export function demandFiltersFrom(search: URLSearchParams): DemandFilters {
  const weeks = Number(search.get('weeks')) || 12;
  const level = Number(search.get('serviceLevel'));
  return { weeks: demandHorizons.includes(weeks) ? weeks : 12, serviceLevel: level >= 0.5 && level < 1 ? level : undefined };
}

const base = (projectId: string) => `/api/projects/${projectId}/parts`;
const demandQuery = (f: DemandFilters) => `weeks=${f.weeks}${f.serviceLevel ? `&serviceLevel=${f.serviceLevel}` : ''}`;

export const getParts = (projectId: string) => apiGet<PartList>(base(projectId));
export const getDemand = (projectId: string, f: DemandFilters) => apiGet<PartsDemand>(`${base(projectId)}/demand?${demandQuery(f)}`);
export const getOrders = (projectId: string) => apiGet<PurchaseOrder[]>(`${base(projectId)}/orders`);
export const getWorkshop = (projectId: string) => apiGet<WorkshopSettings>(`${base(projectId)}/workshop`);

export const createPart = (projectId: string, input: PartInput) => api<PartRow>('POST', base(projectId), input);
export const updatePart = (projectId: string, partId: string, input: PartInput) =>
  api<PartRow>('PUT', `${base(projectId)}/${partId}`, input);
export const deletePart = (projectId: string, partId: string) => api<void>('DELETE', `${base(projectId)}/${partId}`);
export const countStock = (projectId: string, partId: string, input: StockCountInput) =>
  api<StockCounted>('POST', `${base(projectId)}/${partId}/count`, input);
export const createOrder = (projectId: string, input: PurchaseOrderInput) => api<PurchaseOrder>('POST', `${base(projectId)}/orders`, input);
export const receiveLine = (projectId: string, line: OrderLine, input: ReceiveLineInput) =>
  api<PurchaseOrder>('POST', `${base(projectId)}/orders/${line.purchaseOrderId}/lines/${line.id}/receive`, input);
export const saveWorkshop = (projectId: string, input: WorkshopSettingsInput) =>
  api<WorkshopSettings>('PUT', `${base(projectId)}/workshop`, input);

/** Stock, orders and the forecast move together: every parts mutation invalidates `all`. */
export const partQueries = {
  all: (projectId: string) => ['projects', projectId, 'parts'] as const,
  list: (projectId: string) => queryOptions({ queryKey: [...partQueries.all(projectId), 'list'], queryFn: () => getParts(projectId) }),
  demand: (projectId: string, f: DemandFilters) =>
    queryOptions({ queryKey: [...partQueries.all(projectId), 'demand', f], queryFn: () => getDemand(projectId, f) }),
  orders: (projectId: string) => queryOptions({ queryKey: [...partQueries.all(projectId), 'orders'], queryFn: () => getOrders(projectId) }),
  workshop: (projectId: string) =>
    queryOptions({ queryKey: [...partQueries.all(projectId), 'workshop'], queryFn: () => getWorkshop(projectId) }),
};

/** Every parts write invalidates `partQueries.all`: catalogue, stock, orders and demand move together. */
function usePartsMutation<TInput, TResult>(projectId: string, mutationFn: (input: TInput) => Promise<TResult>) {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn, onSuccess: () => queryClient.invalidateQueries({ queryKey: partQueries.all(projectId) }) });
}

export const useSavePart = (projectId: string) =>
  usePartsMutation(projectId, ({ partId, input }: { partId: string | null; input: PartInput }) =>
    partId ? updatePart(projectId, partId, input) : createPart(projectId, input),
  );
export const useDeletePart = (projectId: string) => usePartsMutation(projectId, (partId: string) => deletePart(projectId, partId));
export const useCountStock = (projectId: string) =>
  usePartsMutation(projectId, ({ partId, input }: { partId: string; input: StockCountInput }) => countStock(projectId, partId, input));
export const useCreateOrder = (projectId: string) =>
  usePartsMutation(projectId, (input: PurchaseOrderInput) => createOrder(projectId, input));
export const useReceiveLine = (projectId: string) =>
  usePartsMutation(projectId, ({ line, input }: { line: OrderLine; input: ReceiveLineInput }) => receiveLine(projectId, line, input));
export const useSaveWorkshop = (projectId: string) =>
  usePartsMutation(projectId, (input: WorkshopSettingsInput) => saveWorkshop(projectId, input));

/** Several orders in one transaction, one per supplier (POST parts/orders/batch). */
export const createOrders = (projectId: string, input: PurchaseOrderBatchInput) =>
  api<PurchaseOrder[]>('POST', `${base(projectId)}/orders/batch`, input);
export const useCreateOrders = (projectId: string) =>
  usePartsMutation(projectId, (input: PurchaseOrderBatchInput) => createOrders(projectId, input));
