import { logPoissonDensity } from './log-poisson-density.js';
import { checkInteger, checkNumber } from './validate.js';
import { SamplingInputError } from '../errors.js';

/**
 * log P(X = k) for X ~ Poisson(λ).
 *
 * Method: Loader's saddle-point expansion ({@link logPoissonDensity}; C. Loader, 2000).
 */
export function poissonLogPmf(k: number, lambda: number): number {
  checkInteger('k', k);
  checkNumber('lambda', lambda);
  if (lambda < 0) throw new SamplingInputError('lambda', `lambda must be 0 or more; got ${lambda}.`);
  if (k < 0) return -Infinity;
  return logPoissonDensity(k, lambda);
}
