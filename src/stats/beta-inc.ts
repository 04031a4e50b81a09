import { incompleteBetaPair } from './incomplete-beta-pair.js';
import { checkPositive, checkProbability } from './validate.js';

/**
 * The regularized incomplete beta function I_x(a, b) (the beta distribution's CDF at x).
 *
 * Method: continued fraction by the modified Lentz algorithm (Numerical Recipes, 3rd ed., §6.4)
 * with a Loader-style prefactor; see {@link incompleteBetaPair}. For whole a and b it equals a
 * binomial tail: I_p(k + 1, n − k) = P(X ≥ k + 1) for X ~ Binomial(n, p).
 */
export function betaInc(x: number, a: number, b: number): number {
  checkProbability('x', x);
  checkPositive('a', a);
  checkPositive('b', b);
  return incompleteBetaPair(x, a, b)[0];
}
