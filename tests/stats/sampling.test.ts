/**
 * Sample size, upper limit, risk, extension, planning table and decision: behaviour and the
 * known check values. Sources beside each check.
 */
import { describe, expect, it } from 'vitest';
import { NoPracticalSizeError } from '../../src/errors.js';
import {
  binomialCdf,
  decision,
  expectedDeviations,
  extensionSize,
  hypergeometricCdf,
  MAX_SAMPLE_SIZE,
  overrelianceRisk,
  planningTable,
  resolveModel,
  sampleSize,
  tolerableDeviations,
  upperLimit,
} from '../../src/stats/index.js';
import { mpBetaQuantile, mpBinomialCdf } from '../fixtures/reference-table.js';

describe('sampleSize', () => {
  it('95% / 6% / 1% → 78 with k_e = 1, binomial by default (AICPA Audit Sampling guide, 95% sample size table, from memory)', () => {
    const r = sampleSize({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01 });
    expect(r).toMatchObject({ sampleSize: 78, expectedDeviations: 1, model: 'binomial', confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01 });
    expect(r.achievedRisk).toBeCloseTo(binomialCdf(1, 78, 0.06), 15);
    expect(r.populationSize).toBeUndefined();
    expect(r.finitePopulationCorrection).toBeUndefined();
    // 77 fails at its own k_e (also 1): the size is minimal.
    expect(binomialCdf(expectedDeviations(77, 0.01), 77, 0.06)).toBeGreaterThan(0.05);
  });

  it('a known population switches to the exact hypergeometric size and reports the textbook FPC beside it (README, "How the figures are computed")', () => {
    const r = sampleSize({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01, populationSize: 800 });
    expect(r.model).toBe('hypergeometric');
    expect(r.populationSize).toBe(800);
    expect(r.finitePopulationCorrection).toEqual({ binomialSampleSize: 78, correctedSampleSize: Math.ceil(78 / (1 + 78 / 800)) });
    const M = tolerableDeviations(800, 0.06);
    expect(M).toBe(48);
    expect(r.achievedRisk).toBeCloseTo(hypergeometricCdf(r.expectedDeviations, 800, M, r.sampleSize), 15);
    expect(r.achievedRisk).toBeLessThanOrEqual(0.05);
    expect(hypergeometricCdf(expectedDeviations(r.sampleSize - 1, 0.01), 800, M, r.sampleSize - 1)).toBeGreaterThan(0.05);
    expect(r.sampleSize).toBeLessThanOrEqual(78);
  });

  it('the hypergeometric size for N = 10,000,000 equals the binomial one for a common plan (limit theorem)', () => {
    const h = sampleSize({ confidence: 0.95, tolerableRate: 0.05, expectedRate: 0.01, populationSize: 10_000_000 });
    const b = sampleSize({ confidence: 0.95, tolerableRate: 0.05, expectedRate: 0.01 });
    expect(h.sampleSize).toBe(b.sampleSize);
    expect(h.sampleSize).toBe(93); // AICPA 95% table, 5% tolerable, 1% expected: 93(1), from memory
  });

  it('the Poisson model gives the factor sizes: k_e = 0 → ⌈−ln β / TDR⌉ (closed form)', () => {
    for (const [c, t] of [[0.95, 0.05], [0.9, 0.06], [0.95, 0.02]] as const) {
      const r = sampleSize({ confidence: c, tolerableRate: t, expectedRate: 0, model: 'poisson' });
      expect(r.sampleSize).toBe(Math.ceil(-Math.log(1 - c) / t - 1e-12));
    }
  });

  it('non-monotone risk: the smallest n is found even where a larger n in an earlier run would fail', () => {
    // 95%, 4% tolerable, 1.5% expected: runs of k_e change at 67, 134, 200; the answer 192 lies in the
    // k_e = 3 run, and 193..200 pass too while 201 (k_e = 4) fails again (common practice; brute force here).
    const r = sampleSize({ confidence: 0.95, tolerableRate: 0.04, expectedRate: 0.015 });
    let brute = 0;
    for (let n = 1; n <= 1000; n++) {
      if (binomialCdf(expectedDeviations(n, 0.015), n, 0.04) <= 0.05) {
        brute = n;
        break;
      }
    }
    expect(r.sampleSize).toBe(brute);
    expect(r.sampleSize).toBe(192);
    expect(binomialCdf(expectedDeviations(201, 0.015), 201, 0.04)).toBeGreaterThan(0.05);
  });

  it('k_e uses ⌈n·EDR⌉ with a guard against binary noise: 100 × 7% is 7, not 8', () => {
    expect(0.07 * 100).toBeGreaterThan(7); // the noise being guarded against
    expect(expectedDeviations(100, 0.07)).toBe(7);
    expect(expectedDeviations(101, 0.07)).toBe(8);
    expect(expectedDeviations(50, 0)).toBe(0);
    expect(tolerableDeviations(10_000_000, 0.07)).toBe(700_000);
  });

  it('an exact tie counts as achieved: N = 20, 1 tolerable deviation, 95% → n = 19 (P = 1/20 exactly)', () => {
    const r = sampleSize({ confidence: 0.95, tolerableRate: 0.05, expectedRate: 0, populationSize: 20 });
    expect(r.sampleSize).toBe(19);
    expect(upperLimit({ sampleSize: 19, deviations: 0, confidence: 0.95, populationSize: 20 }).deviationsInPopulation).toBe(0);
  });

  it('throws NoPracticalSizeError past the cap, with the plan in the message', () => {
    expect(() => sampleSize({ confidence: 0.95, tolerableRate: 0.02, expectedRate: 0.019 })).toThrow(NoPracticalSizeError);
    expect(() => sampleSize({ confidence: 0.95, tolerableRate: 0.02, expectedRate: 0.019 })).toThrow(/tolerable rate 2%, expected rate 1.9%/);
    // A tiny population where ⌈N·EDR⌉ = ⌈N·TDR⌉: no sample, not even the whole population, can work.
    expect(() => sampleSize({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.05, populationSize: 10 })).toThrow(NoPracticalSizeError);
    // Binomial size capped by a known population.
    expect(() => sampleSize({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0, populationSize: 30, model: 'binomial' })).toThrow(/within the population of 30/);
  });

  it('hypergeometric sizes may exceed 10,000 when the population allows (the cap is N)', () => {
    const r = sampleSize({ confidence: 0.95, tolerableRate: 0.02, expectedRate: 0.019, populationSize: 1_000_000 });
    expect(r.sampleSize).toBeGreaterThan(MAX_SAMPLE_SIZE);
    expect(r.achievedRisk).toBeLessThanOrEqual(0.05 * (1 + 1e-12));
    expect(r.finitePopulationCorrection).toBeUndefined(); // no binomial size within 10,000
  });
});

describe('upperLimit', () => {
  it('2 deviations in 78 at 95%: 7.85% binomial; 75 items: 8.16% (Clopper–Pearson limits computed with mpmath, committed table)', () => {
    // BetaInv(0.95; 3, 76) = 0.0785210890738215 and BetaInv(0.95; 3, 73) = 0.0815718704532479 (mpmath, 50 digits).
    expect(upperLimit({ sampleSize: 78, deviations: 2, confidence: 0.95 }).rate).toBeCloseTo(0.07852, 5);
    expect(Math.abs(upperLimit({ sampleSize: 78, deviations: 2, confidence: 0.95 }).rate / mpBetaQuantile(0.95, 3, 76) - 1)).toBeLessThan(1e-14);
    expect(Math.abs(upperLimit({ sampleSize: 75, deviations: 2, confidence: 0.95 }).rate / mpBetaQuantile(0.95, 3, 73) - 1)).toBeLessThan(1e-14);
    const r = upperLimit({ sampleSize: 75, deviations: 2, confidence: 0.95 });
    expect(r).toMatchObject({ model: 'binomial', sampleSize: 75, deviations: 2, confidence: 0.95 });
    expect(r.rate).toBeCloseTo(0.08157, 5);
    expect(binomialCdf(2, 75, r.rate)).toBeCloseTo(0.05, 12);
  });
  it('k = n gives 1; the Poisson limit is capped at 1', () => {
    expect(upperLimit({ sampleSize: 5, deviations: 5, confidence: 0.95 }).rate).toBe(1);
    expect(upperLimit({ sampleSize: 3, deviations: 2, confidence: 0.95, model: 'poisson' }).rate).toBe(1);
  });
  it('Poisson factor for k = 0 at 95% is 3.00/n (common practice)', () => {
    expect((upperLimit({ sampleSize: 100, deviations: 0, confidence: 0.95, model: 'poisson' }).rate * 100).toFixed(2)).toBe('3.00');
  });
  it('hypergeometric: M* is the largest M whose CDF at k stays above β; the rate is M*/N', () => {
    const r = upperLimit({ sampleSize: 78, deviations: 2, confidence: 0.95, populationSize: 800 });
    const M = r.deviationsInPopulation!;
    expect(r.rate).toBe(M / 800);
    expect(hypergeometricCdf(2, 800, M, 78)).toBeGreaterThan(0.05);
    expect(hypergeometricCdf(2, 800, M + 1, 78)).toBeLessThanOrEqual(0.05);
    expect(upperLimit({ sampleSize: 10, deviations: 10, confidence: 0.9, populationSize: 50 }).deviationsInPopulation).toBe(50);
    expect(upperLimit({ sampleSize: 50, deviations: 3, confidence: 0.9, populationSize: 50 }).deviationsInPopulation).toBe(3);
  });
});

describe('overrelianceRisk, extensionSize, decision', () => {
  it('75 items, 2 deviations, 6% tolerable at 95%: risk above 5%, not supported, and the limit agrees (risk computed with mpmath, committed table)', () => {
    const risk = overrelianceRisk({ sampleSize: 75, deviations: 2, tolerableRate: 0.06 });
    // BinomCDF(2; 75, 0.06) = 0.16497334799710447 (mpmath, 50 digits).
    expect(Math.abs(risk / mpBinomialCdf(2, 75, 0.06) - 1)).toBeLessThan(1e-13);
    expect(risk).toBeCloseTo(binomialCdf(2, 75, 0.06), 15);
    const d = decision({ achievedRisk: risk, confidence: 0.95 });
    expect(d.supported).toBe(false);
    expect(d.allowableRisk).toBeCloseTo(0.05, 15);
    expect(upperLimit({ sampleSize: 75, deviations: 2, confidence: 0.95 }).rate).toBeGreaterThan(0.06);
  });
  it('the extension is the fewest extra items with no further deviations (brute force)', () => {
    const m = extensionSize({ sampleSize: 78, deviations: 2, tolerableRate: 0.06, confidence: 0.95 });
    let brute = 0;
    while (binomialCdf(2, 78 + brute, 0.06) > 0.05) brute++;
    expect(m).toBe(brute);
    expect(m).toBeGreaterThan(0);
    expect(extensionSize({ sampleSize: 78, deviations: 1, tolerableRate: 0.06, confidence: 0.95 })).toBe(0);
  });
  it('extension not practical → NoPracticalSizeError', () => {
    expect(() => extensionSize({ sampleSize: 100, deviations: 60, tolerableRate: 0.005, confidence: 0.95 })).toThrow(NoPracticalSizeError);
    // Deviations already at the tolerable count of a finite population.
    expect(() => extensionSize({ sampleSize: 40, deviations: 3, tolerableRate: 0.05, confidence: 0.95, populationSize: 60 })).toThrow(
      /already reach the tolerable number of deviations/,
    );
  });
  it('decision uses a 1e-12 relative tolerance at β', () => {
    expect(decision({ achievedRisk: 0.05, confidence: 0.95 }).supported).toBe(true);
    expect(decision({ achievedRisk: 0.05 * (1 + 1e-13), confidence: 0.95 }).supported).toBe(true);
    expect(decision({ achievedRisk: 0.05 * (1 + 1e-9), confidence: 0.95 }).supported).toBe(false);
  });
});

describe('planningTable', () => {
  it('rows per expected rate, cells per tolerable rate; null with a note where not practical', () => {
    const t = planningTable({ confidence: 0.95, tolerableRates: [0.02, 0.06], expectedRates: [0, 0.01, 0.02, 0.06] });
    expect(t.model).toBe('binomial');
    expect(t.rows.map((r) => r.expectedRate)).toEqual([0, 0.01, 0.02, 0.06]);
    expect(t.rows[1]!.cells[1]).toEqual({ tolerableRate: 0.06, expectedRate: 0.01, sampleSize: 78, expectedDeviations: 1 });
    expect(t.rows[2]!.cells[0]).toMatchObject({ sampleSize: null, expectedDeviations: null, note: expect.stringMatching(/not below/) });
    expect(t.rows[3]!.cells[1]!.note).toMatch(/not below/);
    const capped = planningTable({ confidence: 0.95, tolerableRates: [0.02], expectedRates: [0.0175, 0.019] });
    expect(capped.rows[1]!.cells[0]).toMatchObject({ sampleSize: null, note: expect.stringMatching(/not practical/) });
  });
  it('defaults to the published grids and honours a population', () => {
    const t = planningTable({ confidence: 0.9, populationSize: 500 });
    expect(t.tolerableRates).toHaveLength(11);
    expect(t.expectedRates).toHaveLength(20);
    expect(t.model).toBe('hypergeometric');
    expect(t.populationSize).toBe(500);
    for (const row of t.rows) for (const c of row.cells) if (c.sampleSize !== null) expect(c.sampleSize).toBeLessThanOrEqual(500);
  });
});

describe('models', () => {
  it('resolveModel: hypergeometric when N is given, else binomial; explicit names honoured', () => {
    expect(resolveModel(undefined, undefined)).toBe('binomial');
    expect(resolveModel(undefined, 100)).toBe('hypergeometric');
    expect(resolveModel('poisson', 100)).toBe('poisson');
  });
});
