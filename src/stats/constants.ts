/**
 * Constants of the statistics engine, with the reason for each value.
 */

/**
 * The largest sample size searched for the binomial and Poisson models (and for the sample plus
 * any extension). A size beyond it is reported as not practical. The hypergeometric model is
 * bounded by the population size instead.
 */
export const MAX_SAMPLE_SIZE = 10_000;

/**
 * Relative tolerance on the comparison "achieved risk ≤ β". Risks are computed to about 1e-14
 * relative; a risk within 1e-12 (relative) of β is treated as equal to it, so that an exact tie
 * (for example a hypergeometric probability of exactly 1/20 at 95% confidence) counts as
 * achieving the planned risk whatever the last bit of the floating-point result.
 */
export const RISK_TOLERANCE = 1e-12;

/**
 * Guard against binary noise when a product of a rate and a count is rounded up:
 * ⌈x − 1e-9⌉, so that 100 × 0.07 = 7.000000000000001 gives 7 and not 8.
 */
export const CEIL_GUARD = 1e-9;

/**
 * Tolerable deviation rates of the columns of the published attribute sampling tables
 * (AICPA Audit Sampling guide, sample size tables; from memory): 2–10%, 15%, 20%.
 */
export const DEFAULT_TOLERABLE_RATES: readonly number[] = [
  0.02, 0.03, 0.04, 0.05, 0.06, 0.07, 0.08, 0.09, 0.1, 0.15, 0.2,
];

/**
 * Expected deviation rates of the rows of the published attribute sampling tables
 * (AICPA Audit Sampling guide, sample size tables; from memory): 0–4% in steps of 0.25%, then 5, 6, 7%.
 */
export const DEFAULT_EXPECTED_RATES: readonly number[] = [
  0, 0.0025, 0.005, 0.0075, 0.01, 0.0125, 0.015, 0.0175, 0.02, 0.0225, 0.025, 0.0275, 0.03, 0.0325,
  0.035, 0.0375, 0.04, 0.05, 0.06, 0.07,
];

/**
 * Sample sizes above this get a remark: tests of controls rarely use more items (common
 * practice, no single source; the published attribute sampling tables mark such cells as too
 * large to be cost-effective for most audits).
 */
export const LARGE_SAMPLE_SIZE = 200;
