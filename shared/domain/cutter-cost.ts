/** Cutter work recorded against one week and ground type; costs in the project's currency. */
export interface CutterCostEntry {
  /** ISO week label, e.g. '2026-W11'. */
  week: string;
  groundType: string;
  advanceM: number;
  partsCost: number;
  labourHours: number;
  ringsUsed: number;
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
  const groups = new Map<string, { advanceM: number; partsCost: number; labourHours: number; ringsUsed: number }>();
  for (const e of entries) {
    const g = groups.get(e[groupBy]) ?? { advanceM: 0, partsCost: 0, labourHours: 0, ringsUsed: 0 };
    g.advanceM += e.advanceM;
    g.partsCost += e.partsCost;
    g.labourHours += e.labourHours;
    g.ringsUsed += e.ringsUsed;
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
      };
    });
}
