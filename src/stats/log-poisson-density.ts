import { devianceTerm } from './deviance-term.js';
import { logGamma } from './log-gamma.js';
import { stirlingError } from './stirling-error.js';

/**
 * log of the Poisson density λˣ·e^(−λ)/Γ(x + 1) for real x ≥ 0 and λ ≥ 0.
 *
 * Method: Loader's saddle-point expansion (C. Loader, "Fast and Accurate Computation of Binomial
 * Probabilities", 2000): log f = −stirlerr(x) − bd0(x, λ) − ½·log(2πx); same scheme as dpois_raw
 * in R's nmath. Also the prefactor xᵃ·e^(−x)/Γ(a + 1) of the incomplete gamma function.
 * Internal, unchecked.
 */
export function logPoissonDensity(x: number, lambda: number): number {
  if (lambda === 0) return x === 0 ? 0 : -Infinity;
  if (!Number.isFinite(lambda) || x < 0) return -Infinity;
  if (x <= lambda * Number.MIN_VALUE) return -lambda;
  if (lambda < x * Number.MIN_VALUE) return -lambda + x * Math.log(lambda) - logGamma(x + 1);
  return -stirlingError(x) - devianceTerm(x, lambda) - 0.5 * Math.log(2 * Math.PI * x);
}
