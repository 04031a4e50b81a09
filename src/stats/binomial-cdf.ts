import { binomialLogCdf } from './binomial-log-cdf.js';

/**
 * P(X ≤ k) for X ~ Binomial(n, p): exp of {@link binomialLogCdf} (Loader's terms summed in
 * log space; no factorials, no premature underflow).
 */
export function binomialCdf(k: number, n: number, p: number): number {
  return Math.exp(binomialLogCdf(k, n, p));
}
