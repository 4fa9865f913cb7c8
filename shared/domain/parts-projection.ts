/**
 * Parts demand from the workshop loop: fitted cutters come from ready stock of complete
 * assemblies; each removed cutter goes to the workshop, where its condition decides whether it is
 * rebuilt (consuming that condition's bill of materials and returning to ready stock after the
 * turnaround) or scrapped. Quantities are expected values, so they may be fractional.
 */

export type PartKind = 'ring' | 'bearing-kit' | 'seal-kit' | 'cutter-assembly' | 'hub' | 'small-part';

export interface PartItem {
  partId: string;
  kind: PartKind;
  /** Disc size in inches for rings and assemblies (rings are catalogued per size). */
  discSizeIn?: number;
}

export interface PartQty {
  partId: string;
  qty: number;
}

/** What the workshop does with a removed cutter in one condition: parts for the rebuild, or scrap. */
export type RebuildOutcome = readonly PartQty[] | 'scrap';

export interface CutterRebuildSpec {
  /** The complete cutter assembly this spec rebuilds. */
  assemblyPartId: string;
  /** Removal condition (e.g. 'even-wear', 'seal-leak', 'hub-damage') → bill of materials or 'scrap'. */
  bomByCondition: Readonly<Record<string, RebuildOutcome>>;
  /** A cutter already rebuilt this many times is scrapped whatever its condition. */
  maxRebuilds: number;
  turnaroundDays: number;
}

/** Cutters expected to be removed in a week (week index from the projection start). */
export interface ExpectedFailure {
  week: number;
  assemblyPartId: string;
  count: number;
  /** Share of the removed cutters in each condition; shares sum to 1. */
  conditionMix: Readonly<Record<string, number>>;
  /** Times the removed cutters have already been rebuilt; 0 when not given. */
  priorRebuilds?: number;
}

/** Planned changes at an intervention stop. */
export interface ExpectedChange extends ExpectedFailure {
  stopId: string;
}

export interface OpenOrder {
  partId: string;
  /** Week index the order is due; overdue orders (< 0) are expected in week 0. */
  dueWeek: number;
  qty: number;
}

/** Cutters already in the workshop at the start, back in ready stock in `readyWeek`. */
export interface RebuildInProgress {
  assemblyPartId: string;
  readyWeek: number;
  qty: number;
}

export interface PartsProjectionInput {
  /** Calendar date (YYYY-MM-DD) of the first day of week 0. */
  startDate: string;
  horizonWeeks: number;
  parts: readonly PartItem[];
  /** Stock on hand per part id at the start (ready stock for assemblies); missing means 0. */
  onHand: Readonly<Record<string, number>>;
  rebuildSpecs: readonly CutterRebuildSpec[];
  changes: readonly ExpectedChange[];
  suddenFailures: readonly ExpectedFailure[];
  openOrders: readonly OpenOrder[];
  rebuildsInProgress?: readonly RebuildInProgress[];
}

/** Demand of one part in one week from one stop; `stopId` null for sudden failures between stops. */
export interface DemandSource {
  stopId: string | null;
  qty: number;
}

export interface PartWeek {
  partId: string;
  week: number;
  /** Calendar date (YYYY-MM-DD) the week starts. */
  weekStartDate: string;
  demand: number;
  receipts: number;
  /** Rebuilt cutters back in ready stock (assemblies only). */
  rebuildReturns: number;
  /** Removed cutters scrapped (assemblies only). */
  scrapped: number;
  /** Stock at the end of the week; negative means a shortage. */
  projectedStock: number;
  demandSources: DemandSource[];
}

const DAY_MS = 86_400_000;

function dayNumber(isoDate: string): number {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(isoDate);
  if (!m) throw new RangeError(`expected a YYYY-MM-DD date, got ${isoDate}`);
  return Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])) / DAY_MS;
}

/** Week index (0 = the week starting on `startDate`) of a calendar date, both YYYY-MM-DD. */
export function weekIndexOf(isoDate: string, startDate: string): number {
  return Math.floor((dayNumber(isoDate) - dayNumber(startDate)) / 7);
}

interface PartFlows {
  demand: number[];
  receipts: number[];
  rebuildReturns: number[];
  scrapped: number[];
  sources: Map<string | null, number>[];
}

/**
 * Project, per part and week over `horizonWeeks`: demand (fitted assemblies and rebuild parts),
 * receipts from open orders, rebuild returns, scrapped cutters and end-of-week stock, with the
 * stops the demand comes from. Rebuild parts are drawn in the week the cutter is removed; the
 * turnaround is rounded up to whole weeks so a cutter counts as ready only once it surely is.
 */
export function projectParts(input: PartsProjectionInput): PartWeek[] {
  const { horizonWeeks } = input;
  if (!Number.isInteger(horizonWeeks) || horizonWeeks < 1) {
    throw new RangeError(`horizonWeeks must be a positive integer, got ${horizonWeeks}`);
  }
  const startDay = dayNumber(input.startDate);
  const zeros = () => new Array<number>(horizonWeeks).fill(0);
  const flows = new Map<string, PartFlows>();
  const kinds = new Map<string, PartKind>();
  for (const part of input.parts) {
    if (flows.has(part.partId)) throw new Error(`part ${part.partId} is listed twice`);
    kinds.set(part.partId, part.kind);
    flows.set(part.partId, {
      demand: zeros(),
      receipts: zeros(),
      rebuildReturns: zeros(),
      scrapped: zeros(),
      sources: Array.from({ length: horizonWeeks }, () => new Map()),
    });
  }
  const flowsOf = (partId: string): PartFlows => {
    const f = flows.get(partId);
    if (!f) throw new Error(`part ${partId} is not in the catalogue`);
    return f;
  };
  const assemblyFlows = (partId: string): PartFlows => {
    if (kinds.get(partId) !== 'cutter-assembly') throw new Error(`part ${partId} is not a cutter assembly`);
    return flowsOf(partId);
  };

  const specs = new Map<string, CutterRebuildSpec>();
  for (const spec of input.rebuildSpecs) {
    assemblyFlows(spec.assemblyPartId);
    if (!(spec.turnaroundDays >= 0) || !(spec.maxRebuilds >= 0)) {
      throw new RangeError(`turnaround and maximum rebuilds of ${spec.assemblyPartId} must be non-negative`);
    }
    for (const outcome of Object.values(spec.bomByCondition)) {
      if (outcome !== 'scrap') outcome.forEach((line) => flowsOf(line.partId));
    }
    specs.set(spec.assemblyPartId, spec);
  }

  const addDemand = (partId: string, week: number, qty: number, stopId: string | null) => {
    const f = flowsOf(partId);
    f.demand[week] += qty;
    f.sources[week].set(stopId, (f.sources[week].get(stopId) ?? 0) + qty);
  };

  const removals = [...input.changes, ...input.suddenFailures.map((failure) => ({ ...failure, stopId: null }))];
  for (const r of removals) {
    if (!Number.isInteger(r.week) || r.week < 0) throw new RangeError(`week must be a non-negative integer, got ${r.week}`);
    if (!(r.count >= 0)) throw new RangeError(`count must be non-negative, got ${r.count}`);
    const spec = specs.get(r.assemblyPartId);
    if (!spec) throw new Error(`no rebuild spec for cutter assembly ${r.assemblyPartId}`);
    const shares = Object.entries(r.conditionMix);
    if (shares.some(([, share]) => !(share >= 0)) || Math.abs(shares.reduce((sum, [, s]) => sum + s, 0) - 1) > 1e-9) {
      throw new RangeError(`condition shares of ${r.assemblyPartId} in week ${r.week} must be non-negative and sum to 1`);
    }
    const unknown = shares.find(([condition]) => spec.bomByCondition[condition] === undefined);
    if (unknown) throw new Error(`no rebuild outcome for condition ${unknown[0]} of ${r.assemblyPartId}`);
    if (r.week >= horizonWeeks) continue;

    const assembly = assemblyFlows(r.assemblyPartId);
    addDemand(r.assemblyPartId, r.week, r.count, r.stopId);
    const returnWeek = r.week + Math.ceil(spec.turnaroundDays / 7);
    const worn = (r.priorRebuilds ?? 0) >= spec.maxRebuilds;
    for (const [condition, share] of shares) {
      const outcome = spec.bomByCondition[condition];
      const qty = r.count * share;
      if (worn || outcome === 'scrap') {
        assembly.scrapped[r.week] += qty;
        continue;
      }
      for (const line of outcome) addDemand(line.partId, r.week, qty * line.qty, r.stopId);
      if (returnWeek < horizonWeeks) assembly.rebuildReturns[returnWeek] += qty;
    }
  }

  for (const order of input.openOrders) {
    const week = Math.max(0, order.dueWeek);
    if (week < horizonWeeks) flowsOf(order.partId).receipts[week] += order.qty;
  }
  for (const wip of input.rebuildsInProgress ?? []) {
    const week = Math.max(0, wip.readyWeek);
    if (week < horizonWeeks) assemblyFlows(wip.assemblyPartId).rebuildReturns[week] += wip.qty;
  }

  const rows: PartWeek[] = [];
  for (const [partId, f] of flows) {
    let stock = input.onHand[partId] ?? 0;
    for (let week = 0; week < horizonWeeks; week++) {
      stock += f.receipts[week] + f.rebuildReturns[week] - f.demand[week];
      rows.push({
        partId,
        week,
        weekStartDate: new Date((startDay + 7 * week) * DAY_MS).toISOString().slice(0, 10),
        demand: f.demand[week],
        receipts: f.receipts[week],
        rebuildReturns: f.rebuildReturns[week],
        scrapped: f.scrapped[week],
        projectedStock: stock,
        demandSources: [...f.sources[week]].map(([stopId, qty]) => ({ stopId, qty })),
      });
    }
  }
  return rows;
}
