import { Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';

import { gehringPriorRateMmPerKm } from '../../shared/domain/gehring-prior';
import {
  fitWearRates,
  predictWear,
  suddenFailureRatesPer1000Km,
  type ClassFactors,
  type NormalWearObservation,
} from '../../shared/domain/wear-fit';

const relativeError = (actual: number, expected: number) => Math.abs(actual / expected - 1);
const faceOnly: ClassFactors = { centre: 1, face: 1, gauge: 1 };
// Invented planner factors for the synthetic cases (no source; planner-set in the product).
const plannerFactors: ClassFactors = { centre: 0.8, face: 1, gauge: 1.3 };

const face = (wearMm: number, rolledKmByGround: Record<string, number>): NormalWearObservation => ({
  wearMm,
  positionClass: 'face',
  rolledKmByGround,
});

// NIST StRD NoInt1 (DOMAIN.md §5): x = 60..70 as km rolled in one ground, y = 130..140 as wear.
const noInt1 = Array.from({ length: 11 }, (_, i) => face(130 + i, { g1: 60 + i }));

describe('fitWearRates', () => {
  it('reproduces NIST StRD NoInt1 through the one-ground, no-prior path', () => {
    const fit = fitWearRates(noInt1, { classFactors: faceOnly });
    const [rate] = fit.rates;
    // Certified values, NIST StRD NoInt1 (DOMAIN.md §5), 15 significant digits. Tolerance: a
    // relative 1e-14 (≥ 14 correct digits); double precision carries ~16, and the normal-equation
    // and Cholesky steps here lose about one (we measure ~2e-15).
    expect(relativeError(rate.rateMmPerKm, 2.07438016528926)).toBeLessThan(1e-14);
    expect(relativeError(rate.standardErrorMmPerKm!, 1.65289256198347e-2)).toBeLessThan(1e-14);
    expect(relativeError(fit.residualSdMm!, 3.56753034006338)).toBeLessThan(1e-14);
    expect(fit.residualDof).toBe(10);
    expect(rate).toMatchObject({ groundTypeId: 'g1', observationCount: 11, source: 'site', siteWeight: 1, heldAtZero: false });
  });

  it('recovers known rates of two grounds exactly from noise-free data', () => {
    // derived: wear = factor(class) · (0.012·km_granite + 0.030·km_schist), invented exposures.
    const rates = { granite: 0.012, schist: 0.03 };
    const exposures: [NormalWearObservation['positionClass'], number, number][] = [
      ['face', 120, 0],
      ['face', 40, 80],
      ['gauge', 60, 60],
      ['centre', 0, 150],
      ['gauge', 200, 10],
      ['centre', 90, 30],
    ];
    const observations = exposures.map(([positionClass, granite, schist]) => ({
      positionClass,
      rolledKmByGround: { granite, schist },
      wearMm: plannerFactors[positionClass] * (rates.granite * granite + rates.schist * schist),
    }));
    const fit = fitWearRates(observations, { classFactors: plannerFactors });
    expect(fit.rates.map((r) => r.groundTypeId)).toEqual(['granite', 'schist']);
    expect(relativeError(fit.rates[0].rateMmPerKm, 0.012)).toBeLessThan(1e-12);
    expect(relativeError(fit.rates[1].rateMmPerKm, 0.03)).toBeLessThan(1e-12);
    expect(fit.residualSdMm!).toBeLessThan(1e-12);
    expect(fit.rates.map((r) => r.observationCount)).toEqual([5, 5]);
    // Hand-worked: a gauge disc after 100 km granite and 50 km schist wears
    // 1.3 · (0.012·100 + 0.030·50) = 1.3 · 2.7 = 3.51 mm.
    expect(predictWear(fit, { granite: 100, schist: 50 }, 'gauge', 0.9).predictedWearMm).toBeCloseTo(3.51, 10);
  });

  it('holds a rate at zero where unconstrained least squares goes negative', () => {
    const observations = [
      face(1.0, { a: 100, b: 0 }),
      face(2.1, { a: 200, b: 0 }),
      face(0.9, { a: 100, b: 100 }),
      face(0.4, { a: 50, b: 150 }),
    ];
    // Unconstrained least squares (ml-matrix solve) gives rate_b ≈ −0.00096 mm/km.
    const ols = solve(
      new Matrix([
        [100, 0],
        [200, 0],
        [100, 100],
        [50, 150],
      ]),
      Matrix.columnVector([1.0, 2.1, 0.9, 0.4]),
    );
    expect(ols.get(1, 0)).toBeLessThan(0);

    const fit = fitWearRates(observations, { classFactors: faceOnly });
    const [a, b] = fit.rates;
    expect(b.rateMmPerKm).toBe(0);
    expect(b.heldAtZero).toBe(true);
    expect(b.standardErrorMmPerKm).toBeNull();
    // Hand-worked: with rate_b at 0 the fit is one-column least squares on a:
    // Σx·y = 100·1.0 + 200·2.1 + 100·0.9 + 50·0.4 = 630, Σx² = 62,500 → 0.01008 mm/km.
    // Optimality (Kuhn–Tucker): Σ km_b·(y − 0.01008·km_a) = 100·(0.9 − 1.008) + 150·(0.4 − 0.504)
    // = −26.4 < 0, so raising rate_b would only worsen the fit.
    expect(a.rateMmPerKm).toBeCloseTo(0.01008, 14);
    expect(fit.residualDof).toBe(3);
  });

  describe('prior blending', () => {
    // Prior from Gehring for CAI 2 on a 17″ ring: 0.013930 mm/km (see gehring-prior.test.ts).
    const priorRate = gehringPriorRateMmPerKm({ cai: 2, ringDiameterMm: 432, tipWidthMm: 19 });
    const siteRate = 0.02; // invented site truth
    const siteData = (n: number) => Array.from({ length: n }, (_, i) => face(siteRate * (50 + 10 * i), { granite: 50 + 10 * i }));
    const prior = (strengthObservations: number) => ({ rateMmPerKmByGround: { granite: priorRate }, strengthObservations });

    it('returns the prior when there is no site data', () => {
      const fit = fitWearRates([], { classFactors: faceOnly, prior: prior(5) });
      expect(fit.rates).toHaveLength(1);
      expect(fit.rates[0]).toMatchObject({ source: 'prior', siteWeight: 0, observationCount: 0, standardErrorMmPerKm: null });
      expect(fit.rates[0].rateMmPerKm).toBeCloseTo(priorRate, 15);
      // derived: 300 km at the prior rate; no site scatter measured, so no upper bound.
      expect(predictWear(fit, { granite: 300 }, 'face', 0.9)).toEqual({ predictedWearMm: 300 * priorRate, upperWearMm: null });
    });

    it('weighs n site inspections against a prior worth n0 as n / (n + n0)', () => {
      // derived from the method: one ground, rate = (n·siteRate + n0·prior) / (n + n0).
      const fit = fitWearRates(siteData(4), { classFactors: faceOnly, prior: prior(4) });
      expect(fit.rates[0]).toMatchObject({ source: 'blended', siteWeight: 0.5, observationCount: 4 });
      expect(fit.rates[0].rateMmPerKm).toBeCloseTo((siteRate + priorRate) / 2, 14);
    });

    it('approaches the site fit with plenty of site data', () => {
      const fit = fitWearRates(siteData(2000), { classFactors: faceOnly, prior: prior(5) });
      // derived: (2000·0.02 + 5·prior) / 2005, within 0.2 % of the site rate.
      expect(fit.rates[0].rateMmPerKm).toBeCloseTo((2000 * siteRate + 5 * priorRate) / 2005, 14);
      expect(relativeError(fit.rates[0].rateMmPerKm, siteRate)).toBeLessThan(0.002);
      expect(fit.rates[0].siteWeight).toBeCloseTo(2000 / 2005, 14);
    });

    it('marks a ground without a prior as site data next to a prior-only ground', () => {
      const fit = fitWearRates(
        siteData(3).map((o) => face(o.wearMm, { basalt: o.rolledKmByGround.granite })),
        {
          classFactors: faceOnly,
          prior: prior(5),
        },
      );
      expect(fit.rates.map((r) => [r.groundTypeId, r.source])).toEqual([
        ['basalt', 'site'],
        ['granite', 'prior'],
      ]);
      expect(fit.rates[0].rateMmPerKm).toBeCloseTo(siteRate, 14);
      expect(fit.rates[1].rateMmPerKm).toBeCloseTo(priorRate, 14);
      // derived: the site ground has a measured scatter, the prior-only ground has none.
      expect(predictWear(fit, { basalt: 100 }, 'face', 0.9).upperWearMm).not.toBeNull();
      expect(predictWear(fit, { basalt: 100, granite: 10 }, 'face', 0.9).upperWearMm).toBeNull();
    });
  });

  describe('prior weight 0, site-only rate and effective site weight', () => {
    // Independent two-ground NNLS (not ml-fcnnls): the optimum is the unconstrained least-squares
    // solution on its own support, so enumerate the supports {a, b}, {a}, {b}, {} and keep the
    // feasible one with the smallest residual sum of squares (Lawson & Hanson 1974, ch. 3 and 23:
    // Kuhn–Tucker conditions). Plain arithmetic; the 2×2 normal equations by Cramer's rule.
    const nnls2 = (rows: [number, number][], y: number[]): [number, number] => {
      const s = (f: (r: [number, number], yi: number) => number) => rows.reduce((sum, r, i) => sum + f(r, y[i]), 0);
      const saa = s(([a]) => a * a),
        sab = s(([a, b]) => a * b),
        sbb = s(([, b]) => b * b);
      const say = s(([a], yi) => a * yi),
        sby = s(([, b], yi) => b * yi);
      const det = saa * sbb - sab * sab;
      const candidates: [number, number][] = [
        [0, 0],
        [say / saa, 0],
        [0, sby / sbb],
        [(say * sbb - sby * sab) / det, (saa * sby - sab * say) / det],
      ];
      const sse = ([ra, rb]: [number, number]) => s(([a, b], yi) => (yi - ra * a - rb * b) ** 2);
      return candidates.filter(([ra, rb]) => ra >= 0 && rb >= 0).sort((p, q) => sse(p) - sse(q))[0];
    };
    const shared: [number, number, number][] = [
      [1.0, 100, 0],
      [2.1, 200, 0],
      [3.0, 100, 100],
      [3.9, 50, 150],
    ]; // invented
    const held: [number, number, number][] = [
      [1.0, 100, 0],
      [2.1, 200, 0],
      [0.9, 100, 100],
      [0.4, 50, 150],
    ]; // invented; b goes negative unconstrained
    const asObservations = (data: [number, number, number][]) => data.map(([wear, a, b]) => face(wear, { a, b }));
    // Invented prior rates for the two grounds and a third, uninspected one (as from a CAI).
    const priors = { a: 0.03, b: 0.005, c: 0.012 };

    for (const [name, data] of [
      ['both rates free', shared],
      ['one rate held at 0', held],
    ] as const) {
      it(`gives exactly the site-only NNLS fit with weight 0 (${name})`, () => {
        const [ra, rb] = nnls2(
          data.map(([, a, b]) => [a, b]),
          data.map(([wear]) => wear),
        );
        const fit = fitWearRates(asObservations(data), {
          classFactors: faceOnly,
          prior: { rateMmPerKmByGround: priors, strengthObservations: 0 },
        });
        const [a, b, c] = fit.rates;
        expect(relativeError(a.rateMmPerKm, ra)).toBeLessThan(1e-12);
        if (rb === 0) expect(b.rateMmPerKm).toBe(0);
        else expect(relativeError(b.rateMmPerKm, rb)).toBeLessThan(1e-12);
        expect([a.source, b.source]).toEqual(['site', 'site']);
        expect([a.effectiveSiteWeight, b.effectiveSiteWeight]).toEqual([1, 1]);
        expect([a.siteOnlyRateMmPerKm, b.siteOnlyRateMmPerKm]).toEqual([a.rateMmPerKm, b.rateMmPerKm]);
        expect([a.priorRateMmPerKm, b.priorRateMmPerKm]).toEqual([0.03, 0.005]);
        // derived: nothing to blend for the uninspected ground, so it keeps its prior.
        expect(c).toMatchObject({
          groundTypeId: 'c',
          source: 'prior',
          rateMmPerKm: 0.012,
          siteOnlyRateMmPerKm: null,
          effectiveSiteWeight: 0,
        });
      });
    }

    it('reports the site-only rate beside the blended one', () => {
      const [ra, rb] = nnls2(
        shared.map(([, a, b]) => [a, b]),
        shared.map(([wear]) => wear),
      );
      const fit = fitWearRates(asObservations(shared), {
        classFactors: faceOnly,
        prior: { rateMmPerKmByGround: priors, strengthObservations: 5 },
      });
      expect(fit.rates.map((r) => r.source)).toEqual(['blended', 'blended', 'prior']);
      expect(relativeError(fit.rates[0].siteOnlyRateMmPerKm!, ra)).toBeLessThan(1e-12);
      expect(relativeError(fit.rates[1].siteOnlyRateMmPerKm!, rb)).toBeLessThan(1e-12);
      expect(fit.rates[0].rateMmPerKm).not.toBeCloseTo(ra, 4);
    });

    it('gives the closed-form weight n / (n + n0) for a single-ground history', () => {
      // Hand computation (invented noisy inspections, n = 3, n0 = 2): site rate = Σxy / Σx²
      // = (1.2·50 + 1.9·100 + 3.4·150) / (50² + 100² + 150²) = 760 / 35,000 = 0.0217142857 mm/km;
      // prior 0.013930 mm/km (Gehring, CAI 2, 17″ ring: gehring-prior.test.ts). Mixed estimation
      // with a² = n0·Σx²/n gives (Σxy + a²·p) / (Σx² + a²) = (n·site + n0·p) / (n + n0), weight 3/5.
      const p = gehringPriorRateMmPerKm({ cai: 2, ringDiameterMm: 432, tipWidthMm: 19 });
      const site = 760 / 35000;
      const fit = fitWearRates([face(1.2, { g: 50 }), face(1.9, { g: 100 }), face(3.4, { g: 150 })], {
        classFactors: faceOnly,
        prior: { rateMmPerKmByGround: { g: p }, strengthObservations: 2 },
      });
      const [g] = fit.rates;
      expect(relativeError(g.siteOnlyRateMmPerKm!, site)).toBeLessThan(1e-12);
      expect(relativeError(g.rateMmPerKm, (3 * site + 2 * p) / 5)).toBeLessThan(1e-12);
      expect(g.effectiveSiteWeight!).toBeCloseTo(0.6, 12);
      expect(g.sharesInspections).toBe(false);
    });

    it('falls back to the closed form when the site rate equals the prior', () => {
      // derived: noise-free site data at 0.02 mm/km and a prior of 0.02 — any weight describes the
      // blend, and for one ground inspected alone the method's weight is n / (n + n0) = 4 / 9.
      const data = Array.from({ length: 4 }, (_, i) => face(0.02 * (50 + 10 * i), { g: 50 + 10 * i }));
      const fit = fitWearRates(data, { classFactors: faceOnly, prior: { rateMmPerKmByGround: { g: 0.02 }, strengthObservations: 5 } });
      expect(fit.rates[0].effectiveSiteWeight!).toBeCloseTo(4 / 9, 12);
    });

    it('says no single weight applies when shared inspections push a rate beyond both its site and prior values', () => {
      // Independent hand computation of the blended fit (both rates free): mixed estimation adds
      // a_j² = n0·mean(x_j² over inspections with x_j > 0) to the diagonal of XᵀX and a_j²·p_j to
      // Xᵀy. Invented priors: a's prior close to its site rate, b's far below.
      const p = { a: 0.011, b: 0.005 };
      const n0 = 5;
      const rows = shared.map(([, a, b]) => [a, b] as [number, number]);
      const y = shared.map(([wear]) => wear);
      const meanSq = (j: 0 | 1) => {
        const xs = rows.map((r) => r[j]).filter((x) => x > 0);
        return xs.reduce((t, x) => t + x * x, 0) / xs.length;
      };
      const [a2, b2] = [n0 * meanSq(0), n0 * meanSq(1)];
      const sum = (f: (r: [number, number], yi: number) => number) => rows.reduce((t, r, i) => t + f(r, y[i]), 0);
      const m11 = sum(([a]) => a * a) + a2,
        m12 = sum(([a, b]) => a * b),
        m22 = sum(([, b]) => b * b) + b2;
      const v1 = sum(([a], yi) => a * yi) + a2 * p.a,
        v2 = sum(([, b], yi) => b * yi) + b2 * p.b;
      const det = m11 * m22 - m12 * m12;
      const blended = { a: (v1 * m22 - v2 * m12) / det, b: (m11 * v2 - m12 * v1) / det };
      const [sa, sb] = nnls2(rows, y);
      const quotient = { a: (blended.a - p.a) / (sa - p.a), b: (blended.b - p.b) / (sb - p.b) };
      expect(quotient.a < 0 || quotient.a > 1).toBe(true); // the case this test is about

      const fit = fitWearRates(asObservations(shared), {
        classFactors: faceOnly,
        prior: { rateMmPerKmByGround: p, strengthObservations: n0 },
      });
      const [a, b] = fit.rates;
      expect(relativeError(a.rateMmPerKm, blended.a)).toBeLessThan(1e-10);
      expect(relativeError(b.rateMmPerKm, blended.b)).toBeLessThan(1e-10);
      expect(a).toMatchObject({ sharesInspections: true, effectiveSiteWeight: null });
      // b's quotient lies in [0, 1]: then it is the weight reported, rate_b = w·site_b + (1 − w)·prior_b.
      expect(quotient.b).toBeGreaterThanOrEqual(0);
      expect(quotient.b).toBeLessThanOrEqual(1);
      expect(b.effectiveSiteWeight!).toBeCloseTo(quotient.b, 10);
      // The nominal n/(n + n0) is kept for old readers: 4/9 and 2/7.
      expect([a.siteWeight, b.siteWeight]).toEqual([4 / 9, 2 / 7]);
    });

    it('accepts a weight of 0 but refuses a negative weight and a prior of 0 mm/km', () => {
      expect(() =>
        fitWearRates(noInt1, { classFactors: faceOnly, prior: { rateMmPerKmByGround: { g1: 0.02 }, strengthObservations: -1 } }),
      ).toThrow(RangeError);
      expect(() =>
        fitWearRates(noInt1, { classFactors: faceOnly, prior: { rateMmPerKmByGround: { g1: 0 }, strengthObservations: 5 } }),
      ).toThrow(RangeError);
      expect(
        fitWearRates(noInt1, { classFactors: faceOnly, prior: { rateMmPerKmByGround: { g1: 0.02 }, strengthObservations: 0 } }).rates[0]
          .source,
      ).toBe('site');
    });
  });

  it('gives a rate held at 0 the standard error its column would have were it free', () => {
    // Hand computation on the held-at-0 example above: rate_a = 0.01008, rate_b = 0; residuals
    // −0.008, 0.084, −0.108, −0.104 → SSE = 0.0296, s² = 0.0296 / 3. With column b added to the
    // free set, XᵀX = [[62,500, 17,500], [17,500, 32,500]], det = 1.725e9, (XᵀX)⁻¹_bb = 62,500 / det.
    const fit = fitWearRates([face(1.0, { a: 100 }), face(2.1, { a: 200 }), face(0.9, { a: 100, b: 100 }), face(0.4, { a: 50, b: 150 })], {
      classFactors: faceOnly,
    });
    const expected = Math.sqrt((0.0296 / 3) * (62500 / 1.725e9));
    expect(relativeError(fit.rates[1].heldStandardErrorMmPerKm!, expected)).toBeLessThan(1e-10);
    expect(fit.rates[0].heldStandardErrorMmPerKm).toBeNull();
  });

  it('rejects class factors not relative to face', () => {
    expect(() => fitWearRates(noInt1, { classFactors: { centre: 1, face: 1.2, gauge: 1 } })).toThrow(RangeError);
  });
});

describe('predictWear', () => {
  const fit = fitWearRates(noInt1, { classFactors: faceOnly });

  it('gives the one-sided Student-t upper bound of a new observation', () => {
    // Hand-worked for x0 = 65 km on NoInt1: Σx² = 11·65² + 2·(1+4+9+16+25) = 46,585,
    // mean = 2.07438·65 = 134.8347 mm, √(1 + 65²/46,585) = 1.044363, s = 3.567530 mm,
    // so √variance = 3.725797 mm. t quantiles for 10 dof, one-sided: 0.90 → 1.372,
    // 0.95 → 1.812 (NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.6.7.2, table of
    // t critical values; 3 decimals, hence tolerance 0.0005·3.7258 ≈ 0.002 mm).
    const p90 = predictWear(fit, { g1: 65 }, 'face', 0.9);
    expect(p90.predictedWearMm).toBeCloseTo(134.834711, 5);
    expect(Math.abs(p90.upperWearMm! - (134.834711 + 1.372 * 3.725797))).toBeLessThan(0.002);
    const p95 = predictWear(fit, { g1: 65 }, 'face', 0.95);
    expect(Math.abs(p95.upperWearMm! - (134.834711 + 1.812 * 3.725797))).toBeLessThan(0.002);
  });

  it('refuses a ground type the fit does not know and a probability outside (0, 1)', () => {
    expect(() => predictWear(fit, { g2: 10 }, 'face', 0.9)).toThrow(RangeError);
    expect(() => predictWear(fit, { g1: 10 }, 'face', 1)).toThrow(RangeError);
  });
});

describe('suddenFailureRatesPer1000Km', () => {
  it('counts abnormal events per 1,000 km rolled per ground', () => {
    // Hand-worked, invented counts: 3 events in 1,500 km → 3 / 1,500 · 1,000 = 2.0;
    // 0 events in 800 km → 0; 1 event where nothing has rolled yet → no rate.
    expect(suddenFailureRatesPer1000Km({ granite: 1500, schist: 800 }, { granite: 3, marl: 1 })).toEqual([
      { groundTypeId: 'granite', eventCount: 3, rolledKm: 1500, ratePer1000Km: 2 },
      { groundTypeId: 'marl', eventCount: 1, rolledKm: 0, ratePer1000Km: null },
      { groundTypeId: 'schist', eventCount: 0, rolledKm: 800, ratePer1000Km: 0 },
    ]);
  });

  it('rejects negative or fractional event counts', () => {
    expect(() => suddenFailureRatesPer1000Km({ granite: 10 }, { granite: 1.5 })).toThrow(RangeError);
  });
});
