/**
 * The advance expected ahead of the machine, week by week, and the km a disc rolls over it: the
 * basis of the parts demand's sudden failures and repeat changes (DEVELOPERS.md decision 23).
 */
import { aheadM, type DriveDirection } from './chainage';
import { rolledKmPerMetre } from './forecast';

export interface AdvanceSegment {
  /** Null in a gap of the long section (unknown ground). */
  groundTypeId: string | null;
  metres: number;
  penetrationMmPerRev: number;
}

export interface AdvanceAheadInput {
  currentChainageM: number;
  direction: DriveDirection;
  sections: readonly { fromChainageM: number; toChainageM: number; groundTypeId: string | null }[];
  penetrationMmPerRevByGround: Readonly<Record<string, number>>;
  advanceMPerDayByGround: Readonly<Record<string, number>>;
  weeks: number;
}

/**
 * The advance expected in each of the next `weeks` weeks (7 calendar days each from now), as
 * segments of metres per ground with their penetration, walking the long section at each ground's
 * advance per day. Ground without a rate, or a gap between sections, takes the lowest known
 * penetration and the fastest known advance. The walk stops where the mapped geology ends
 * (`geologyEndsWeek`); it returns null when no penetration or advance is known at all.
 */
export function advanceAheadByWeek(input: AdvanceAheadInput): { weeks: AdvanceSegment[][]; geologyEndsWeek: number | null } | null {
  const pens = Object.values(input.penetrationMmPerRevByGround);
  const advs = Object.values(input.advanceMPerDayByGround);
  if (pens.length === 0 || advs.length === 0) return null;
  // Sections as distances ahead of the machine, nearest first.
  const ahead = input.sections
    .map((s) => {
      const a = aheadM(input.currentChainageM, s.fromChainageM, input.direction);
      const b = aheadM(input.currentChainageM, s.toChainageM, input.direction);
      return { from: Math.min(a, b), to: Math.max(a, b), groundTypeId: s.groundTypeId };
    })
    .filter((s) => s.to > 0)
    .sort((x, y) => x.from - y.from);
  const end = Math.max(0, ...ahead.map((s) => s.to));
  const weeks: AdvanceSegment[][] = [];
  let atM = 0;
  let geologyEndsWeek: number | null = null;
  for (let w = 0; w < input.weeks; w++) {
    const segments: AdvanceSegment[] = [];
    let days = 7;
    while (days > 1e-9 && atM < end - 1e-9) {
      const section = ahead.find((s) => s.from <= atM + 1e-9 && s.to > atM + 1e-9);
      const ground = section?.groundTypeId ?? null;
      const nextBoundaryM = section ? section.to : Math.min(...ahead.filter((s) => s.from > atM).map((s) => s.from));
      const pen =
        ground !== null && Object.hasOwn(input.penetrationMmPerRevByGround, ground)
          ? input.penetrationMmPerRevByGround[ground]
          : Math.min(...pens);
      const adv =
        ground !== null && Object.hasOwn(input.advanceMPerDayByGround, ground) ? input.advanceMPerDayByGround[ground] : Math.max(...advs);
      const metres = Math.min(adv * days, nextBoundaryM - atM);
      days -= metres / adv;
      atM += metres;
      const last = segments.at(-1);
      if (last && last.groundTypeId === ground && last.penetrationMmPerRev === pen) last.metres += metres;
      else segments.push({ groundTypeId: ground, metres, penetrationMmPerRev: pen });
    }
    if (days > 1e-9 && geologyEndsWeek === null) geologyEndsWeek = w;
    weeks.push(segments);
  }
  return { weeks, geologyEndsWeek };
}

/**
 * Km rolled per disc at track radius `trackRadiusMm` over the segments, weighted per ground by
 * `perKm` (e.g. failures per km or mm of wear per km): Σ weight_g · metres · 2·π·r/p.
 */
export function weightedRolledKm(
  segments: readonly AdvanceSegment[],
  trackRadiusMm: number,
  perKm: (groundTypeId: string | null) => number,
): number {
  return segments.reduce((sum, s) => sum + perKm(s.groundTypeId) * s.metres * rolledKmPerMetre(trackRadiusMm, s.penetrationMmPerRev), 0);
}
