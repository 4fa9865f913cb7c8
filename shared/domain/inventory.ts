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
  /**
   * Every open order's outstanding quantity, whatever its due date: an order on the way always
   * counts (one due after the lead time must still stop the same quantity being suggested again),
   * plus anything else certain to come back (e.g. rebuilt cutters due within the lead time).
   */
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

/** One week of a part's projection, as far as the order suggestion needs it. */
export interface ProjectedWeek {
  demand: number;
  /** Rebuilt cutters back in ready stock this week (0 for parts that are not assemblies). */
  rebuildReturns: number;
}

export interface WeeklyOrderInput {
  /** Week 0 first; at least one week. */
  weeks: readonly ProjectedWeek[];
  onHandUnits: number;
  /** Outstanding quantity of every open order line of the part, whatever its due date. */
  openOrderUnits: number;
  leadTimeWeeks: number;
  leadTimeSdWeeks: number;
  z: number;
  minOrderUnits: number;
}

export interface WeeklyOrderSuggestion extends OrderSuggestion {
  meanWeeklyDemand: number;
  /** Population standard deviation of the weekly demand over the horizon. */
  weeklyDemandSd: number;
  safetyStockUnits: number;
  reorderPointUnits: number;
  /** Whole weeks the order must bridge: the lead time rounded up, at least 1. */
  windowWeeks: number;
  /** Demand in the window; weeks beyond the horizon count at the mean. */
  leadTimeDemandUnits: number;
  /** Rebuilt cutters back within the window. */
  rebuildsBackUnits: number;
}

/**
 * The order suggestion of one part from its weekly projection (DOMAIN.md §6, in weeks): safety stock
 * and reorder point from the mean and spread of the weekly demand and the lead time with its
 * spread; the order covers the lead-time window's demand plus safety stock beyond what is on hand,
 * on order (every open order, whatever its due date) and rebuilt within the window.
 */
export function suggestOrderFromWeeks(input: WeeklyOrderInput): WeeklyOrderSuggestion {
  const n = input.weeks.length;
  if (n < 1) throw new RangeError('the projection needs at least one week');
  if (!(input.openOrderUnits >= 0)) throw new RangeError('open order units must be non-negative');
  const mean = input.weeks.reduce((s, w) => s + w.demand, 0) / n;
  const sd = Math.sqrt(input.weeks.reduce((s, w) => s + (w.demand - mean) ** 2, 0) / n);
  const demand: LeadTimeDemand = {
    meanDemandPerPeriod: mean,
    demandSdPerPeriod: sd,
    leadTimePeriods: input.leadTimeWeeks,
    leadTimeSdPeriods: input.leadTimeSdWeeks,
  };
  const safety = safetyStockUnits(demand, input.z);
  const windowWeeks = Math.max(1, Math.ceil(input.leadTimeWeeks - 1e-9));
  const inWindow = input.weeks.slice(0, windowWeeks);
  const leadTimeDemandUnits = inWindow.reduce((s, w) => s + w.demand, 0) + Math.max(0, windowWeeks - n) * mean;
  const rebuildsBackUnits = inWindow.reduce((s, w) => s + w.rebuildReturns, 0);
  const s = suggestOrder({
    onHandUnits: input.onHandUnits,
    onOrderUnits: input.openOrderUnits + rebuildsBackUnits,
    projectedDemandUnits: leadTimeDemandUnits,
    safetyStockUnits: safety,
    minOrderUnits: input.minOrderUnits,
  });
  return {
    ...s,
    meanWeeklyDemand: mean,
    weeklyDemandSd: sd,
    safetyStockUnits: safety,
    reorderPointUnits: reorderPointUnits(demand, input.z),
    windowWeeks,
    leadTimeDemandUnits,
    rebuildsBackUnits,
  };
}
