/** Cutter work recorded against one week and ground type; costs in the project's currency. */
export interface CutterCostEntry {
  /** ISO week label, e.g. '2026-W11'. */
  week: string;
  groundType: string;
  advanceM: number;
  partsCost: number;
  labourHours: number;
  ringsUsed: number;
  /** Cutter changes (removals) counted here; 0 for advance and labour entries. */
  changes?: number;
  /** Changes whose workshop outcome is not recorded yet, costed by the rule of `changePartsCost`. */
  estimatedChanges?: number;
  /** Parts a change needed that have no price (e.g. '17″ ring'): not in `partsCost`. */
  missingPrices?: readonly string[];
}

export interface CutterCostRow {
  /** The week or ground type of the group. */
  key: string;
  advanceM: number;
  excavatedM3: number;
  partsCost: number;
  labourCost: number;
  totalCost: number;
  /** null when the group has no advance. */
  costPerM: number | null;
  costPerM3: number | null;
  ringsPer1000M3: number | null;
  /** Cutter changes in the group. */
  changes: number;
  /** Of them, changes whose workshop outcome is not recorded yet (parts estimated). */
  estimatedChanges: number;
  /** Parts without a price the group's changes needed, each named once (e.g. '17″ ring'). */
  missingPrices: string[];
}

/** What the workshop did (or has not yet recorded) with a removed cutter. */
export type ChangeOutcome =
  { kind: 'rebuilt'; newRing: boolean; newBearings: boolean; newSeals: boolean } | { kind: 'scrapped' } | { kind: 'not-recorded' };

export type ChangePartKind = 'ring' | 'bearing-kit' | 'seal-kit' | 'cutter-assembly';

export interface ChangePartsCost {
  partsCost: number;
  ringsUsed: number;
  /** Kinds needed that have no price: the change's cost leaves them out. */
  missing: ChangePartKind[];
  /** True when the outcome is not recorded yet and the cost follows the rule below. */
  estimated: boolean;
}

/**
 * The parts one cutter change uses: every change uses parts (the fitted cutter is a rebuilt or a
 * new assembly). A rebuild uses one ring (unless none was fitted), a bearing kit and a seal kit
 * when new ones were fitted; a scrapped cutter uses one new assembly. A change whose outcome the
 * workshop has not recorded yet is costed as a rebuild with a new ring and nothing else, the least
 * a rebuild uses (common practice, no source), and marked estimated. `priceOf` gives the unit
 * price of a kind for the cutter's size, or null when the catalogue has none.
 */
export function changePartsCost(outcome: ChangeOutcome, priceOf: (kind: ChangePartKind) => number | null): ChangePartsCost {
  const needs: ChangePartKind[] =
    outcome.kind === 'scrapped'
      ? ['cutter-assembly']
      : outcome.kind === 'not-recorded'
        ? ['ring']
        : [
            ...(outcome.newRing ? (['ring'] as const) : []),
            ...(outcome.newBearings ? (['bearing-kit'] as const) : []),
            ...(outcome.newSeals ? (['seal-kit'] as const) : []),
          ];
  let partsCost = 0;
  const missing: ChangePartKind[] = [];
  for (const kind of needs) {
    const price = priceOf(kind);
    if (price == null || !Number.isFinite(price)) missing.push(kind);
    else partsCost += price;
  }
  return {
    partsCost,
    ringsUsed: outcome.kind === 'scrapped' || needs.includes('ring') ? 1 : 0,
    missing,
    estimated: outcome.kind === 'not-recorded',
  };
}

/** Face area in m² of a bore of excavated diameter `diameterM` (m): π·D²/4. */
export function faceAreaM2(diameterM: number): number {
  if (!(diameterM > 0)) throw new RangeError(`diameter must be positive, got ${diameterM}`);
  return (Math.PI * diameterM * diameterM) / 4;
}

/** Solid volume in m³ excavated by `advanceM` (m) of advance at excavated diameter `diameterM` (m). */
export function excavatedM3(advanceM: number, diameterM: number): number {
  return advanceM * faceAreaM2(diameterM);
}

/**
 * Cutter parts + labour cost per metre and per m³, and rings used per 1,000 m³, grouped by week
 * or ground type and sorted by that key; labour is costed at `labourRatePerHour`.
 */
export function cutterCostBy(
  entries: readonly CutterCostEntry[],
  groupBy: 'week' | 'groundType',
  diameterM: number,
  labourRatePerHour: number,
): CutterCostRow[] {
  const groups = new Map<
    string,
    {
      advanceM: number;
      partsCost: number;
      labourHours: number;
      ringsUsed: number;
      changes: number;
      estimatedChanges: number;
      missing: Set<string>;
    }
  >();
  for (const e of entries) {
    const g = groups.get(e[groupBy]) ?? {
      advanceM: 0,
      partsCost: 0,
      labourHours: 0,
      ringsUsed: 0,
      changes: 0,
      estimatedChanges: 0,
      missing: new Set<string>(),
    };
    g.advanceM += e.advanceM;
    g.partsCost += e.partsCost;
    g.labourHours += e.labourHours;
    g.ringsUsed += e.ringsUsed;
    g.changes += e.changes ?? 0;
    g.estimatedChanges += e.estimatedChanges ?? 0;
    for (const m of e.missingPrices ?? []) g.missing.add(m);
    groups.set(e[groupBy], g);
  }
  return [...groups]
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))
    .map(([key, g]) => {
      const m3 = excavatedM3(g.advanceM, diameterM);
      const labourCost = g.labourHours * labourRatePerHour;
      const totalCost = g.partsCost + labourCost;
      const bored = g.advanceM > 0;
      return {
        key,
        advanceM: g.advanceM,
        excavatedM3: m3,
        partsCost: g.partsCost,
        labourCost,
        totalCost,
        costPerM: bored ? totalCost / g.advanceM : null,
        costPerM3: bored ? totalCost / m3 : null,
        ringsPer1000M3: bored ? (g.ringsUsed / m3) * 1000 : null,
        changes: g.changes,
        estimatedChanges: g.estimatedChanges,
        missingPrices: [...g.missing].sort(),
      };
    });
}
