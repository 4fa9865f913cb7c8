import { describe, expect, it } from 'vitest';
import type { PositionClass } from '../../shared/domain/forecast';
import { planStops, type StopPlan, type StopPlanInput } from '../../shared/domain/stop-planner';
import { chainSolver, decompositionBound, improveStops, lagrangianBound } from '../../shared/domain/stop-planner-steps/lagrangian';
import { practicePlan } from '../../shared/domain/stop-planner-steps/baselines';
import { searchBounds } from '../../shared/domain/stop-planner-steps/bounds';
import { lastReachable, prepare, pricePlan } from '../../shared/domain/stop-planner-steps/model';
import { exactSearch } from '../../shared/domain/stop-planner-steps/search';
import { stopPathCopy } from '../../shared/domain/stop-planner-steps/stop-path-copy';
import { mulberry32 } from '../support/random';
import { aheadOf, placesAhead, randomInstance, tinyInstance, wearAddedMm } from '../support/stop-reference';

// All data invented (no real project).

const EPS = 1e-9;

/**
 * Least total hours by brute force, assuming none of the planner's rules: every subset S of the
 * usable places as the stops, and for every position every subset of S as the places its rings
 * are changed at (so which stop a disc is changed at is searched, not assumed; nor is it assumed
 * that a stop changes anything). A choice is valid when no ring passes its limit before it is
 * changed or before the horizon (wear only grows, so checking at each change and at the horizon
 * is enough). Given S, the positions' choices do not interact, so each position's best subset is
 * found on its own (still by trying every subset). Cost: stops of S + per change the change
 * hours and v × the ring life left unused. Null when nothing is valid. For up to ~8 places.
 */
function bruteForceMinH(input: StopPlanInput): number | null {
  const places = placesAhead(input);
  const m = places.length;
  const { positions, wastedRingLifeHPerMm: v } = input;
  const w = positions.map((p) => places.map((pl) => wearAddedMm(p.wearStretches, pl.aheadM)));
  const wHorizon = positions.map((p) => wearAddedMm(p.wearStretches, input.horizonM));
  // Cost of position i changed exactly at the places of bitmask `t`, or Infinity if some ring passes its limit.
  const positionH = (i: number, t: number) => {
    const p = positions[i];
    let budget = p.limitMm - p.wearNowMm; // wear added from here at which the fitted ring reaches its limit
    let costH = 0;
    for (let j = 0; j < m; j++) {
      if (!(t & (1 << j))) continue;
      if (w[i][j] > budget + EPS) return Infinity; // past its limit before this change
      costH += input.changeHByClass[p.positionClass] + v * (budget - w[i][j]);
      budget = w[i][j] + p.limitMm;
    }
    return wHorizon[i] > budget + EPS ? Infinity : costH;
  };
  let best = Infinity;
  for (let s = 0; s < 1 << m; s++) {
    let totalH = 0;
    for (let j = 0; j < m; j++) if (s & (1 << j)) totalH += places[j].compressedAir ? input.compressedAirStopH : input.freeAirStopH;
    for (let i = 0; i < positions.length && totalH < best; i++) {
      let bestI = Infinity;
      for (let t = s; ; t = (t - 1) & s) {
        bestI = Math.min(bestI, positionH(i, t));
        if (t === 0) break;
      }
      totalH += bestI;
    }
    best = Math.min(best, totalH);
  }
  return best === Infinity ? null : best;
}

/**
 * Replays a plan on its own: every stop at an allowed place with the right air flag, no ring
 * past its limit at any stop or at the horizon, each change at or under the limit, each stop
 * changing something. Returns the cost recomputed from the input.
 */
function replay(input: StopPlanInput, plan: StopPlan) {
  const places = placesAhead(input);
  const budget = input.positions.map((p) => p.limitMm - p.wearNowMm);
  let stopH = 0;
  let changeH = 0;
  let wastedH = 0;
  let previousM = -Infinity;
  for (const stop of plan.stops) {
    const aheadM = aheadOf(input, stop.chainageM);
    expect(aheadM).toBeCloseTo(stop.aheadM, 9);
    expect(aheadM).toBeGreaterThan(previousM);
    previousM = aheadM;
    const place = places.find((p) => Math.abs(p.aheadM - aheadM) < 1e-9);
    expect(place).toBeDefined();
    expect(stop.compressedAir).toBe(place!.compressedAir);
    expect(stop.changes.length).toBeGreaterThan(0);
    stopH += stop.compressedAir ? input.compressedAirStopH : input.freeAirStopH;
    input.positions.forEach((p, i) => {
      const wearHere = wearAddedMm(p.wearStretches, aheadM);
      expect(wearHere).toBeLessThanOrEqual(budget[i] + 1e-7); // not past the limit on arriving here
      const change = stop.changes.find((c) => c.positionId === p.positionId);
      if (change === undefined) return;
      const unusedMm = budget[i] - wearHere;
      expect(change.unusedWearMm).toBeCloseTo(unusedMm, 7);
      changeH += input.changeHByClass[p.positionClass];
      wastedH += input.wastedRingLifeHPerMm * unusedMm;
      budget[i] = wearHere + p.limitMm;
    });
  }
  input.positions.forEach((p, i) => expect(wearAddedMm(p.wearStretches, input.horizonM)).toBeLessThanOrEqual(budget[i] + 1e-7));
  expect(plan.cost.stopH).toBeCloseTo(stopH, 7);
  expect(plan.cost.changeH).toBeCloseTo(changeH, 7);
  expect(plan.cost.wastedRingLifeH).toBeCloseTo(wastedH, 7);
  expect(plan.cost.totalH).toBeCloseTo(stopH + changeH + wastedH, 7);
  return stopH + changeH + wastedH;
}

const everyM = (fromM: number, toM: number, stepM: number, compressedAirAt: (aheadM: number) => boolean = () => false) =>
  Array.from({ length: Math.round((toM - fromM) / stepM) + 1 }, (_, k) => fromM + k * stepM).map((x) => ({
    chainageM: 1000 + x,
    compressedAir: compressedAirAt(x),
  }));

function base(overrides: Partial<StopPlanInput>): StopPlanInput {
  return {
    currentChainageM: 1000,
    direction: 'increasing',
    horizonM: 100,
    positions: [],
    stopPlaces: everyM(0, 100, 10),
    freeAirStopH: 5,
    compressedAirStopH: 15,
    changeHByClass: { centre: 1, face: 1, gauge: 2 },
    wastedRingLifeHPerMm: 0.1,
    ...overrides,
  };
}

const pos = (positionId: string, positionClass: PositionClass, wearNowMm: number, limitMm: number, wearMmPerM: number) => ({
  positionId,
  positionClass,
  wearNowMm,
  limitMm,
  wearStretches: [{ fromAheadM: 0, wearMmPerM }],
});

const stopsOf = (plan: StopPlan) => plan.stops.map((s) => [s.aheadM, s.changes.map((c) => c.positionId).join(' ')]);

describe('planStops: hand-worked cases', () => {
  it('changes one position again and again as each new ring falls due', () => {
    // derived: wear 5 mm now + 0.125 mm/m reaches the 10 mm limit at 40 m; a new ring lasts
    // 10 / 0.125 = 80 m, so it falls due at 120, 200, 280; the ring from 280 carries 2.5 mm at 300.
    // Four stops are the fewest possible: 4 × (5 h + 1 h), no unused wear (each change exactly at its limit).
    const input = base({ horizonM: 300, stopPlaces: everyM(0, 300, 10), positions: [pos('F1', 'face', 5, 10, 0.125)] });
    const r = planStops(input);
    if (!r.feasible) throw new Error('expected a plan');
    expect(stopsOf(r.optimised)).toEqual([
      [40, 'F1'],
      [120, 'F1'],
      [200, 'F1'],
      [280, 'F1'],
    ]);
    expect(r.optimised.cost).toEqual({ stopH: 20, changeH: 4, wastedRingLifeH: 0, totalH: 24 });
    expect(r.practice!.cost.totalH).toBe(24); // one disc: the practice rule changes it at its limit too
    replay(input, r.optimised);
  });

  it('changes a second position early to save a stop', () => {
    // derived: A is due at (20 − 10) / 0.25 = 40 m, B at (20 − 5) / 0.25 = 60 m; new rings last 80 m,
    // past the 100 m horizon. Hand plan: stops at 40 and 60, 2 × 5 h + 2 × 1 h = 12 h.
    // Best: one stop at 40 for both; B carries 5 + 0.25 × 40 = 15 mm there, 5 mm unused × 0.1 h/mm
    // = 0.5 h: 5 + 2 + 0.5 = 7.5 h, saving 4.5 h.
    const input = base({ positions: [pos('A', 'face', 10, 20, 0.25), pos('B', 'face', 5, 20, 0.25)] });
    const r = planStops(input);
    if (!r.feasible) throw new Error('expected a plan');
    expect(stopsOf(r.optimised)).toEqual([[40, 'A B']]);
    expect(r.optimised.cost.totalH).toBeCloseTo(7.5, 12);
    expect(r.optimised.stops[0].changes.find((c) => c.positionId === 'B')).toEqual({
      positionId: 'B',
      wearAtChangeMm: 15,
      unusedWearMm: 5,
    });
    // Practice rule (80 %): at 40 B carries 15 of 20 mm (75 %), so it stays and needs its own stop.
    expect(stopsOf(r.practice!)).toEqual([
      [40, 'A'],
      [60, 'B'],
    ]);
    expect(r.practice!.cost.totalH).toBeCloseTo(12, 12);
    replay(input, r.optimised);
    replay(input, r.practice!);
  });

  it('stops earlier in free air rather than at the last place under compressed air', () => {
    // derived: gauge ring 3.75 mm + 0.25 mm/m reaches 15 mm at 45 m. Places: 30 m free air,
    // 40 m compressed air, 70 m free air. At 40: 15 h + 2 h + (15 − 13.75) mm × 0.2 = 17.25 h (the
    // practice rule's plan). At 30: 5 h + 2 h + (15 − 11.25) mm × 0.2 = 7.75 h. A new ring (60 m) lasts to 80 m.
    const input = base({
      horizonM: 80,
      stopPlaces: [
        { chainageM: 1030, compressedAir: false },
        { chainageM: 1040, compressedAir: true },
        { chainageM: 1070, compressedAir: false },
      ],
      positions: [pos('G1', 'gauge', 3.75, 15, 0.25)],
      wastedRingLifeHPerMm: 0.2,
    });
    const r = planStops(input);
    if (!r.feasible) throw new Error('expected a plan');
    expect(r.optimised.stops.map((s) => [s.chainageM, s.compressedAir])).toEqual([[1030, false]]);
    expect(r.optimised.cost.totalH).toBeCloseTo(7.75, 12);
    expect(r.practice!.stops.map((s) => [s.chainageM, s.compressedAir])).toEqual([[1040, true]]);
    expect(r.practice!.cost.totalH).toBeCloseTo(17.25, 12);
  });

  it('changes a fast position twice and a slow one with it (repeated changes)', () => {
    // derived: gauge A, 5 mm + 1 mm/m, limit 15 → due at 10; a new ring lasts 15 m. Face B,
    // 10 mm + 0.5 mm/m, limit 25 → due at 30. Horizon 40, places every 5 m.
    // Practice rule (80 %): A at 10 (B at 15 of 25 mm, 60 %, stays), A due again at 25, where B
    // carries 22.5 mm (90 %) and is changed with it — the optimum here.
    // A needs two stops, s1 ≤ 10 and s1 < s2 ≤ s1 + 15 with s2 + 15 ≥ 40, so s1 = 10, s2 = 25; B rides
    // at 25 with 10 + 12.5 = 22.5 mm, 2.5 mm unused × 0.1 = 0.25 h: 2 × 10 + 2 + 2 + 1 + 0.25 = 25.25 h.
    const input = base({
      horizonM: 40,
      stopPlaces: everyM(0, 40, 5),
      positions: [pos('A', 'gauge', 5, 15, 1), pos('B', 'face', 10, 25, 0.5)],
      freeAirStopH: 10,
    });
    const r = planStops(input);
    if (!r.feasible) throw new Error('expected a plan');
    expect(stopsOf(r.optimised)).toEqual([
      [10, 'A'],
      [25, 'A B'],
    ]);
    expect(r.optimised.cost.totalH).toBeCloseTo(25.25, 12);
    expect(stopsOf(r.practice!)).toEqual([
      [10, 'A'],
      [25, 'A B'],
    ]);
    expect(bruteForceMinH(input)).toBeCloseTo(25.25, 12);
  });

  it('follows the wear stretches ahead', () => {
    // derived: 0.1 mm/m for 0–50 m then 0.5 mm/m: wear 5 mm + 5 mm at 50 m, limit 15 reached at
    // 50 + 5 / 0.5 = 60 m. A new ring fitted at 60 reaches 15 mm at 90 m, past the 80 m horizon.
    const input = base({
      horizonM: 80,
      positions: [
        {
          positionId: 'F',
          positionClass: 'face',
          wearNowMm: 5,
          limitMm: 15,
          wearStretches: [
            { fromAheadM: 0, wearMmPerM: 0.1 },
            { fromAheadM: 50, wearMmPerM: 0.5 },
          ],
        },
      ],
    });
    const r = planStops(input);
    if (!r.feasible) throw new Error('expected a plan');
    expect(stopsOf(r.optimised)).toEqual([[60, 'F']]);
    expect(r.optimised.cost.totalH).toBeCloseTo(6, 12); // 5 h stop + 1 h change, no unused wear
  });

  it('works in chainage either way and ignores places behind the machine or past the horizon', () => {
    // The two-position case above, driven towards lower chainage from 5000: the stop is at 4960.
    const input = base({
      currentChainageM: 5000,
      direction: 'decreasing',
      stopPlaces: [5010, 5000, 4990, 4980, 4970, 4960, 4950, 4940, 4900, 4850].map((chainageM) => ({ chainageM, compressedAir: false })),
      positions: [pos('A', 'face', 10, 20, 0.25), pos('B', 'face', 5, 20, 0.25)],
    });
    const r = planStops(input);
    if (!r.feasible) throw new Error('expected a plan');
    expect(r.optimised.stops.map((s) => [s.chainageM, s.aheadM])).toEqual([[4960, 40]]);
    expect(r.optimised.cost.totalH).toBeCloseTo(7.5, 12);
    replay(input, r.optimised);
  });

  it('plans no stop when every ring lasts the horizon', () => {
    const r = planStops(base({ positions: [pos('A', 'face', 0, 25, 0.2)] })); // 0.2 × 100 = 20 mm < 25
    expect(r).toMatchObject({
      feasible: true,
      optimised: { stops: [], cost: { totalH: 0 } },
      practice: { stops: [] },
      certificate: { proven: true, gap: 0 },
    });
  });
});

describe('planStops: infeasible instances', () => {
  it('reports a ring due before the first allowed place', () => {
    // derived: (10 − 5) / 1 = due at 5 m; the first place is at 8 m.
    const r = planStops(
      base({
        stopPlaces: [1008, 1020].map((chainageM) => ({ chainageM, compressedAir: false })),
        positions: [pos('A', 'face', 5, 10, 1), pos('B', 'face', 0, 25, 0.1)],
      }),
    );
    expect(r.feasible).toBe(false);
    if (r.feasible) return;
    expect(r.problems).toHaveLength(1);
    expect(r.problems[0]).toMatchObject({ positionId: 'A', ringNumber: 0, dueAheadM: 5, dueChainageM: 1005 });
    expect(r.problems[0].reason).toContain('before the next allowed stop place (8.0 m ahead)');
  });

  it('reports a new ring that cannot reach the next place', () => {
    // derived: due at 10 m, changed there; the new ring lasts 10 m (due at 20) but the next place is at 25.
    const r = planStops(
      base({
        horizonM: 30,
        stopPlaces: [1010, 1025].map((chainageM) => ({ chainageM, compressedAir: false })),
        positions: [pos('A', 'face', 0, 10, 1)],
      }),
    );
    if (r.feasible) throw new Error('expected infeasible');
    expect(r.problems[0]).toMatchObject({ positionId: 'A', ringNumber: 1, dueAheadM: 20 });
    expect(r.problems[0].reason).toContain('the ring fitted at 10.0 m ahead');
  });

  it('reports a ring already past its limit, and a ring due with no place left in the horizon', () => {
    const r = planStops(
      base({
        stopPlaces: [{ chainageM: 1000, compressedAir: false }],
        positions: [pos('A', 'face', 12, 10, 0.1), pos('B', 'face', 0, 10, 0.2)],
      }),
    );
    if (r.feasible) throw new Error('expected infeasible');
    expect(r.problems.map((p) => p.positionId)).toEqual(['A', 'B']);
    expect(r.problems[0].reason).toContain('already past its limit');
    // derived: B is due at 10 / 0.2 = 50 m, after the only place (0 m); its ring 0 is changed there, ring 1 is due at 50.
    expect(r.problems[1]).toMatchObject({ ringNumber: 1, dueAheadM: 50 });
    expect(r.problems[1].reason).toContain('none left inside the horizon');
  });

  it('rejects malformed input', () => {
    expect(() => planStops(base({ horizonM: 0 }))).toThrow(RangeError);
    expect(() =>
      planStops(base({ positions: [{ ...pos('A', 'face', 0, 10, 0.1), wearStretches: [{ fromAheadM: 5, wearMmPerM: 0.1 }] }] })),
    ).toThrow(RangeError);
    expect(() => planStops(base({ freeAirStopH: -1 }))).toThrow(RangeError);
  });
});

describe('planStops: against an independent brute force', () => {
  it('proven plans cost the brute-force optimum, and the lower bound never exceeds it (300 seeded tiny instances)', () => {
    const rng = mulberry32(20261202);
    let feasible = 0;
    let repeated = 0;
    let beaten = 0;
    for (let k = 0; k < 300; k++) {
      const input = tinyInstance(rng);
      const bruteH = bruteForceMinH(input);
      const label = `instance ${k}`;
      const r = planStops(input);
      if (!r.feasible) {
        expect(bruteH, label).toBeNull();
        continue;
      }
      expect(bruteH, label).not.toBeNull();
      feasible++;
      expect(r.certificate.proven, label).toBe(true);
      expect(r.optimised.cost.totalH, label).toBeCloseTo(bruteH!, 9);
      expect(r.certificate.lowerBoundH, label).toBeCloseTo(bruteH!, 9);
      replay(input, r.optimised);
      // The Lagrangian bound on its own (the search stopped at once): never above the optimum.
      const relaxed = lagrangianBound(prepare(input), { iterations: 200, upperH: r.practice?.cost.totalH ?? 1e6, targetGap: 0 });
      expect(relaxed.lowerH, label).toBeLessThanOrEqual(bruteH! + 1e-9);
      const capped = planStops(input, { maxStates: 0 });
      if (!capped.feasible) throw new Error(label);
      expect(capped.certificate.lowerBoundH, label).toBeLessThanOrEqual(bruteH! + 1e-9);
      expect(capped.optimised.cost.totalH, label).toBeGreaterThanOrEqual(bruteH! - 1e-9);
      expect(capped.optimised.cost.totalH, label).toBeLessThanOrEqual(capped.certificate.lowerBoundH * (1 + capped.certificate.gap) + 1e-9);
      if (capped.certificate.proven) expect(capped.optimised.cost.totalH, label).toBeCloseTo(bruteH!, 9);
      if (r.practice && r.practice.cost.totalH > r.optimised.cost.totalH + 1e-6) beaten++;
      const changes = r.optimised.stops.flatMap((s) => s.changes.map((c) => c.positionId));
      if (new Set(changes).size < changes.length) repeated++;
    }
    // The instances cover the cases that matter: plans better than the practice rule, and
    // positions changed more than once inside the horizon.
    expect(feasible).toBeGreaterThanOrEqual(100);
    expect(beaten).toBeGreaterThan(20);
    expect(repeated).toBeGreaterThan(10);
  });

  it('finds the same least cost whatever the quick pass, with valid plans, on 200 random instances of up to 30 places', () => {
    const rng = mulberry32(20261201);
    let feasible = 0;
    for (let k = 0; k < 200; k++) {
      const input = randomInstance(rng);
      const costs = [0, 1, undefined].map((quickPassStates) => {
        const r = planStops(input, { quickPassStates, boundIterations: 0 });
        if (!r.feasible) return null;
        replay(input, r.optimised);
        if (r.practice) replay(input, r.practice);
        if (r.fixedInterval) replay(input, r.fixedInterval);
        expect(r.certificate.proven).toBe(true);
        return r.optimised.cost.totalH;
      });
      if (costs[0] === null) {
        expect(costs).toEqual([null, null, null]);
        continue;
      }
      feasible++;
      expect(costs[1]).toBeCloseTo(costs[0], 9);
      expect(costs[2]).toBeCloseTo(costs[0], 9);
    }
    expect(feasible).toBeGreaterThanOrEqual(100);
  });
});

describe('comparison rules', () => {
  it('the practice rule and the fixed-interval rule reproduce a hand-worked example', () => {
    // Worked by hand (rules: common practice, no source). Places every 10 m, horizon 160 m, stop 5 h,
    // change 1 h, 0.1 h per mm of ring life thrown away; limit 20 mm everywhere.
    //   A: 10 mm + 0.25 mm/m → due at 40; a new ring lasts 80 m.  B: 12 mm + 0.1 mm/m.  C: 5 mm + 0.1 mm/m → due at 150.
    // Practice (80 % = 16 mm): stop at 40 (A due); B carries 16 mm → changed (4 mm unused), C 9 mm stays.
    //   A's new ring is due at 120; stop there: A (0 mm unused), C carries 17 mm → changed (3 mm unused).
    //   2 stops × 5 h + 4 changes × 1 h + 7 mm × 0.1 h = 14.7 h.
    // Every 50 m (targets 50, 100, 150): A is due at 40, before the first target → extra stop at 40,
    //   A and B changed as above; at 50 nothing is due before 100 or past 80 % → no stop; at 100 A's
    //   ring (due 120) would not last to 150 → changed, 30 − 25 = 5 mm unused; at 150 C (due exactly
    //   there, 20 mm) would not last to the horizon → changed, 0 mm unused.
    //   3 stops × 5 h + 4 changes × 1 h + 9 mm × 0.1 h = 19.9 h.
    const input = base({
      horizonM: 160,
      stopPlaces: everyM(0, 160, 10),
      positions: [pos('A', 'face', 10, 20, 0.25), pos('B', 'face', 12, 20, 0.1), pos('C', 'face', 5, 20, 0.1)],
    });
    const r = planStops(input, { rules: { changeShare: 0.8, intervalM: 50 } });
    if (!r.feasible) throw new Error('expected a plan');
    expect(stopsOf(r.practice!)).toEqual([
      [40, 'A B'],
      [120, 'A C'],
    ]);
    expect(r.practice!.cost.totalH).toBeCloseTo(14.7, 9);
    expect(stopsOf(r.fixedInterval!)).toEqual([
      [40, 'A B'],
      [100, 'A'],
      [150, 'C'],
    ]);
    expect(r.fixedInterval!.cost.totalH).toBeCloseTo(19.9, 9);
    replay(input, r.practice!);
    replay(input, r.fixedInterval!);
    expect(r.optimised.cost.totalH).toBeLessThanOrEqual(14.7 + 1e-9);
  });

  it('the practice rule started from a state part-way reproduces the rest of its own plan (60 seeded instances)', () => {
    const rng = mulberry32(20261204);
    let checked = 0;
    for (let k = 0; k < 60; k++) {
      const input = randomInstance(rng);
      const prep = prepare(input);
      const whole = practicePlan(prep, 0.8);
      if (whole === null || whole.length < 2) continue;
      // The rings fitted after the first s stops of the plan, as the rule left them.
      const s = 1 + Math.floor(rng() * (whole.length - 1));
      const budgetMm = [...prep.startBudgetMm];
      for (const stop of whole.slice(0, s)) for (const i of stop.changed) budgetMm[i] = prep.wearAt[i][stop.idx] + prep.limitMm[i];
      const reach = budgetMm.map((b, i) => lastReachable(prep, i, b));
      const rest = practicePlan(prep, 0.8, { afterIdx: whole[s - 1].idx, budgetMm, reach });
      expect(rest, `instance ${k}`).toEqual(whole.slice(s));
      checked++;
    }
    expect(checked).toBeGreaterThanOrEqual(20);
  });
});

describe('search budget', () => {
  it('a quick pass cut by its deadline finishes its most promising states by the practice rule: a whole, valid plan', async () => {
    const { benchInputForTests } = await import('../bench/stop-planner.bench');
    const input = benchInputForTests(3);
    const prep = prepare(input);
    const bounds = searchBounds(prep);
    const practice = pricePlan(prep, practicePlan(prep, 0.8)!);
    const finish = (afterIdx: number, reach: Int32Array, budgetMm: Float64Array) => practicePlan(prep, 0.8, { afterIdx, reach, budgetMm });
    const boundH = practice.cost.totalH + 1;
    // Cut at once and a little later: wherever the cut falls, the answer is a whole plan that
    // keeps every ring within its limit (replayed on its own) and costs what the search says.
    for (const ms of [0, 5, 50]) {
      const r = exactSearch(prep, bounds, { quickPassStates: 2, maxStates: 0, boundH, deadline: performance.now() + ms, finish });
      expect(r.timedOut, `${ms} ms`).toBe(true);
      expect(r.plan, `${ms} ms`).not.toBeNull();
      const priced = pricePlan(prep, r.plan!);
      expect(replay(input, priced)).toBeCloseTo(r.bestH, 6);
      expect(priced.cost.totalH).toBeLessThan(boundH);
    }
    // Without a rule a pass cut before the horizon has no whole plan to give.
    const bare = exactSearch(prep, bounds, { quickPassStates: 2, maxStates: 0, boundH, deadline: performance.now() });
    expect(bare.timedOut).toBe(true);
    expect(bare.plan).toBeNull();
  });

  it('past maxStates answers the best plan found, not proven, with a lower bound below the optimum', async () => {
    // An instance where the exact search expands many states: the benchmark's drive-sized case.
    const { benchInputForTests } = await import('../bench/stop-planner.bench');
    const input = benchInputForTests(2);
    const capped = planStops(input, { maxStates: 50 });
    const exact = planStops(input);
    expect(capped.feasible && exact.feasible).toBe(true);
    if (!capped.feasible || !exact.feasible) return;
    expect(exact.provenOptimal).toBe(true);
    expect(capped.provenOptimal).toBe(false);
    expect(capped.optimised.cost.totalH).toBeLessThanOrEqual(capped.practice!.cost.totalH + 1e-9);
    expect(capped.certificate.lowerBoundH).toBeLessThanOrEqual(exact.optimised.cost.totalH + 1e-9);
    expect(capped.optimised.cost.totalH).toBeGreaterThanOrEqual(exact.optimised.cost.totalH - 1e-9);
  }, 120_000);

  it('a work limit already reached stops every step after the baseline plans, with a bound still below the optimum', async () => {
    // The drive-sized case that the full search proves (previous test): with no time left it must
    // not be searched to the end, and what it says must still hold.
    const { benchInputForTests } = await import('../bench/stop-planner.bench');
    const input = benchInputForTests(2);
    const exact = planStops(input);
    const due = planStops(input, { strongBoundMs: 60_000, localSearchMs: 60_000, answerWithinMs: 0, workLimitMs: 0 });
    expect(exact.feasible && due.feasible).toBe(true);
    if (!exact.feasible || !due.feasible) return;
    expect(exact.provenOptimal).toBe(true);
    expect(exact.certificate.cutForTime).toBe(false);
    expect(due.provenOptimal).toBe(false);
    expect(due.certificate.cutForTime).toBe(true);
    expect(due.statesExpanded).toBe(0);
    expect(due.certificate.lowerBoundH).toBeLessThanOrEqual(exact.optimised.cost.totalH + 1e-9);
    expect(due.optimised.cost.totalH).toBeGreaterThanOrEqual(exact.optimised.cost.totalH - 1e-9);
    expect(due.optimised.cost.totalH).toBeLessThanOrEqual(due.practice!.cost.totalH + 1e-9);
    expect(due.certificate.gap).toBeCloseTo((due.optimised.cost.totalH - due.certificate.lowerBoundH) / due.certificate.lowerBoundH, 9);
  }, 120_000);
});

/**
 * Position i's least hours when its rings may be changed only at the usable places of bitmask
 * `allowed`, by brute force: every subset of those places as its change places (written apart
 * from the planner, like bruteForceMinH). Infinity when no subset keeps every ring in its limit.
 */
function bruteForcePositionH(input: StopPlanInput, i: number, allowed: number): number {
  const places = placesAhead(input);
  const p = input.positions[i];
  const v = input.wastedRingLifeHPerMm;
  const w = places.map((pl) => wearAddedMm(p.wearStretches, pl.aheadM));
  const wHorizon = wearAddedMm(p.wearStretches, input.horizonM);
  let best = Infinity;
  for (let t = allowed; ; t = (t - 1) & allowed) {
    let budget = p.limitMm - p.wearNowMm;
    let costH = 0;
    for (let j = 0; j < places.length && costH < Infinity; j++) {
      if (!(t & (1 << j))) continue;
      if (w[j] > budget + EPS) costH = Infinity;
      else {
        costH += input.changeHByClass[p.positionClass] + v * (budget - w[j]);
        budget = w[j] + p.limitMm;
      }
    }
    if (wHorizon <= budget + EPS) best = Math.min(best, costH);
    if (t === 0) break;
  }
  return best;
}

describe('certificate: bound, stop-set pricing and local search against the brute force', () => {
  it('prices a stop set exactly: each position as the brute force over the subsets of the set (300 seeded tiny instances)', () => {
    const rng = mulberry32(20261203);
    let priced = 0;
    for (let k = 0; k < 300; k++) {
      const input = tinyInstance(rng);
      const prep = prepare(input);
      const m = prep.aheadM.length;
      // Usable places are the sorted distinct ones; the tiny instances have distinct places.
      expect(placesAhead(input).length, `instance ${k}`).toBe(m);
      const mask = Math.floor(rng() * (1 << m));
      const S = Int32Array.from({ length: m }, (_, j) => j).filter((j) => (mask >> j) & 1);
      const solver = chainSolver(prep);
      for (let i = 0; i < input.positions.length; i++) {
        const bruteH = bruteForcePositionH(input, i, mask);
        const h = solver.restricted(i, S, S.length, null);
        if (bruteH === Infinity) expect(h, `instance ${k} position ${i}`).toBe(Infinity);
        else expect(h, `instance ${k} position ${i}`).toBeCloseTo(bruteH, 9);
      }
      if (solver.priceStops(S, S.length) < Infinity) priced++;
    }
    expect(priced).toBeGreaterThanOrEqual(40);
  });

  it('the bound never exceeds the brute-force optimum; plans from it and from the local search are valid and cost what the brute force allows (300 seeded tiny instances)', () => {
    const rng = mulberry32(20261204);
    let fromBound = 0;
    let improvedByLocal = 0;
    for (let k = 0; k < 300; k++) {
      const input = tinyInstance(rng);
      const bruteH = bruteForceMinH(input);
      const label = `instance ${k}`;
      if (bruteH === null) continue;
      const prep = prepare(input);
      const upperH = 1e6;
      for (const iterations of [1, 20, 300]) {
        const relaxed = lagrangianBound(prep, { iterations, upperH, targetGap: 0 });
        expect(relaxed.lowerH, label).toBeLessThanOrEqual(bruteH + 1e-9);
        if (relaxed.plan !== null) {
          fromBound++;
          const priced = pricePlan(prep, relaxed.plan);
          expect(priced.cost.totalH, label).toBeCloseTo(relaxed.planH, 9);
          expect(replay(input, priced), label).toBeGreaterThanOrEqual(bruteH - 1e-9);
        }
      }
      // Local search from every place as a stop (a valid start whenever any plan is).
      const start = prep.aheadM.map((_, idx) => ({ idx, changed: [] }));
      const all = chainSolver(prep).priceStops(
        Int32Array.from(start, (s) => s.idx),
        start.length,
      );
      const local = improveStops(prep, start);
      const priced = pricePlan(prep, local.plan);
      expect(priced.cost.totalH, label).toBeCloseTo(local.totalH, 9);
      expect(replay(input, priced), label).toBeGreaterThanOrEqual(bruteH - 1e-9);
      expect(local.totalH, label).toBeLessThanOrEqual(all + 1e-9);
      if (local.totalH < all - 1e-9) improvedByLocal++;
      // The planner with the search stopped at once and the local search on: a valid certificate.
      const r = planStops(input, { maxStates: 0, localSearchMs: 50 });
      if (!r.feasible) throw new Error(label);
      expect(r.certificate.lowerBoundH, label).toBeLessThanOrEqual(bruteH + 1e-9);
      expect(replay(input, r.optimised), label).toBeGreaterThanOrEqual(bruteH - 1e-9);
      if (r.certificate.proven) expect(r.optimised.cost.totalH, label).toBeCloseTo(bruteH, 9);
    }
    expect(fromBound).toBeGreaterThan(100);
    expect(improvedByLocal).toBeGreaterThan(20);
  });
});

describe('certificate: the bound with stop-path copies (Lagrangian decomposition) against the brute force', () => {
  /**
   * Position i's least hours plus λ over a stop path containing its changes, by brute force over
   * every subset T of the places as the path, with the path conditions written from their
   * definition (stop-path-copy.ts): every ring that must be changed inside the horizon (some
   * position's) fitted at a stop lasts to the next stop; the first stop comes before any ring now
   * fitted passes its limit; a ring fitted at the last stop lasts to the horizon.
   */
  function bruteForceCopyH(input: StopPlanInput, i: number, lambda: number[]): number {
    const places = placesAhead(input);
    const m = places.length;
    const needs = input.positions.filter((p) => p.wearNowMm + wearAddedMm(p.wearStretches, input.horizonM) > p.limitMm + EPS);
    const lasts = (p: (typeof needs)[number], fromM: number, toM: number, budgetMm: number) =>
      wearAddedMm(p.wearStretches, toM) - wearAddedMm(p.wearStretches, fromM) <= budgetMm + EPS;
    let best = Infinity;
    for (let t = 1; t < 1 << m; t++) {
      const stops = places.map((pl, j) => ((t >> j) & 1 ? pl.aheadM : null)).filter((x): x is number => x !== null);
      let ok = needs.every((p) => lasts(p, 0, stops[0], p.limitMm - p.wearNowMm));
      for (let k = 0; ok && k + 1 < stops.length; k++) ok = needs.every((p) => lasts(p, stops[k], stops[k + 1], p.limitMm));
      ok = ok && needs.every((p) => lasts(p, stops[stops.length - 1], input.horizonM, p.limitMm));
      if (!ok) continue;
      let pathH = 0;
      for (let j = 0; j < m; j++) if ((t >> j) & 1) pathH += lambda[j];
      best = Math.min(best, pathH + bruteForcePositionH(input, i, t));
    }
    return best;
  }

  it('solves a position with its own stop path as the brute force does, for multipliers of either sign (300 seeded tiny instances)', () => {
    const rng = mulberry32(20261205);
    let solved = 0;
    for (let k = 0; k < 300; k++) {
      const input = tinyInstance(rng);
      const prep = prepare(input);
      const copy = stopPathCopy(prep);
      const m = prep.aheadM.length;
      for (let i = 0; i < input.positions.length; i++) {
        const p = input.positions[i];
        if (p.wearNowMm + wearAddedMm(p.wearStretches, input.horizonM) <= p.limitMm + EPS) continue;
        const lambda = Array.from({ length: m }, () => 6 * rng() - 2);
        const bruteH = bruteForceCopyH(input, i, lambda);
        const stops = new Uint8Array(m);
        const h = copy.solve(i, Float64Array.from(lambda), stops);
        if (bruteH === Infinity) expect(h, `instance ${k} position ${i}`).toBe(Infinity);
        else {
          expect(h, `instance ${k} position ${i}`).toBeCloseTo(bruteH, 9);
          // The path it reports costs what it says: λ over it plus the position's best on it.
          let mask = 0;
          let pathH = 0;
          stops.forEach((s, j) => {
            if (s === 1) {
              mask |= 1 << j;
              pathH += lambda[j];
            }
          });
          expect(pathH + bruteForcePositionH(input, i, mask), `instance ${k} position ${i}`).toBeCloseTo(h, 9);
          solved++;
        }
      }
    }
    expect(solved).toBeGreaterThan(150);
  });

  it('never exceeds the brute-force optimum, and at the same multipliers is never below the plain bound (300 seeded tiny instances)', () => {
    const rng = mulberry32(20261206);
    let stronger = 0;
    let chosen = 0;
    for (let k = 0; k < 300; k++) {
      const input = tinyInstance(rng);
      const bruteH = bruteForceMinH(input);
      if (bruteH === null) continue;
      const label = `instance ${k}`;
      const prep = prepare(input);
      const copies = new Uint8Array(input.positions.length).fill(1);
      const plain = lagrangianBound(prep, { iterations: 50, upperH: 1e6, targetGap: 0 });
      expect(plain.lowerH, label).toBeLessThanOrEqual(bruteH + 1e-9);
      // One step from the plain bound's multipliers: the value there, with copies.
      const atSame = lagrangianBound(prep, { iterations: 1, upperH: 1e6, targetGap: 0, copies, startLambda: plain.lambda });
      expect(atSame.lowerH, label).toBeGreaterThanOrEqual(plain.lowerH - 1e-9);
      if (atSame.lowerH > plain.lowerH + 1e-6) stronger++;
      for (const iterations of [20, 200]) {
        const fromStart = lagrangianBound(prep, { iterations, upperH: 1e6, targetGap: 0, copies });
        expect(fromStart.lowerH, label).toBeLessThanOrEqual(bruteH + 1e-9);
        const fromPlain = lagrangianBound(prep, {
          iterations,
          upperH: bruteH,
          targetGap: 0,
          copies,
          startLambda: plain.lambda,
          stepScale: 0.1,
        });
        expect(fromPlain.lowerH, label).toBeLessThanOrEqual(bruteH + 1e-9);
      }
      // As the planner runs it: copies chosen among the fast positions, steps until a deadline.
      const strong = decompositionBound(prep, plain.lambda, { upperH: bruteH, targetGap: 0, deadline: performance.now() + 5 });
      expect(strong.lowerH, label).toBeLessThanOrEqual(bruteH + 1e-9);
      if (strong.copies > 0) chosen++;
    }
    expect(stronger).toBeGreaterThan(10);
    expect(chosen).toBeGreaterThanOrEqual(5); // the copies are exercised, not only skipped
  });
});
