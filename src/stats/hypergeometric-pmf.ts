import { hypergeometricLogPmf } from './hypergeometric-log-pmf.js';

/** P(X = k) for X ~ Hypergeometric(N, M, n): exp of {@link hypergeometricLogPmf} (Loader's method). */
export function hypergeometricPmf(k: number, N: number, M: number, n: number): number {
  return Math.exp(hypergeometricLogPmf(k, N, M, n));
}
