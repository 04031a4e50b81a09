import { SamplingInputError } from '../errors.js';
import { logPoissonDensity } from './log-poisson-density.js';
import { checkInteger, checkNumber } from './validate.js';

/**
 * log P(X ≤ k) for X ~ Poisson(λ), in log space.
 *
 * Method: the term at k by Loader's expansion (C. Loader, 2000), then the lower terms by the
 * ratio P(i−1)/P(i) = i/λ, summed relative to the term at k until they no longer change the sum.
 * Above the mean, 1 − the upper tail, whose terms P(i+1)/P(i) = λ/(i+1) decrease from k + 1
 * (summing by the ratio of successive terms: common practice, no single source).
 */
export function poissonLogCdf(k: number, lambda: number): number {
  checkInteger('k', k);
  checkNumber('lambda', lambda);
  if (lambda < 0) throw new SamplingInputError('lambda', `lambda must be 0 or more; got ${lambda}.`);
  if (k < 0) return -Infinity;
  if (lambda === 0) return 0;
  if (k <= lambda) {
    const logTop = logPoissonDensity(k, lambda);
    let sum = 0;
    let term = 1;
    for (let i = k; i > 0; i--) {
      term *= i / lambda;
      sum += term;
      if (term <= 1e-17 * (1 + sum)) break;
    }
    return logTop + Math.log1p(sum);
  }
  const logFirst = logPoissonDensity(k + 1, lambda);
  let sum = 0;
  let term = 1;
  for (let i = k + 1; ; i++) {
    term *= lambda / (i + 1);
    sum += term;
    if (term <= 1e-17 * (1 + sum)) break;
  }
  return Math.log1p(-Math.exp(logFirst + Math.log1p(sum)));
}
