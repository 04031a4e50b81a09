/**
 * The engine against an independent reference library from the registry: @stdlib's distribution
 * packages (binomial, hypergeometric and Poisson CDFs; beta and gamma quantiles), over wide grids
 * including N up to 10,000,000 and n up to 10,000. Tolerances are stated beside each check; they
 * reflect the reference's own precision where it is the weaker side (noted). Where @stdlib itself
 * drifts (Poisson means and gamma shapes above about 1,000, populations of 100,000 and more), the
 * arbitrary-precision table of special-functions.test.ts (mpmath) is the second reference.
 */
import stdBetaQuantile from '@stdlib/stats-base-dists-beta-quantile';
import stdBinomialCdf from '@stdlib/stats-base-dists-binomial-cdf';
import stdGammaQuantile from '@stdlib/stats-base-dists-gamma-quantile';
import stdHyperCdf from '@stdlib/stats-base-dists-hypergeometric-cdf';
import stdPoissonCdf from '@stdlib/stats-base-dists-poisson-cdf';
import { describe, expect, it } from 'vitest';
import {
  betaInv,
  binomialCdf,
  expectedDeviations,
  extensionSize,
  gammaInv,
  hypergeometricCdf,
  overrelianceRisk,
  poissonCdf,
  sampleSize,
  tolerableDeviations,
  upperLimit,
  type Model,
} from '../../src/stats/index.js';

const rel = (a: number, b: number): number => (a === b ? 0 : Math.abs(a - b) / Math.max(Math.abs(b), 1e-300));
const pointsUpTo = (n: number, p: number): number[] =>
  [...new Set([0, 1, 2, 3, Math.floor((n * p) / 2), Math.floor(n * p), Math.ceil(n * p) + 1, Math.floor(n / 2), n - 1])].filter(
    (k) => k >= 0 && k <= n,
  );

/** The reference risk of overreliance, from @stdlib. */
function stdRisk(model: Model, n: number, k: number, tdr: number, N?: number): number {
  if (model === 'binomial') return stdBinomialCdf(k, n, tdr);
  if (model === 'poisson') return stdPoissonCdf(k, n * tdr);
  return stdHyperCdf(k, N!, tolerableDeviations(N!, tdr), n);
}

describe('distribution functions vs @stdlib', () => {
  it('binomial CDF: 12 sizes up to 10,000 × 9 rates × up to 9 points, relative 1e-10 (tails down to 1e-300)', () => {
    let cases = 0;
    for (const n of [1, 2, 5, 10, 20, 50, 78, 100, 250, 1000, 5000, 10_000]) {
      for (const p of [0.001, 0.01, 0.02, 0.05, 0.06, 0.1, 0.2, 0.5, 0.9]) {
        for (const k of pointsUpTo(n, p)) {
          const ref = stdBinomialCdf(k, n, p);
          if (ref < 1e-300) continue;
          expect(rel(binomialCdf(k, n, p), ref), `k=${k} n=${n} p=${p}`).toBeLessThan(1e-10);
          cases++;
        }
      }
    }
    expect(cases).toBeGreaterThan(500);
  });

  it('binomial CDF keeps a 1e-54 tail (a 0-deviation risk at n = 1000, p = 11.7%), relative 1e-12', () => {
    const ref = stdBinomialCdf(0, 1000, 0.117);
    expect(ref).toBeGreaterThan(1e-55);
    expect(ref).toBeLessThan(1e-53);
    expect(rel(binomialCdf(0, 1000, 0.117), ref)).toBeLessThan(1e-12);
  });

  it('hypergeometric CDF, N ≤ 100,000: relative 1e-9', () => {
    let cases = 0;
    for (const N of [20, 50, 100, 800, 2500, 5000, 20_000, 100_000]) {
      for (const tdr of [0.02, 0.05, 0.06, 0.1, 0.3]) {
        const M = tolerableDeviations(N, tdr);
        for (const n of [1, 5, 10, 30, 50, 78, 150, 400, 1000, 5000].filter((x) => x <= N)) {
          for (const k of pointsUpTo(n, tdr)) {
            const ref = stdHyperCdf(k, N, M, n);
            if (ref < 1e-300) continue;
            expect(rel(hypergeometricCdf(k, N, M, n), ref), `k=${k} N=${N} M=${M} n=${n}`).toBeLessThan(1e-9);
            cases++;
          }
        }
      }
    }
    expect(cases).toBeGreaterThan(500);
  });

  it('hypergeometric CDF, N up to 10,000,000 and n up to 10,000: relative 1e-6 (the reference forms differences of log-factorials near 1.5e8, which costs it about 8 digits)', () => {
    let cases = 0;
    for (const N of [1_000_000, 3_000_000, 10_000_000]) {
      for (const tdr of [0.01, 0.05, 0.1]) {
        const M = tolerableDeviations(N, tdr);
        for (const n of [1, 20, 93, 500, 2000, 10_000]) {
          for (const k of pointsUpTo(n, tdr)) {
            const ref = stdHyperCdf(k, N, M, n);
            if (ref < 1e-300) continue;
            expect(rel(hypergeometricCdf(k, N, M, n), ref), `k=${k} N=${N} n=${n}`).toBeLessThan(1e-6);
            cases++;
          }
        }
      }
    }
    expect(cases).toBeGreaterThan(100);
  });

  it('Poisson CDF: 12 means up to 1,000 × 13 points, relative 1e-10', () => {
    // Means above about 1,000 are left out: there @stdlib/stats-base-dists-poisson-cdf 0.3.1 drifts
    // (e.g. P(X ≤ 11,900 | 12,000): stdlib 0.18284, ours 0.181928, arbitrary-precision 0.1819279).
    let cases = 0;
    for (const lambda of [0.01, 0.3, 1, 3, 4.68, 10, 50.5, 100, 300, 600, 800, 1000]) {
      for (const k of [0, 1, 2, 5, 10, 50, 100, 300, 500, 700, 850, 1000, 1200]) {
        const ref = stdPoissonCdf(k, lambda);
        if (ref < 1e-300) continue;
        expect(rel(poissonCdf(k, lambda), ref), `k=${k} λ=${lambda}`).toBeLessThan(1e-10);
        cases++;
      }
    }
    expect(cases).toBeGreaterThan(80);
  });

  it('beta quantile: 4 levels × 8 × 8 shapes (real and whole), relative 1e-10', () => {
    for (const p of [0.05, 0.5, 0.9, 0.95]) {
      for (const a of [0.5, 1, 2, 3.7, 10, 101, 1000, 5000]) {
        for (const b of [0.5, 1, 2.5, 9, 50, 500, 2000, 9000]) {
          const ref = stdBetaQuantile(p, a, b);
          expect(rel(betaInv(p, a, b), ref), `p=${p} a=${a} b=${b}`).toBeLessThan(1e-10);
        }
      }
    }
  });

  it('gamma quantile: 4 levels × 13 shapes up to 500, relative 1e-10', () => {
    // Shapes above about 1,000 are left out: there @stdlib/stats-base-dists-gamma-quantile 0.2.3
    // itself is off by ~2e-4 (its own gamma CDF at its answer is 0.9013 for 0.9 at shape 1201).
    // The Poisson limits below check large shapes through the Poisson CDF identity instead.
    for (const p of [0.05, 0.5, 0.9, 0.95]) {
      for (const a of [0.3, 1, 2, 3, 5, 10, 11, 20, 50, 100, 150, 300, 500]) {
        expect(rel(gammaInv(p, a), stdGammaQuantile(p, a, 1)), `p=${p} a=${a}`).toBeLessThan(1e-10);
      }
    }
  });
});

describe('upper deviation limits vs @stdlib', () => {
  it('binomial (Clopper–Pearson) = stdlib BetaQuantile(c; k+1, n−k): 3 levels × thousands of (n, k), absolute 1e-12', () => {
    let cases = 0;
    for (const confidence of [0.9, 0.95, 0.99]) {
      for (const n of [1, 2, 3, 5, 10, 20, 25, 30, 45, 50, 60, 75, 78, 80, 100, 120, 150, 200, 300, 500, 1000, 2500, 10_000]) {
        const ks = n <= 200 ? [...Array(n + 1).keys()] : pointsUpTo(n, 0.05).concat([n]);
        for (const k of ks) {
          const ours = upperLimit({ sampleSize: n, deviations: k, confidence }).rate;
          const ref = k === n ? 1 : stdBetaQuantile(confidence, k + 1, n - k);
          expect(Math.abs(ours - ref), `n=${n} k=${k} c=${confidence}`).toBeLessThan(1e-12);
          cases++;
        }
      }
    }
    expect(cases).toBeGreaterThan(2000);
  });

  it('binomial limit solves stdlib BinomCDF(k; n, p_U) = 1 − c, relative 1e-9', () => {
    for (const confidence of [0.9, 0.95]) {
      for (const [n, k] of [[75, 2], [78, 2], [200, 10], [1000, 30], [10_000, 150]] as const) {
        const pU = upperLimit({ sampleSize: n, deviations: k, confidence }).rate;
        expect(rel(stdBinomialCdf(k, n, pU), 1 - confidence)).toBeLessThan(1e-9);
      }
    }
  });

  it('Poisson (factor) limit = stdlib GammaQuantile(c; k+1)/n for k ≤ 400, and solves stdlib PoissonCDF(k; n·p) = 1 − c up to k = 600', () => {
    // k stops at 600 because both stdlib references drift for means above about 1,000 (see above).
    let cases = 0;
    for (const confidence of [0.9, 0.95]) {
      for (const n of [10, 50, 78, 100, 500, 2000, 10_000]) {
        for (const k of [0, 1, 2, 3, 5, 8, 20, 50, 120, 400, 500, 600].filter((x) => x <= n)) {
          const ours = upperLimit({ sampleSize: n, deviations: k, confidence, model: 'poisson' }).rate;
          const x = stdGammaQuantile(confidence, k + 1, 1);
          if (x / n >= 1) expect(ours).toBe(1);
          else if (k <= 400) expect(rel(ours, x / n), `n=${n} k=${k}`).toBeLessThan(1e-10);
          else expect(rel(stdPoissonCdf(k, ours * n), 1 - confidence), `n=${n} k=${k}`).toBeLessThan(1e-9);
          cases++;
        }
      }
    }
    expect(cases).toBeGreaterThan(100);
  });

  it('hypergeometric count limit M*: stdlib CDF(k; N, M*, n) > β ≥ CDF(k; N, M*+1, n), N up to 10,000,000', () => {
    let cases = 0;
    for (const confidence of [0.9, 0.95]) {
      const beta = 1 - confidence;
      for (const N of [30, 100, 800, 2500, 12_000, 250_000, 10_000_000]) {
        for (const n of [5, 20, 50, 78, 200, 1000, 10_000].filter((x) => x <= N)) {
          for (const k of [...new Set([0, 1, 2, 5, Math.floor(n / 20), Math.floor(n / 4)])].filter((x) => x <= n)) {
            const r = upperLimit({ sampleSize: n, deviations: k, confidence, populationSize: N });
            const M = r.deviationsInPopulation!;
            expect(r.rate).toBe(M / N);
            // Tolerance on the reference side: 1e-6 relative for N ≥ 1e5 (its precision), else 1e-9.
            const tol = N >= 100_000 ? 1e-6 : 1e-9;
            expect(stdHyperCdf(k, N, M, n), `N=${N} n=${n} k=${k}`).toBeGreaterThan(beta * (1 - tol));
            if (M + 1 <= N - (n - k)) {
              expect(stdHyperCdf(k, N, M + 1, n), `N=${N} n=${n} k=${k}`).toBeLessThanOrEqual(beta * (1 + tol));
            }
            cases++;
          }
        }
      }
    }
    expect(cases).toBeGreaterThan(150);
  });
});

describe('risks, sizes and extensions vs @stdlib', () => {
  it('risk of overreliance equals the stdlib CDF for each model', () => {
    let cases = 0;
    for (const tdr of [0.02, 0.05, 0.06, 0.1, 0.2]) {
      for (const n of [10, 49, 78, 150, 1000]) {
        for (const k of [0, 1, 2, 4, 10]) {
          for (const model of ['binomial', 'poisson'] as const) {
            const ref = stdRisk(model, n, k, tdr);
            expect(rel(overrelianceRisk({ sampleSize: n, deviations: k, tolerableRate: tdr, model }), ref)).toBeLessThan(1e-10);
            cases++;
          }
          for (const N of [1000, 50_000, 10_000_000]) {
            const ref = stdRisk('hypergeometric', n, k, tdr, N);
            const tol = N >= 100_000 ? 1e-6 : 1e-9;
            expect(rel(overrelianceRisk({ sampleSize: n, deviations: k, tolerableRate: tdr, populationSize: N }), ref)).toBeLessThan(tol);
            cases++;
          }
        }
      }
    }
    expect(cases).toBeGreaterThan(600);
  });

  it('each size meets the criterion with the stdlib CDF and every smaller size fails it (brute force over all smaller n)', () => {
    const near = (risk: number, beta: number, tol: number): boolean => Math.abs(risk - beta) <= tol * beta;
    let sizes = 0;
    let smaller = 0;
    for (const confidence of [0.9, 0.95]) {
      const beta = 1 - confidence;
      for (const tdr of [0.03, 0.05, 0.06, 0.1, 0.2]) {
        for (const edr of [0, 0.005, 0.01, 0.02, 0.03].filter((e) => e < tdr)) {
          for (const [model, N] of [
            ['binomial', undefined],
            ['poisson', undefined],
            ['hypergeometric', 400],
            ['hypergeometric', 5000],
            ['hypergeometric', 10_000_000],
          ] as const) {
            let r;
            try {
              r = sampleSize({ confidence, tolerableRate: tdr, expectedRate: edr, model, ...(N ? { populationSize: N } : {}) });
            } catch {
              continue; // not practical; covered by unit tests
            }
            if (r.sampleSize > 1500) continue;
            const tol = N !== undefined && N >= 100_000 ? 1e-6 : 1e-9;
            const ref = stdRisk(model, r.sampleSize, r.expectedDeviations, tdr, N);
            expect(ref <= beta || near(ref, beta, tol), `${model} N=${N} c=${confidence} t=${tdr} e=${edr}`).toBe(true);
            expect(r.expectedDeviations).toBe(expectedDeviations(r.sampleSize, edr));
            sizes++;
            for (let m = 1; m < r.sampleSize; m++) {
              const rm = stdRisk(model, m, expectedDeviations(m, edr), tdr, N);
              expect(rm > beta || near(rm, beta, tol), `${model} N=${N} m=${m}`).toBe(true);
              smaller++;
            }
          }
        }
      }
    }
    expect(sizes).toBeGreaterThan(100);
    expect(smaller).toBeGreaterThan(10_000);
  });

  it('each extension is the fewest extra items that reach the planned risk with the stdlib CDF', () => {
    let cases = 0;
    for (const [n, k] of [[78, 2], [75, 2], [59, 1], [49, 1], [100, 3], [25, 0], [150, 5]] as const) {
      for (const tdr of [0.05, 0.06, 0.1]) {
        for (const [model, N] of [
          ['binomial', undefined],
          ['hypergeometric', 1500],
          ['poisson', undefined],
        ] as const) {
          const m = extensionSize({ sampleSize: n, deviations: k, tolerableRate: tdr, confidence: 0.95, model, ...(N ? { populationSize: N } : {}) });
          expect(stdRisk(model, n + m, k, tdr, N)).toBeLessThanOrEqual(0.05 * (1 + 1e-9));
          if (m > 0) expect(stdRisk(model, n + m - 1, k, tdr, N)).toBeGreaterThan(0.05 * (1 - 1e-9));
          cases++;
        }
      }
    }
    expect(cases).toBe(63);
  });
});
