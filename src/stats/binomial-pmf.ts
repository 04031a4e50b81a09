import { binomialLogPmf } from './binomial-log-pmf.js';

/**
 * P(X = k) for X ~ Binomial(n, p): exp of {@link binomialLogPmf} (Loader's method, 2000).
 * Values below about 1e-308 underflow to 0; use the log form for them.
 */
export function binomialPmf(k: number, n: number, p: number): number {
  return Math.exp(binomialLogPmf(k, n, p));
}
