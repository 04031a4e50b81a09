import { incompleteGamma } from './incomplete-gamma.js';
import { checkNumber, checkPositive } from './validate.js';
import { SamplingInputError } from '../errors.js';

/**
 * The regularized lower incomplete gamma function P(a, x) (the CDF at x of a gamma
 * distribution with shape a and scale 1).
 *
 * Method: the power series of NIST DLMF 8.7.1 for x < a + 1, the continued fraction of DLMF 8.9.2
 * (modified Lentz algorithm) otherwise; see {@link incompleteGamma}.
 */
export function gammaInc(x: number, a: number): number {
  checkNumber('x', x);
  if (x < 0) throw new SamplingInputError('x', `x must be 0 or more; got ${x}.`);
  checkPositive('a', a);
  return incompleteGamma(x, a)[0];
}
