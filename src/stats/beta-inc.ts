import { incompleteBeta } from './incomplete-beta.js';
import { checkPositive, checkProbability } from './validate.js';

/**
 * The regularized incomplete beta function I_x(a, b) (the beta distribution's CDF at x).
 *
 * Method: the continued fraction of NIST DLMF 8.17.22 evaluated by the modified Lentz algorithm
 * (Lentz 1976; Thompson and Barnett 1986), the smaller tail by the symmetry of DLMF 8.17.4; see
 * {@link incompleteBeta}. For whole a and b it equals a binomial tail (DLMF 8.17.5):
 * I_p(k + 1, n − k) = P(X ≥ k + 1) for X ~ Binomial(n, p).
 */
export function betaInc(x: number, a: number, b: number): number {
  checkProbability('x', x);
  checkPositive('a', a);
  checkPositive('b', b);
  return incompleteBeta(x, a, b)[0];
}
