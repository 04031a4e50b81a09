import { hypergeometricLogCdf } from './hypergeometric-log-cdf.js';

/** P(X ≤ k) for X ~ Hypergeometric(N, M, n): exp of {@link hypergeometricLogCdf}. */
export function hypergeometricCdf(k: number, N: number, M: number, n: number): number {
  return Math.exp(hypergeometricLogCdf(k, N, M, n));
}
