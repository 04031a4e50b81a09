/**
 * The whole-population risk of overreliance that combinedUpperLimit gives with a tolerable rate
 * (the worst allocation's P(T ≤ t) at ⌈TDR·N⌉), against outside references: for one part it is
 * the hypergeometric CDF of @stdlib/stats-base-dists-hypergeometric-cdf (a named reference
 * library); for two parts with no deviation in either, the worst allocation is computed here by
 * brute force over every split with that library's CDF, independently of the search in src/.
 */
import stdHyperCdf from '@stdlib/stats-base-dists-hypergeometric-cdf';
import { describe, expect, it } from 'vitest';
import { combinedUpperLimit, tolerableDeviations } from '../../src/stats/index.js';

const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);

describe('combinedUpperLimit: the risk of overreliance over the whole population', () => {
  it('one part: the hypergeometric CDF at the tolerable count (@stdlib), relative 1e-9', () => {
    for (const [N, n, k, t] of [[1000, 88, 1, 0.05], [600, 74, 1, 0.06], [400, 72, 0, 0.06], [300, 40, 2, 0.1]] as const) {
      const c = combinedUpperLimit({ parts: [{ populationSize: N, sampleSize: n, deviations: k }], confidence: 0.95, tolerableRate: t });
      const Mt = tolerableDeviations(N, t);
      const expected = stdHyperCdf(k, N, Mt, n); // @stdlib: P(X ≤ k) drawing n from N with Mt marked
      expect(rel(c.achievedRisk!, expected), `${N} ${n} ${k} ${t}`).toBeLessThan(1e-9);
      // The conservative risk at one part is the same test at confidence 1 − β'/1: never below the exact one.
      expect(c.conservativeRisk!).toBeGreaterThanOrEqual(c.achievedRisk! - 1e-9);
    }
  });

  it('two parts, no deviation in either: the largest P(X1 = 0)·P(X2 = 0) over every split of ⌈TDR·N⌉ (@stdlib, brute force)', () => {
    for (const [N1, n1, N2, n2, t] of [[600, 74, 400, 72, 0.06], [600, 40, 400, 30, 0.08], [200, 20, 150, 15, 0.1]] as const) {
      const Mt = tolerableDeviations(N1 + N2, t);
      let worst = 0;
      for (let m1 = Math.max(0, Mt - N2); m1 <= Math.min(N1, Mt); m1++) {
        worst = Math.max(worst, stdHyperCdf(0, N1, m1, n1) * stdHyperCdf(0, N2, Mt - m1, n2));
      }
      const c = combinedUpperLimit({ parts: [{ populationSize: N1, sampleSize: n1, deviations: 0 }, { populationSize: N2, sampleSize: n2, deviations: 0 }], confidence: 0.95, tolerableRate: t });
      expect(rel(c.achievedRisk!, worst), `${N1} ${n1} ${N2} ${n2}`).toBeLessThan(1e-9);
      expect(c.supported).toBe(worst <= 0.05);
    }
  });
});
