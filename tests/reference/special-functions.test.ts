/**
 * The engine's special functions and distributions against arbitrary-precision values.
 *
 * Source: tests/reference/tables/special-functions.json, computed with mpmath (version recorded
 * in the file, 50 significant digits, each value rounded once to a double) by
 * scripts/reference/make-tables.py, which names the formula behind every column. The engine
 * uses no library for these functions, so nothing here is compared with itself; this table is
 * also the second reference where @stdlib is weak (Poisson means and gamma shapes above about
 * 1,000, hypergeometric populations of 100,000 and more; see stats-stdlib.test.ts).
 *
 * Tolerances are relative unless stated, a few times the largest error measured when the table
 * was made (given beside each). Deep tails lose about |ln v|·2⁻⁵³ of relative precision in the
 * final exp, which is what sets the larger figures.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { incompleteBeta } from '../../src/stats/incomplete-beta.js';
import { incompleteGamma } from '../../src/stats/incomplete-gamma.js';
import { devianceTerm } from '../../src/stats/deviance-term.js';
import { stirlingError } from '../../src/stats/stirling-error.js';
import { betaInc, betaInv, binomialCdf, gammaInc, gammaInv, hypergeometricCdf, poissonCdf } from '../../src/stats/index.js';

interface Table {
  versions: { mpmath: string; scipy: string };
  betaInc: Array<[x: number, a: number, b: number, lower: number, upper: number]>;
  gammaInc: Array<[x: number, a: number, P: number, Q: number]>;
  stirlingError: Array<[n: number, delta: number]>;
  deviance: Array<[x: number, M: number, D: number]>;
  binomialCdf: Array<[k: number, n: number, p: number, v: number]>;
  poissonCdf: Array<[k: number, lambda: number, v: number]>;
  hypergeometricCdf: Array<[k: number, N: number, M: number, n: number, v: number]>;
  gammaQuantile: Array<[prob: number, a: number, x: number]>;
  betaQuantile: Array<[prob: number, a: number, b: number, x: number]>;
}
const T = JSON.parse(readFileSync(new URL('./tables/special-functions.json', import.meta.url), 'utf8')) as Table;
const rel = (a: number, b: number): number => (a === b ? 0 : Math.abs(a - b) / Math.abs(b));

describe(`special functions vs mpmath ${T.versions.mpmath} (committed table)`, () => {
  it('the table is the one the script writes, with enough rows to mean something', () => {
    expect(T.betaInc.length).toBeGreaterThan(700);
    expect(T.gammaInc.length).toBeGreaterThan(150);
    expect(T.stirlingError.length).toBeGreaterThan(50);
  });

  it('incomplete beta, both tails, 8 × 8 shapes from 0.5 to 9,000 and binomial-tail shapes up to n = 10,000: relative 3e-12 (measured 1.0e-12)', () => {
    let cases = 0;
    for (const [x, a, b, lower, upper] of T.betaInc) {
      const [l, u] = incompleteBeta(x, a, b);
      if (lower > 1e-300) expect(rel(l, lower), `lower x=${x} a=${a} b=${b}`).toBeLessThan(3e-12);
      if (upper > 1e-300) expect(rel(u, upper), `upper x=${x} a=${a} b=${b}`).toBeLessThan(3e-12);
      if (lower > 1e-300) expect(rel(betaInc(x, a, b), lower)).toBeLessThan(3e-12);
      cases++;
    }
    expect(cases).toBeGreaterThan(700);
  });

  it('incomplete gamma P and Q, shapes 0.2 to 10,001, tails to 1e-238: relative 3e-13 (measured 9.6e-14)', () => {
    for (const [x, a, P, Q] of T.gammaInc) {
      const [p, q] = incompleteGamma(x, a);
      if (P > 1e-300) expect(rel(p, P), `P x=${x} a=${a}`).toBeLessThan(3e-13);
      if (Q > 1e-300) expect(rel(q, Q), `Q x=${x} a=${a}`).toBeLessThan(3e-13);
      if (P > 1e-300) expect(rel(gammaInc(x, a), P)).toBeLessThan(3e-13);
    }
  });

  it("Stirling's error at half-integers to 20 and real n to 1e9: absolute 3e-15 (measured 8.9e-16), relative 2e-13 (measured 4.6e-14)", () => {
    for (const [n, d] of T.stirlingError) {
      expect(Math.abs(stirlingError(n) - d), `n=${n}`).toBeLessThan(3e-15);
      expect(rel(stirlingError(n), d), `n=${n}`).toBeLessThan(2e-13);
    }
  });

  it('deviance term from x = M·(1 ± 1e-8) to x = 101·M, M from 0.5 to 1e7: relative 2e-15 (measured 3.8e-16)', () => {
    for (const [x, M, D] of T.deviance) {
      if (D === 0) expect(devianceTerm(x, M)).toBe(0);
      else expect(rel(devianceTerm(x, M), D), `x=${x} M=${M}`).toBeLessThan(2e-15);
    }
  });

  it('binomial CDF, n up to 10,000: relative 5e-13 (measured 1.3e-13)', () => {
    for (const [k, n, p, v] of T.binomialCdf) expect(rel(binomialCdf(k, n, p), v), `k=${k} n=${n} p=${p}`).toBeLessThan(5e-13);
  });

  it('Poisson CDF including means of 3,000 and 12,000, where @stdlib drifts: relative 5e-14 (measured 5.4e-15)', () => {
    for (const [k, lambda, v] of T.poissonCdf) expect(rel(poissonCdf(k, lambda), v), `k=${k} λ=${lambda}`).toBeLessThan(5e-14);
  });

  it('hypergeometric CDF, N up to 10,000,000 (where @stdlib gives about 6 digits): relative 1e-13 (measured 2.6e-14)', () => {
    for (const [k, N, M, n, v] of T.hypergeometricCdf) expect(rel(hypergeometricCdf(k, N, M, n), v), `k=${k} N=${N} M=${M} n=${n}`).toBeLessThan(1e-13);
  });

  it('gamma quantile for shapes up to 10,001 (where @stdlib is off by ~2e-4): relative 1e-14 (measured 9.9e-16)', () => {
    for (const [p, a, x] of T.gammaQuantile) expect(rel(gammaInv(p, a), x), `p=${p} a=${a}`).toBeLessThan(1e-14);
  });

  it('beta quantile (Clopper–Pearson limits) up to a + b = 10,001: relative 2e-14 (measured 4.9e-15)', () => {
    for (const [p, a, b, x] of T.betaQuantile) expect(rel(betaInv(p, a, b), x), `p=${p} a=${a} b=${b}`).toBeLessThan(2e-14);
  });
});
