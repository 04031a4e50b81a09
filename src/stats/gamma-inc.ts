import { incompleteGammaPair } from './incomplete-gamma-pair.js';
import { checkNumber, checkPositive } from './validate.js';
import { SamplingInputError } from '../errors.js';

/**
 * The regularized lower incomplete gamma function P(a, x) (the CDF at x of a gamma
 * distribution with shape a and scale 1).
 *
 * Method: series for x < a + 1, continued fraction otherwise (Numerical Recipes, 3rd ed., §6.2),
 * with Loader's prefactor; see {@link incompleteGammaPair}.
 */
export function gammaInc(x: number, a: number): number {
  checkNumber('x', x);
  if (x < 0) throw new SamplingInputError('x', `x must be 0 or more; got ${x}.`);
  checkPositive('a', a);
  return incompleteGammaPair(x, a)[0];
}
