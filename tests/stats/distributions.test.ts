/**
 * Distribution functions against closed forms and identities of probability theory
 * (common practice, no single source), plus arbitrary-precision values noted beside each.
 * The wide comparisons with a reference library are in tests/reference/stats-stdlib.test.ts.
 */
import { describe, expect, it } from 'vitest';
import {
  betaInc,
  betaInv,
  binomialCdf,
  binomialLogCdf,
  binomialLogPmf,
  binomialPmf,
  gammaInc,
  gammaInv,
  hypergeometricCdf,
  hypergeometricLogCdf,
  hypergeometricPmf,
  logGamma,
  poissonCdf,
  poissonLogCdf,
  poissonPmf,
} from '../../src/stats/index.js';

const rel = (a: number, b: number): number => (a === b ? 0 : Math.abs(a - b) / Math.abs(b));
const logFactorial = (n: number): number => {
  let s = 0;
  for (let i = 2; i <= n; i++) s += Math.log(i);
  return s;
};

describe('logGamma', () => {
  it('matches log((x−1)!) at whole numbers and log √π at ½ (identities)', () => {
    for (const n of [1, 2, 3, 5, 10, 20, 50, 170]) expect(Math.abs(logGamma(n) - logFactorial(n - 1))).toBeLessThan(1e-12 * Math.max(1, logFactorial(n - 1)));
    expect(rel(logGamma(0.5), 0.5 * Math.log(Math.PI))).toBeLessThan(1e-14);
    expect(rel(logGamma(1.5), Math.log(Math.sqrt(Math.PI) / 2))).toBeLessThan(1e-13);
  });
  it('returns NaN outside its domain', () => {
    expect(logGamma(0)).toBeNaN();
    expect(logGamma(-1)).toBeNaN();
  });
});

describe('binomial', () => {
  it('PMF sums to 1 and the CDF is the running sum (identity)', () => {
    for (const [n, p] of [[10, 0.3], [78, 0.06], [500, 0.02], [1000, 0.5]] as const) {
      let run = 0;
      for (let k = 0; k <= n; k++) {
        run += binomialPmf(k, n, p);
        if (run > 1e-200 && run < 1 - 1e-9) expect(rel(binomialCdf(k, n, p), run)).toBeLessThan(1e-11);
      }
      expect(Math.abs(run - 1)).toBeLessThan(1e-12);
    }
  });
  it('k = 0 is (1 − p)^n, including tails near 1e-54 and 1e-216 (closed form)', () => {
    expect(rel(binomialCdf(0, 1000, 0.117), Math.exp(1000 * Math.log1p(-0.117)))).toBeLessThan(1e-12);
    expect(binomialCdf(0, 1000, 0.117)).toBeGreaterThan(1e-55);
    expect(rel(binomialLogCdf(0, 10_000, 0.05), 10_000 * Math.log1p(-0.05))).toBeLessThan(1e-13);
    expect(rel(binomialLogPmf(10_000, 10_000, 0.5), 10_000 * Math.log(0.5))).toBeLessThan(1e-13);
  });
  it('small cases by hand: P(X ≤ 1 | 3, ½) = ½, PMF(2; 4, ½) = 6/16 (direct enumeration)', () => {
    expect(rel(binomialCdf(1, 3, 0.5), 0.5)).toBeLessThan(1e-15);
    expect(rel(binomialPmf(2, 4, 0.5), 6 / 16)).toBeLessThan(1e-15);
  });
  it('edges: k < 0 → 0, k ≥ n → 1, p = 0 and p = 1', () => {
    expect(binomialCdf(-1, 10, 0.2)).toBe(0);
    expect(binomialCdf(10, 10, 0.2)).toBe(1);
    expect(binomialCdf(0, 10, 0)).toBe(1);
    expect(binomialCdf(9, 10, 1)).toBe(0);
    expect(binomialPmf(11, 10, 0.2)).toBe(0);
  });
  it('the binomial tail equals the incomplete beta: P(X ≤ k) = 1 − I_p(k+1, n−k) (identity)', () => {
    for (const [k, n, p] of [[2, 78, 0.06], [10, 200, 0.03], [150, 10_000, 0.02]] as const) {
      expect(rel(binomialCdf(k, n, p), 1 - betaInc(p, k + 1, n - k))).toBeLessThan(1e-11);
    }
  });
});

describe('hypergeometric', () => {
  it('PMF sums to 1 and matches the counting formula for small N (direct enumeration)', () => {
    const choose = (a: number, b: number): number => {
      let r = 1;
      for (let i = 1; i <= b; i++) r = (r * (a - b + i)) / i;
      return r;
    };
    const N = 40;
    const M = 7;
    const n = 12;
    let sum = 0;
    for (let k = 0; k <= n; k++) {
      const exact = (choose(M, k) * choose(N - M, n - k)) / choose(N, n);
      const p = hypergeometricPmf(k, N, M, n);
      if (exact > 0) expect(rel(p, exact)).toBeLessThan(1e-12);
      else expect(p).toBe(0);
      sum += p;
      if (k < n) expect(Math.abs(hypergeometricCdf(k, N, M, n) - Math.min(1, sum))).toBeLessThan(1e-13);
    }
    expect(Math.abs(sum - 1)).toBeLessThan(1e-13);
  });
  it('k = 0 is the product Π (N−M−i)/(N−i) for N = 10,000,000 (closed form)', () => {
    const N = 10_000_000;
    const M = 500_000;
    const n = 93;
    let logP = 0;
    for (let i = 0; i < n; i++) logP += Math.log1p(-M / (N - i));
    expect(rel(hypergeometricLogCdf(0, N, M, n), logP)).toBeLessThan(1e-12);
  });
  it('an exact rational value: P(X = 0 | N = 20, M = 1, n = 19) = 1/20 (direct enumeration)', () => {
    expect(rel(hypergeometricCdf(0, 20, 1, 19), 0.05)).toBeLessThan(1e-14);
  });
  it('edges: below the support 0, at or above min(n, M) 1, n = N a point mass', () => {
    expect(hypergeometricCdf(0, 10, 8, 5)).toBe(0); // at least 3 deviations must be drawn
    expect(hypergeometricCdf(3, 100, 3, 50)).toBe(1);
    expect(hypergeometricPmf(4, 10, 4, 10)).toBe(1);
    expect(hypergeometricCdf(3, 10, 4, 10)).toBe(0);
  });
  it('approaches the binomial for a huge population (limit theorem)', () => {
    expect(rel(hypergeometricCdf(3, 10_000_000, 600_000, 100), binomialCdf(3, 100, 0.06))).toBeLessThan(1e-3);
  });
});

describe('Poisson', () => {
  it('k = 0 is e^(−λ); the PMF sums to 1 (closed form, identity)', () => {
    for (const lambda of [0.1, 3, 50, 700]) {
      expect(rel(poissonLogCdf(0, lambda), -lambda)).toBeLessThan(1e-14);
      let s = 0;
      for (let k = 0; k < lambda * 3 + 50; k++) s += poissonPmf(k, lambda);
      expect(Math.abs(s - 1)).toBeLessThan(1e-12);
    }
    expect(poissonCdf(5, 0)).toBe(1);
  });
  it('the Poisson tail equals the upper incomplete gamma: P(X ≤ k) = 1 − P(k+1, λ) (identity)', () => {
    for (const [k, lambda] of [[0, 3], [2, 4.68], [40, 55.5], [600, 650]] as const) {
      expect(rel(poissonCdf(k, lambda), 1 - gammaInc(lambda, k + 1))).toBeLessThan(1e-11);
    }
  });
});

describe('beta and gamma inverses', () => {
  it('invert the incomplete functions to about 1e-13 (round trip)', () => {
    for (const p of [1e-6, 0.05, 0.5, 0.9, 0.95, 0.999]) {
      for (const [a, b] of [[0.5, 0.5], [1, 1], [3, 76], [101, 9900], [0.3, 20], [5000, 5000]] as const) {
        const x = betaInv(p, a, b);
        const back = p > 0.5 ? 1 - betaInc(x, a, b) : betaInc(x, a, b);
        expect(rel(back, p > 0.5 ? 1 - p : p), `p=${p} a=${a} b=${b}`).toBeLessThan(1e-9);
      }
      for (const a of [0.2, 1, 3, 51, 1201, 9000]) {
        const x = gammaInv(p, a);
        const back = p > 0.5 ? 1 - gammaInc(x, a) : gammaInc(x, a);
        expect(rel(back, p > 0.5 ? 1 - p : p), `p=${p} a=${a}`).toBeLessThan(1e-9);
      }
    }
  });
  it('closed forms: BetaInv(c; 1, n) = 1 − (1−c)^(1/n), GammaInv(c; 1) = −ln(1−c) (3.00 at 95%, common practice)', () => {
    for (const n of [1, 29, 59, 149, 10_000]) expect(rel(betaInv(0.95, 1, n), 1 - 0.05 ** (1 / n))).toBeLessThan(1e-12);
    expect(rel(gammaInv(0.95, 1), -Math.log(0.05))).toBeLessThan(1e-14);
    expect(gammaInv(0.95, 1).toFixed(2)).toBe('3.00');
  });
  it('edges: levels 0 and 1', () => {
    expect(betaInv(0, 2, 3)).toBe(0);
    expect(betaInv(1, 2, 3)).toBe(1);
    expect(gammaInv(0, 2)).toBe(0);
    expect(gammaInv(1, 2)).toBe(Infinity);
  });
});
