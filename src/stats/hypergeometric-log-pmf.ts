import { logBinomialDensity } from './log-binomial-density.js';
import { checkHypergeometric, checkInteger } from './validate.js';

/**
 * log P(X = k) for X ~ Hypergeometric(N, M, n): k deviations in a sample of n drawn without
 * replacement from N units of which M are deviations.
 *
 * Method: the ratio of three binomial densities (C. Loader, "Fast and Accurate Computation of
 * Binomial Probabilities", 2000): for any 0 < p < 1,
 * C(M, k)·C(N−M, n−k)/C(N, n) = b(k; M, p)·b(n−k; N−M, p) / b(n; N, p), because the powers of p
 * and q = 1 − p cancel; p = n/N puts each density near its mode. Each is by
 * {@link logBinomialDensity}. Full
 * relative precision for N in the tens of millions, where differences of log-factorials would
 * lose about eight digits.
 */
export function hypergeometricLogPmf(k: number, N: number, M: number, n: number): number {
  checkInteger('k', k);
  checkHypergeometric(N, M, n);
  return hyperLogPmf(k, N, M, n);
}

/** Unchecked form used inside the engine. */
export function hyperLogPmf(k: number, N: number, M: number, n: number): number {
  if (k < Math.max(0, n - (N - M)) || k > Math.min(n, M)) return -Infinity;
  if (n === 0 || n === N) return 0; // the support is a single point here
  const p = n / N;
  const q = (N - n) / N;
  return logBinomialDensity(k, M, p, q) + logBinomialDensity(n - k, N - M, p, q) - logBinomialDensity(n, N, p, q);
}
