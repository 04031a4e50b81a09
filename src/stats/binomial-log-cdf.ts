import { logBinomialDensity } from './log-binomial-density.js';
import { checkCount, checkInteger, checkProbability } from './validate.js';

/**
 * log P(X ≤ k) for X ~ Binomial(n, p), in log space so that tails such as 1e-54 or 1e-300 keep
 * full relative precision.
 *
 * Method: the term at k by Loader's expansion (C. Loader, 2000; {@link logBinomialDensity}), then
 * the lower terms by the ratio of successive probabilities P(i−1)/P(i) = i·q / ((n−i+1)·p),
 * summed relative to the term at k until they no longer change the sum; log CDF = log P(k) +
 * log1p(Σ). When k lies above the mean the tails are swapped (P(X ≤ k) = 1 − P(n − X ≤ n − k − 1))
 * so the summed terms always decrease (common practice, no single source).
 */
export function binomialLogCdf(k: number, n: number, p: number): number {
  checkInteger('k', k);
  checkCount('n', n);
  checkProbability('p', p);
  if (k < 0) return -Infinity;
  if (k >= n) return 0;
  const q = 1 - p;
  if (p === 0) return 0;
  if (q === 0) return -Infinity;
  if (k <= n * p) return lowerTail(k, n, p, q);
  // Upper tail P(X ≥ k + 1) = P(Y ≤ n − k − 1) with Y = n − X ~ Binomial(n, q).
  const logUpper = lowerTail(n - k - 1, n, q, p);
  return Math.log1p(-Math.exp(logUpper));
}

/** log P(X ≤ k) for 0 ≤ k ≤ n·p, k < n. */
function lowerTail(k: number, n: number, p: number, q: number): number {
  const logTop = logBinomialDensity(k, n, p, q);
  let sum = 0;
  let term = 1;
  for (let i = k; i > 0; i--) {
    term *= (i * q) / ((n - i + 1) * p);
    sum += term;
    if (term <= 1e-17 * (1 + sum)) break;
  }
  return logTop + Math.log1p(sum);
}
