import { ceilGuarded } from './expected-deviations.js';
import { withinRisk } from './within-risk.js';

/**
 * The smallest n in 1..cap with risk(n, k_e(n)) ≤ β, where k_e(n) = ⌈n·EDR⌉; undefined if none.
 *
 * Method (exact search, not an approximation): the risk is not monotone in n because k_e jumps,
 * but within a run of sizes sharing the same k_e it falls as n grows (one more item can only add
 * deviations). So the runs are visited in order; a run passes iff its last size passes, and the
 * first passing run is searched by bisection for its first passing size. This returns exactly
 * what testing n = 1, 2, 3, … in turn would return, at a cost of about (n·EDR + log n) risk
 * evaluations. `stopAt` ends the search early when k_e reaches a count that can never pass
 * (the tolerable deviations in a finite population). Internal.
 */
export function smallestSampleSize(
  risk: (n: number, k: number) => number,
  expectedRate: number,
  beta: number,
  cap: number,
  stopAt = Infinity,
): { sampleSize: number; expectedDeviations: number; achievedRisk: number } | undefined {
  const ke = (n: number): number => ceilGuarded(n * expectedRate);
  let a = 1;
  while (a <= cap) {
    const k = ke(a);
    if (k >= stopAt) return undefined;
    let b: number;
    if (expectedRate === 0) {
      b = cap;
    } else {
      b = Math.min(cap, Math.max(a, Math.floor((k + 1e-9) / expectedRate)));
      while (b > a && ke(b) !== k) b--;
      while (b < cap && ke(b + 1) === k) b++;
    }
    if (withinRisk(risk(b, k), beta)) {
      let lo = a;
      let hi = b;
      while (lo < hi) {
        const mid = Math.floor((lo + hi) / 2);
        if (withinRisk(risk(mid, k), beta)) hi = mid;
        else lo = mid + 1;
      }
      return { sampleSize: lo, expectedDeviations: k, achievedRisk: risk(lo, k) };
    }
    a = b + 1;
  }
  return undefined;
}
