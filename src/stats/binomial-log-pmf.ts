import { logBinomialDensity } from './log-binomial-density.js';
import { checkCount, checkInteger, checkProbability } from './validate.js';

/**
 * log P(X = k) for X ~ Binomial(n, p).
 *
 * Method: Loader's saddle-point expansion ({@link logBinomialDensity}; C. Loader, "Fast and
 * Accurate Computation of Binomial Probabilities", 2000). −Infinity outside 0..n.
 */
export function binomialLogPmf(k: number, n: number, p: number): number {
  checkInteger('k', k);
  checkCount('n', n);
  checkProbability('p', p);
  if (k < 0 || k > n) return -Infinity;
  return logBinomialDensity(k, n, p, 1 - p);
}
