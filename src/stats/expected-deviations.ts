import { CEIL_GUARD } from './constants.js';
import { checkCount, checkRate } from './validate.js';

/**
 * Expected deviations at planning, k_e = ⌈n·EDR⌉ — the convention that reproduces the published
 * attribute sampling tables (AICPA Audit Sampling guide, sample size tables: the figure in
 * parentheses). Computed as ⌈n·EDR − 1e-9⌉ so that binary noise (100 × 0.07 = 7.000000000000001)
 * does not add a deviation.
 */
export function expectedDeviations(sampleSize: number, expectedRate: number): number {
  checkCount('sampleSize', sampleSize, 0);
  checkRate('expectedRate', expectedRate, true);
  return ceilGuarded(sampleSize * expectedRate);
}

/** ⌈x − 1e-9⌉, never negative. Internal. */
export function ceilGuarded(x: number): number {
  return Math.max(0, Math.ceil(x - CEIL_GUARD));
}
