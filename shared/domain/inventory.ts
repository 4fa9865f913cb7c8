import { standardNormalQuantile } from './normal-quantile';

/**
 * Demand over a replenishment lead time. Demand and lead time use the same period (day or week):
 * d̄ and σ_d are per period, L and σ_L are in periods.
 */
export interface LeadTimeDemand {
  meanDemandPerPeriod: number;
  demandSdPerPeriod: number;
  leadTimePeriods: number;
  /** Standard deviation of the lead time; 0 (the default) for a fixed lead time. */
  leadTimeSdPeriods?: number;
}

export interface OrderSuggestionInput {
  onHandUnits: number;
  /** Open orders due within the lead time. */
  onOrderUnits: number;
  /** Projected demand over the lead time (e.g. from the parts projection). */
  projectedDemandUnits: number;
  safetyStockUnits: number;
  /** Minimum order quantity: a suggested order is never smaller. */
  minOrderUnits: number;
  /** Orders are whole multiples of this pack size; 1 (the default) for single units. */
  orderMultipleUnits?: number;
}

export interface OrderSuggestion {
  /** On hand + on order. */
  inventoryPositionUnits: number;
  /** Projected demand over the lead time + safety stock: what the position must cover. */
  requiredUnits: number;
  /** 0 when the position covers what is required. */
  orderUnits: number;
}

/**
 * Safety factor z (dimensionless) for a cycle service level 0.5 ≤ level < 1 (0.95 → 1.6449).
 * Levels below 0.5 would give a negative safety stock, which no buyer means.
 */
export function serviceLevelZ(serviceLevel: number): number {
  if (!(serviceLevel >= 0.5 && serviceLevel < 1)) {
    throw new RangeError(`service level must be in [0.5, 1), got ${serviceLevel}`);
  }
  return standardNormalQuantile(serviceLevel);
}

/**
 * Safety stock in units: SS = z·√(L·σ_d² + d̄²·σ_L²), which for a fixed lead time (σ_L = 0)
 * is z·σ_d·√L (DOMAIN.md §6).
 */
export function safetyStockUnits(demand: LeadTimeDemand, z: number): number {
  const { meanDemandPerPeriod: d, demandSdPerPeriod: sdD, leadTimePeriods: l } = demand;
  const sdL = demand.leadTimeSdPeriods ?? 0;
  if ([d, sdD, l, sdL].some((v) => !(v >= 0))) {
    throw new RangeError('demand, lead time and their standard deviations must be non-negative numbers');
  }
  return z * Math.sqrt(l * sdD * sdD + d * d * sdL * sdL);
}

/** Reorder point in units: ROP = d̄·L + SS (DOMAIN.md §6). */
export function reorderPointUnits(demand: LeadTimeDemand, z: number): number {
  return demand.meanDemandPerPeriod * demand.leadTimePeriods + safetyStockUnits(demand, z);
}

/**
 * Order suggestion in units: when on hand + on order falls short of projected lead-time demand +
 * safety stock, order the shortfall, at least the minimum order quantity, rounded up to whole packs.
 */
export function suggestOrder(input: OrderSuggestionInput): OrderSuggestion {
  const multiple = input.orderMultipleUnits ?? 1;
  if (!(multiple > 0) || !(input.minOrderUnits >= 0)) {
    throw new RangeError('order multiple must be positive and minimum order non-negative');
  }
  const inventoryPositionUnits = input.onHandUnits + input.onOrderUnits;
  const requiredUnits = input.projectedDemandUnits + input.safetyStockUnits;
  // Projected demand is a sum of expected (fractional) values; the tolerance keeps float noise
  // such as 3.0000000000000004 from adding a whole unit or triggering an order.
  const wholeShortfall = Math.ceil(requiredUnits - inventoryPositionUnits - 1e-9);
  if (wholeShortfall <= 0) return { inventoryPositionUnits, requiredUnits, orderUnits: 0 };
  const orderUnits = Math.ceil(Math.max(wholeShortfall, input.minOrderUnits) / multiple) * multiple;
  return { inventoryPositionUnits, requiredUnits, orderUnits };
}
