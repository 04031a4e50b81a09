import { CEIL_GUARD } from './constants.js';
import { ceilTimes } from './exact-rate.js';
import { checkCount, checkRate } from './validate.js';

/**
 * Expected deviations at planning, k_e = ⌈n·EDR⌉ — the convention that reproduces the published
 * attribute sampling tables (AICPA Audit Sampling guide, sample size tables: the figure in
 * parentheses). Computed exactly from the rate's decimal digits ({@link ceilTimes}), so binary
 * noise (100 × 0.07 = 7.000000000000001 in floating point) never adds a deviation.
 */
export function expectedDeviations(sampleSize: number, expectedRate: number): number {
  checkCount('sampleSize', sampleSize, 0);
  checkRate('expectedRate', expectedRate, true);
  return ceilTimes(sampleSize, expectedRate);
}

/** ⌈x − 1e-9⌉, never negative: for quotients that are not a count times a rate (n / (1 + n/N)). Internal. */
export function ceilGuarded(x: number): number {
  return Math.max(0, Math.ceil(x - CEIL_GUARD));
}
