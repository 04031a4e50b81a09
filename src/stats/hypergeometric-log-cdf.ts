import { hyperLogPmf } from './hypergeometric-log-pmf.js';
import { checkHypergeometric, checkInteger } from './validate.js';

/**
 * log P(X ≤ k) for X ~ Hypergeometric(N, M, n), exact for N up to 10,000,000 and beyond.
 *
 * Method: the term at k by {@link hypergeometricLogPmf}, the lower terms by the ratio of
 * successive probabilities P(i−1)/P(i) = i·(N−M−n+i) / ((n−i+1)·(M−i+1)) (it follows from the
 * counting formula C(M, i)·C(N−M, n−i)/C(N, n); common practice, no single source), summed relative to the term at k until they no
 * longer change the sum. When k lies above the mean n·M/N the tails are swapped (deviations and
 * conforming units exchange roles) so the summed terms always decrease; the cost is a few times
 * the standard deviation of X, not k.
 */
export function hypergeometricLogCdf(k: number, N: number, M: number, n: number): number {
  checkInteger('k', k);
  checkHypergeometric(N, M, n);
  return hyperLogCdf(k, N, M, n);
}

/** Unchecked form used inside the engine. */
export function hyperLogCdf(k: number, N: number, M: number, n: number): number {
  if (k < Math.max(0, n - (N - M))) return -Infinity;
  if (k >= Math.min(n, M)) return 0;
  if (k * N > n * M) {
    // P(X ≤ k) = 1 − P(Y ≤ n − k − 1), Y = n − X ~ Hypergeometric(N, N − M, n).
    const logUpper = lowerTail(n - k - 1, N, N - M, n);
    return Math.log1p(-Math.exp(logUpper));
  }
  return lowerTail(k, N, M, n);
}

/** log P(X ≤ k) for k at or below the mean, within the support. */
function lowerTail(k: number, N: number, M: number, n: number): number {
  if (k < Math.max(0, n - (N - M))) return -Infinity;
  const logTop = hyperLogPmf(k, N, M, n);
  const B = N - M;
  let sum = 0;
  let term = 1;
  for (let i = k; i > 0; i--) {
    term *= (i * (B - n + i)) / ((n + 1 - i) * (M + 1 - i));
    if (term <= 0) break;
    sum += term;
    if (term <= 1e-17 * (1 + sum)) break;
  }
  return logTop + Math.log1p(sum);
}
