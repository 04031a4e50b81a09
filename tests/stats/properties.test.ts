/**
 * Properties of the engine checked on random inputs with fast-check. Each property is a fact of
 * attribute sampling theory as set out in README, "How the figures are computed" (common practice,
 * no single source).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { NoPracticalSizeError } from '../../src/errors.js';
import {
  decision,
  expectedDeviations,
  extensionSize,
  overrelianceRisk,
  sampleSize,
  tolerableDeviations,
  upperLimit,
} from '../../src/stats/index.js';

const confidenceArb = fc.constantFrom(0.8, 0.9, 0.95, 0.99);
/** Rates on a 0.25% grid, as planners type them. */
const rateArb = (minQ: number, maxQ: number) => fc.integer({ min: minQ, max: maxQ }).map((q) => q / 400);

describe('upper deviation limit', () => {
  it('rises with the deviations and falls with the sample size (binomial and Poisson: strictly)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 2, max: 3000 }), fc.nat(), confidenceArb, fc.constantFrom('binomial', 'poisson'), (n, kRaw, c, model) => {
        const k = kRaw % (n - 1);
        const at = (nn: number, kk: number) => upperLimit({ sampleSize: nn, deviations: kk, confidence: c, model }).rate;
        const base = at(n, k);
        if (base < 1) expect(at(n, k + 1)).toBeGreaterThan(base);
        else expect(at(n, k + 1)).toBe(1);
        if (base < 1) expect(at(n + 1, k)).toBeLessThan(base);
      }),
      { numRuns: 300 },
    );
  });

  it('hypergeometric: M* does not fall with k and does not rise with n', () => {
    fc.assert(
      fc.property(fc.integer({ min: 20, max: 5_000_000 }), fc.integer({ min: 2, max: 800 }), fc.nat(), confidenceArb, (N, nRaw, kRaw, c) => {
        const n = Math.min(nRaw, N - 1);
        const k = kRaw % n;
        const M = (nn: number, kk: number) =>
          upperLimit({ sampleSize: nn, deviations: kk, confidence: c, populationSize: N }).deviationsInPopulation!;
        const base = M(n, k);
        expect(M(n, k + 1)).toBeGreaterThanOrEqual(base);
        expect(M(n + 1, k)).toBeLessThanOrEqual(base);
        expect(base).toBeGreaterThanOrEqual(k);
      }),
      { numRuns: 200 },
    );
  });
});

describe('decision from the limit and from the risk agree', () => {
  it('binomial: risk ≤ β ⟺ p_U ≤ TDR (away from a 1e-9 band at the boundary)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2000 }), fc.nat(), rateArb(1, 120), confidenceArb, (n, kRaw, tdr, c) => {
        const k = kRaw % (n + 1);
        const limit = upperLimit({ sampleSize: n, deviations: k, confidence: c }).rate;
        const risk = overrelianceRisk({ sampleSize: n, deviations: k, tolerableRate: tdr });
        const supported = decision({ achievedRisk: risk, confidence: c }).supported;
        if (Math.abs(limit - tdr) > 1e-9) expect(supported).toBe(limit <= tdr);
      }),
      { numRuns: 1000 },
    );
  });

  it('hypergeometric: risk ≤ β ⟺ M* < ⌈TDR·N⌉ (exactly)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 10, max: 10_000_000 }), fc.integer({ min: 1, max: 1500 }), fc.nat(), rateArb(1, 120), confidenceArb, (N, nRaw, kRaw, tdr, c) => {
        const n = Math.min(nRaw, N);
        const k = kRaw % (n + 1);
        const r = upperLimit({ sampleSize: n, deviations: k, confidence: c, populationSize: N });
        const risk = overrelianceRisk({ sampleSize: n, deviations: k, tolerableRate: tdr, populationSize: N });
        const supported = decision({ achievedRisk: risk, confidence: c }).supported;
        expect(supported).toBe(r.deviationsInPopulation! < tolerableDeviations(N, tdr));
      }),
      { numRuns: 1000 },
    );
  });
});

describe('sample size', () => {
  it('is minimal: the size passes at its k_e and every smaller size fails at its own k_e', () => {
    fc.assert(
      fc.property(
        confidenceArb,
        rateArb(4, 80),
        rateArb(0, 40),
        fc.option(fc.integer({ min: 30, max: 10_000_000 }), { nil: undefined }),
        fc.constantFrom(undefined, 'poisson' as const),
        (c, tdr, edrRaw, N, poisson) => {
          const edr = Math.min(edrRaw, tdr - 0.0025);
          const model = N === undefined ? (poisson ?? 'binomial') : 'hypergeometric';
          let r;
          try {
            r = sampleSize({ confidence: c, tolerableRate: tdr, expectedRate: edr, model, ...(N !== undefined ? { populationSize: N } : {}) });
          } catch (e) {
            expect(e).toBeInstanceOf(NoPracticalSizeError);
            return;
          }
          fc.pre(r.sampleSize <= 600);
          const beta = 1 - c;
          const risk = (n: number) =>
            overrelianceRisk({ sampleSize: n, deviations: expectedDeviations(n, edr), tolerableRate: tdr, model, ...(N !== undefined ? { populationSize: N } : {}) });
          expect(r.expectedDeviations).toBe(expectedDeviations(r.sampleSize, edr));
          expect(decision({ achievedRisk: risk(r.sampleSize), confidence: c }).supported).toBe(true);
          for (let m = 1; m < r.sampleSize; m++) expect(risk(m)).toBeGreaterThan(beta * (1 + 1e-12));
        },
      ),
      { numRuns: 250 },
    );
  });

  it('hypergeometric size ≤ binomial size for the same plan', () => {
    fc.assert(
      fc.property(confidenceArb, rateArb(4, 80), rateArb(0, 40), fc.integer({ min: 10, max: 10_000_000 }), (c, tdr, edrRaw, N) => {
        const edr = Math.min(edrRaw, tdr - 0.0025);
        let b;
        try {
          b = sampleSize({ confidence: c, tolerableRate: tdr, expectedRate: edr });
        } catch {
          return; // no binomial size within the cap; nothing to compare
        }
        let h;
        try {
          h = sampleSize({ confidence: c, tolerableRate: tdr, expectedRate: edr, populationSize: N });
        } catch (e) {
          // Only a tiny population with ⌈N·EDR⌉ = ⌈N·TDR⌉ has no hypergeometric size.
          expect(e).toBeInstanceOf(NoPracticalSizeError);
          expect(expectedDeviations(N, edr)).toBe(tolerableDeviations(N, tdr));
          return;
        }
        expect(h.sampleSize).toBeLessThanOrEqual(b.sampleSize);
        expect(h.finitePopulationCorrection?.binomialSampleSize).toBe(b.sampleSize);
      }),
      { numRuns: 400 },
    );
  });
});

describe('extension', () => {
  it('is the fewest extra items: n + m passes with k deviations and n + m − 1 does not', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 400 }), fc.nat(), rateArb(8, 80), confidenceArb, fc.option(fc.integer({ min: 500, max: 100_000 }), { nil: undefined }), (n, kRaw, tdr, c, N) => {
        const k = kRaw % Math.min(n + 1, 6);
        const pop = N !== undefined ? { populationSize: N } : {};
        let m;
        try {
          m = extensionSize({ sampleSize: n, deviations: k, tolerableRate: tdr, confidence: c, ...pop });
        } catch (e) {
          expect(e).toBeInstanceOf(NoPracticalSizeError);
          return;
        }
        const ok = (size: number) =>
          decision({ achievedRisk: overrelianceRisk({ sampleSize: size, deviations: k, tolerableRate: tdr, ...pop }), confidence: c }).supported;
        expect(ok(n + m)).toBe(true);
        if (m > 0) expect(ok(n + m - 1)).toBe(false);
      }),
      { numRuns: 400 },
    );
  });
});
